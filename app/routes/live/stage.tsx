import { networkInterfaces } from "node:os";
import QRCode from "qrcode";
import { requireRound } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { snapshot } from "~/game/roomView";
import { joinAddress, joinAddressNote } from "~/lib/joinAddress";
import { Stage } from "~/live/Stage";
import { loadRoomState } from "~/rooms/log.server";
import { hostKeyFor } from "~/rooms/rooms.server";
import { IMMERSIVE } from "~/components/AppShell";
import { NeedsJavaScript } from "~/components/ui";
import type { Route } from "./+types/stage";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Room ${data?.code ?? ""} · Fretcall stage` }];

// The class screen and the phone need every pixel; the site menu would only be tapped by accident.
export const handle = IMMERSIVE;

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db, env } = services(context);
  const room = await requireRound(db, user, params.roomId);
  const config = room.config;
  // Phones cannot reach a stage opened at localhost, so the join link may name another address.
  const address = joinAddress({ publicUrl: env.publicUrlSet ? env.PUBLIC_URL : undefined, requestUrl: request.url, interfaces: networkInterfaces() });
  const joinUrl = `${address.origin}/join?code=${room.code}`;
  // An ended room has no live socket to connect to: its last screen comes from its log.
  const ended = room.endedAt ? await loadRoomState(db, room.id) : undefined;
  return {
    roomId: room.id,
    code: room.code,
    title: room.title,
    hostKey: hostKeyFor(env.SESSION_SECRET, room.id),
    joinUrl,
    joinNote: joinAddressNote(address),
    joinReachable: address.via !== "localhost-only",
    qr: await QRCode.toString(joinUrl, { type: "svg", margin: 1, color: { dark: "#1f2a36", light: "#f7efe1" } }),
    tuning: config.tuning,
    frets: config.frets,
    position: room.position,
    finalScreen: ended ? snapshot(ended.state, { role: "host" }, Date.now()) : null,
  };
}

export default function StageRoute({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <NeedsJavaScript what="The class screen of a live round" />
      <Stage {...loaderData} />
    </>
  );
}
