import QRCode from "qrcode";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { Stage } from "~/live/Stage";
import { requireRoomAccess } from "~/rooms/access.server";
import { hostKeyFor } from "~/rooms/rooms.server";
import { IMMERSIVE } from "~/components/AppShell";
import type { Route } from "./+types/stage";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Room ${data?.code ?? ""} · Fretcall stage` }];

// The class screen and the phone need every pixel; the site menu would only be tapped by accident.
export const handle = IMMERSIVE;

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db, env } = services(context);
  const room = await requireRoomAccess(db, user, params.roomId);
  const config = room.config;
  // The address the teacher reached us on is the one the class's phones can reach too.
  const joinUrl = `${new URL(request.url).origin}/join?code=${room.code}`;
  return {
    roomId: room.id,
    code: room.code,
    title: room.title,
    hostKey: hostKeyFor(env.SESSION_SECRET, room.id),
    joinUrl,
    qr: await QRCode.toString(joinUrl, { type: "svg", margin: 1, color: { dark: "#1f2a36", light: "#f7efe1" } }),
    tuning: config.tuning,
    frets: config.frets,
    position: room.position,
  };
}

export default function StageRoute({ loaderData }: Route.ComponentProps) {
  return <Stage {...loaderData} />;
}
