import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { rosterOf } from "~/school/people.server";
import type { Route } from "./+types/roster";

/** A class roster, for its teachers and the school's admins only (as the class page). */
export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  return Response.json(
    { class: { id: cls.id, name: cls.name, joinCode: cls.joinCode }, students: await rosterOf(db, cls.id) },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}
