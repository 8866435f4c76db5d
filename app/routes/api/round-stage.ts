// GET /api/v1/rounds/:roomId/stage — what a stage client needs to run a live room: its code and host credential.
import { requireRound } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { hostKeyFor } from "~/rooms/rooms.server";
import type { Route } from "./+types/round-stage";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db, env } = services(context);
  // The same people as may open the stage page, which hands the browser the same credential.
  const room = await requireRound(db, user, params.roomId);
  return Response.json(
    { id: room.id, code: room.code, hostKey: hostKeyFor(env.SESSION_SECRET, room.id), ended: room.endedAt !== null },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}
