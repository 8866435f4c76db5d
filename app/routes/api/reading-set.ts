// GET /api/v1/reading-sets/:id — one saved reading set the caller may see, or a ready-made one by its id.
import { requireReadingSet } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { readingPreset } from "~/reading/presets";
import { setFor } from "~/reading/sets.server";
import { describeReadingSet } from "~/reading/spec";
import type { Route } from "./+types/reading-set";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const headers = { "Cache-Control": "private, no-store" };
  const preset = readingPreset(params.id);
  if (preset) return Response.json({ kind: "ready-made", ...preset, summary: describeReadingSet(preset.spec) }, { headers });
  const { db } = services(context);
  await requireReadingSet(db, user, params.id, "see");
  const set = await setFor(db, user, params.id);
  if (!set) return Response.json({ error: "No such reading set." }, { status: 404, headers });
  return Response.json({ kind: "saved", ...set }, { headers });
}
