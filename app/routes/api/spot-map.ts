// GET /api/v1/spot-map?position=5&tuning=standard — the default home-spot map of a position.
import { apiAnswer, parseSpotMapQuery } from "~/components/neckQuery";
import type { Route } from "./+types/spot-map";

export function loader({ request }: Route.LoaderArgs) {
  return apiAnswer(parseSpotMapQuery(new URL(request.url).searchParams), ({ map, frets }) => ({
    position: map.position,
    tuning: map.tuning,
    frets,
    reading: map.reading,
    spots: map.spots.map(({ written, string, fret }) => ({ written, string, fret })),
  }));
}
