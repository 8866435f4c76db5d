// GET /api/v1/rounds/:roomId/results — one round: each player's summary and the note heatmap.
import { requireRound } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { reviewInput } from "~/review/review.server";
import { noteHeatmap } from "~/review/stats";
import { apiRounds } from "~/review/api";
import type { Route } from "./+types/round-results";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const room = await requireRound(db, user, params.roomId);
  const input = await reviewInput(db, { roomId: room.id });
  const [round] = apiRounds(input);
  return Response.json(
    { ...round!, classId: room.classId, mode: room.mode, notes: noteHeatmap(input) },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}
