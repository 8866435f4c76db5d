// GET /api/v1/tunes — the built-in tunes and the caller's school's uploads (as the Tunes page lists them).
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { tuneSummary } from "~/tunes/json";
import { tunesFor } from "~/tunes/tunes.server";
import type { Route } from "./+types/tunes";

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const list = await tunesFor(services(context).db, user.orgId);
  return Response.json({ tunes: list.map(tuneSummary) }, { headers: { "Cache-Control": "private, no-store" } });
}
