// POST /api/v1/practice/rhythm — a rhythm pass { id, tuneId, tempo, position?, taps: [ms from the first click],
//      input?: "tap" | "played", latencyMs? (played: the calibrated delay) }, scored on the server. GET /api/v1/practice/rhythm[?tune=<id>] — your own passes, newest first.
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { noStore, readJsonBody } from "~/lib/json.server";
import { recordRhythmPass, rhythmPasses } from "~/practice/rhythmPass.server";
import type { Route } from "./+types/practice-rhythm";

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["student"]);
  const tune = new URL(request.url).searchParams.get("tune") ?? undefined;
  return Response.json({ passes: await rhythmPasses(services(context).db, user.id, tune, 50) }, { headers: noStore });
}

export async function action({ request, context }: Route.ActionArgs) {
  if (request.method !== "POST") return Response.json({ error: "Use POST to send a pass." }, { status: 405, headers: { Allow: "GET, POST" } });
  const user = await requireUserWithRole(request, context, ["student"]);
  const body = await readJsonBody(request);
  if (!body.ok) return body.response;
  const result = await recordRhythmPass(services(context).db, user, body.value);
  return Response.json(result.body, { status: result.status, headers: noStore });
}
