// GET /api/v1/tunes/:id — one tune the caller may see, with its notes and bars.
import { requireTune } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { tuneDetail } from "~/tunes/json";
import { findTune } from "~/tunes/tunes.server";
import type { Route } from "./+types/tune";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const headers = { "Cache-Control": "private, no-store" };
  const { db } = services(context);
  await requireTune(db, user, params.id, "see");
  const tune = await findTune(db, user.orgId, params.id);
  if (!tune) return Response.json({ error: "No such tune." }, { status: 404, headers });
  return Response.json(tuneDetail(tune), { headers });
}
