// GET /api/v1/reading-sets — the caller's school's reading sets they may see, and the ready-made progression.
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { READING_PRESETS } from "~/reading/presets";
import { setsFor } from "~/reading/sets.server";
import { describeReadingSet } from "~/reading/spec";
import type { Route } from "./+types/reading-sets";

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const sets = await setsFor(services(context).db, user);
  return Response.json(
    {
      sets: sets.map((s) => ({ kind: "saved", ...s })),
      presets: READING_PRESETS.map((p) => ({ kind: "ready-made", ...p, summary: describeReadingSet(p.spec) })),
    },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}
