// GET /teach/classes/:classId/review/live?round=<roomId> — server-sent events while a round runs:
// "answers" (the new count) whenever answers were added, "ended" once the round is over.
import { data } from "react-router";
import { eventStream } from "remix-utils/sse/server";
import { requireClassTeacher, requireRound } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { answerCount, roomEnded } from "~/review/review.server";
import type { Route } from "./+types/class-review-live";

const POLL_MS = 1_000;
// A round lasts minutes; a forgotten tab should not poll the database all day.
const MAX_POLLS = 3 * 60 * 60;

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  await requireClassTeacher(db, user, params.classId);
  const roomId = new URL(request.url).searchParams.get("round") ?? "";
  const room = await requireRound(db, user, roomId);
  if (room.classId !== params.classId) throw data({ error: "No such round." }, { status: 404 });

  return eventStream(request.signal, (send, abort) => {
    let last = -1;
    let polls = 0;
    let busy = false;
    const poll = async () => {
      if (busy) return;
      busy = true;
      try {
        const [count, ended] = await Promise.all([answerCount(db, room.id), roomEnded(db, room.id)]);
        if (count !== last) send({ event: "answers", data: String((last = count)) });
        if (ended || ++polls >= MAX_POLLS) {
          send({ event: "ended", data: ended ? "ended" : "timeout" });
          abort();
        }
      } catch {
        abort();
      } finally {
        busy = false;
      }
    };
    void poll();
    const timer = setInterval(poll, POLL_MS);
    return () => clearInterval(timer);
  });
}
