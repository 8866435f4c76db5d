import { data } from "react-router";
import { getOptionalUser } from "~/auth/guards.server";
import { services } from "~/context";
import { parseRoomCode } from "~/game/roomCode";
import { Pad } from "~/live/Pad";
import { retryAfterHeaders, tooMany } from "~/auth/rate-limit.server";
import { lookUpRoom } from "~/rooms/rooms.server";
import { IMMERSIVE } from "~/components/AppShell";
import { NeedsJavaScript } from "~/components/ui";
import type { Route } from "./+types/play";

export const meta: Route.MetaFunction = () => [{ title: "Fretcall pad" }];

export const headers: Route.HeadersFunction = retryAfterHeaders;

// The class screen and the phone need every pixel; the site menu would only be tapped by accident.
export const handle = IMMERSIVE;

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const parsed = parseRoomCode(params.code);
  if (!parsed.ok) throw data({ error: parsed.message }, { status: 400 });
  const found = await lookUpRoom(services(context), request, parsed.code);
  if (!found.ok) {
    if (found.refused) throw tooMany(found.refused, { error: found.refused.message });
    throw data({ error: found.error }, { status: 404 });
  }
  const room = found.room;
  const user = await getOptionalUser(request, context);
  const config = room.config;
  return {
    code: room.code,
    tuning: config.tuning,
    frets: config.frets,
    position: room.position,
    // A signed-in student of the room's school plays under their own name; the server links the seat to the
    // account. In another school's room they are a guest, like anyone with the code.
    accountName: user?.role === "student" && user.orgId === room.orgId ? user.displayName : null,
  };
}

export default function PlayRoute({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <NeedsJavaScript what="Playing a live round" />
      <Pad {...loaderData} />
    </>
  );
}
