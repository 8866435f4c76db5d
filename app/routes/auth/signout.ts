import { redirect } from "react-router";
import { services } from "~/context";
import type { Route } from "./+types/signout";

export async function action({ request, context }: Route.ActionArgs) {
  const { sessions } = services(context);
  const session = await sessions.getSession(request.headers.get("Cookie"));
  return redirect("/", { headers: { "Set-Cookie": await sessions.destroySession(session) } });
}

// Signing out only by POST, so a link or an image on another page can't sign anyone out.
export const loader = () => redirect("/");
