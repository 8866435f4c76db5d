import { requireUser } from "~/auth/guards.server";
import { services } from "~/context";
import { classesFor } from "~/school/classes.server";
import type { Route } from "./+types/classes";

/** The caller's classes: every class of the school for an admin, their own for a teacher or student. */
export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUser(request, context);
  const list = await classesFor(services(context).db, user);
  return Response.json({ classes: list }, { headers: { "Cache-Control": "private, no-store" } });
}
