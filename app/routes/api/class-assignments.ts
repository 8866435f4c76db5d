// GET /api/v1/classes/:classId/assignments — the class's assignments with every targeted student's progress.
import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { classAssignments } from "~/practice/assignments.server";
import type { Route } from "./+types/class-assignments";

const iso = (ms: number | null) => (ms === null ? null : new Date(ms).toISOString());

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const list = await classAssignments(db, cls.id);
  return Response.json(
    {
      class: { id: cls.id, name: cls.name },
      assignments: list.map((a) => ({
        id: a.id,
        title: a.title,
        material: a.material,
        goal: a.goal,
        dueAt: iso(a.dueAt),
        createdAt: iso(a.createdAt),
        audience: a.chosen ? "chosen" : "class",
        done: a.done,
        targeted: a.students.length,
        students: a.students.map((s) => ({
          userId: s.userId,
          displayName: s.displayName,
          status: s.status,
          late: s.late,
          progress: { ...s.progress, completedAt: iso(s.progress.completedAt) },
        })),
      })),
    },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}
