// GET /api/v1/spots?note=E5&tuning=standard&frets=15&reading=guitar — every spot that plays a written note.
import { apiAnswer, noteOnNeck, parseSpotsQuery } from "~/components/neckQuery";
import type { Route } from "./+types/spots";

export function loader({ request }: Route.LoaderArgs) {
  return apiAnswer(parseSpotsQuery(new URL(request.url).searchParams), noteOnNeck);
}
