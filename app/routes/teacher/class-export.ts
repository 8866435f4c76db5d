// GET /teach/classes/:classId/export.csv[?round=<roomId>] — results for a gradebook.
import { data } from "react-router";
import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { gradebookRows, toCsv } from "~/review/csv";
import { reviewInput } from "~/review/review.server";
import { roundPlayers } from "~/review/stats";
import type { Route } from "./+types/class-export";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const input = await reviewInput(db, { classId: cls.id });
  const only = new URL(request.url).searchParams.get("round");
  const rounds = input.rounds.filter((s) => only === null || s.id === only).sort((a, b) => a.startedAt - b.startedAt);
  if (only !== null && rounds.length === 0) throw data({ error: "No such round in this class." }, { status: 404 });
  const rows = rounds.flatMap((s) => gradebookRows(cls.name, s, roundPlayers(input, s.id)));
  const name = `${cls.name}${only ? `-${new Date(rounds[0]!.startedAt).toISOString().slice(0, 10)}` : ""}`.replace(/[^\w-]+/g, "-");
  return new Response(toCsv(rows), {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="fretcall-${name}.csv"`,
      "Cache-Control": "private, no-store",
    },
  });
}
