// GET /api/v1/me/assignments — the signed-in student's assignments, soonest due first, with progress.
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { studentAssignments } from "~/practice/assignments.server";
import type { Route } from "./+types/me-assignments";

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["student"]);
  const { db, env } = services(context);
  const list = await studentAssignments(db, user.id);
  return Response.json(
    {
      assignments: list.map((a) => ({
        ...a,
        dueAt: new Date(a.dueAt).toISOString(),
        progress: { ...a.progress, completedAt: a.progress.completedAt === null ? null : new Date(a.progress.completedAt).toISOString() },
        practiceUrl: `${env.PUBLIC_URL}${a.practiceUrl}`,
      })),
    },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}
