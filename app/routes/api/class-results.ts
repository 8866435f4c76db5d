// GET /api/v1/classes/:classId/results — every round of the class with each player's summary.
import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { apiRounds } from "~/review/api";
import { reviewInput } from "~/review/review.server";
import type { Route } from "./+types/class-results";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const input = await reviewInput(db, { classId: cls.id });
  return Response.json({ class: { id: cls.id, name: cls.name }, rounds: apiRounds(input) }, { headers: { "Cache-Control": "private, no-store" } });
}
