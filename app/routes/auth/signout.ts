import { redirect } from "react-router";
import { endSession } from "~/auth/session.server";
import { services } from "~/context";
import type { Route } from "./+types/signout";

export async function action({ request, context }: Route.ActionArgs) {
  return endSession(services(context).sessions, request, "/");
}

// Signing out only by POST, so a link or an image on another page can't sign anyone out.
export const loader = () => redirect("/");
