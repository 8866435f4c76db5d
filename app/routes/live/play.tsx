import { data, Link } from "react-router";
import { getOptionalUser } from "~/auth/guards.server";
import { services } from "~/context";
import { formatRoomCode, parseRoomCode } from "~/game/roomCode";
import { Pad } from "~/live/Pad";
import { openRoomSocketEarly } from "~/live/roomSocket";
import { retryAfterHeaders, tooMany } from "~/auth/rate-limit.server";
import { lookUpRoom } from "~/rooms/rooms.server";
import { IMMERSIVE } from "~/components/AppShell";
import { buttonClass, NeedsJavaScript, Notice, PageTitle } from "~/components/ui";
import type { Route } from "./+types/play";

/** The room's socket, opened before the pad renders so its handshake overlaps the rest of the load. */
function openSocketEarly(typed: string) {
  const parsed = parseRoomCode(typed);
  if (parsed.ok) openRoomSocketEarly(parsed.code);
}

// A first load (the QR code, a reload): as soon as the browser runs this page's code, while React hydrates.
if (typeof document !== "undefined") {
  const inPath = /^\/play\/([^/]+)\/?$/.exec(location.pathname);
  if (inPath) openSocketEarly(decodeURIComponent(inPath[1]!));
}

// From the join page: alongside the request for the page's data.
export async function clientLoader({ params, serverLoader }: Route.ClientLoaderArgs) {
  openSocketEarly(params.code);
  return serverLoader();
}

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
    // Said on the phone's own screen: a round that is over is not a page that went missing.
    return data({ gone: { ended: found.ended, message: found.error, code: parsed.code } }, { status: found.ended ? 410 : 404 });
  }
  const room = found.room;
  const user = await getOptionalUser(request, context);
  const config = room.config;
  return {
    gone: null,
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
  if (loaderData.gone) return <NoRound {...loaderData.gone} />;
  return (
    <>
      <NeedsJavaScript what="Playing a live round" />
      <Pad {...loaderData} />
    </>
  );
}

function NoRound({ ended, message, code }: { ended: boolean; message: string; code: string }) {
  return (
    <div className="mx-auto max-w-sm space-y-4 pt-4">
      <PageTitle>{ended ? "Round over" : "No such room"}</PageTitle>
      <Notice tone={ended ? "info" : "error"}>{message}</Notice>
      <Link to="/join" className={buttonClass("teal", "w-full text-xl")}>
        {ended ? "Join another round" : `Type the code again (not ${formatRoomCode(code)})`}
      </Link>
    </div>
  );
}
