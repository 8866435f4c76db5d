// GET /teach/classes/:classId/review/live?round=<roomId> — server-sent events while a round runs:
// "answers" (the new count) whenever answers were added, "ended" once the round is over. It looks
// when the round's news says it changed (from whichever node stored the answers), and every few
// seconds besides, since news is at most once (a Redis restart may swallow some).
import { data } from "react-router";
import { eventStream } from "remix-utils/sse/server";
import { requireClassTeacher, requireRound } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { services } from "~/context";
import { answerCount, roomEnded } from "~/review/review.server";
import type { Route } from "./+types/class-review-live";

const POLL_MS = 5_000;
// A round lasts minutes; a forgotten tab should not poll the database all day.
const MAX_POLLS = (3 * 60 * 60 * 1_000) / POLL_MS;

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db, rounds } = services(context);
  await requireClassTeacher(db, user, params.classId);
  const roomId = new URL(request.url).searchParams.get("round") ?? "";
  const room = await requireRound(db, user, roomId);
  if (room.classId !== params.classId) throw data({ error: "No such round." }, { status: 404 });

  return eventStream(request.signal, (send, abort) => {
    let last = -1;
    let polls = 0;
    let busy = false;
    let closed = false;
    // News arriving while a look is under way is looked at once that one is done.
    let again = false;
    const look = async (polled: boolean): Promise<void> => {
      if (closed) return;
      if (polled) polls++;
      if (busy) return void (again = true);
      busy = true;
      try {
        const [count, ended] = await Promise.all([answerCount(db, room.id), roomEnded(db, room.id)]);
        if (count !== last) send({ event: "answers", data: String((last = count)) });
        if (ended || polls >= MAX_POLLS) {
          send({ event: "ended", data: ended ? "ended" : "timeout" });
          abort();
        }
      } catch {
        abort();
      } finally {
        busy = false;
      }
      if (again) {
        again = false;
        return look(false);
      }
    };
    void look(false);
    const timer = setInterval(() => void look(true), POLL_MS);
    const stopListening = rounds.listen(room.id, () => void look(false));
    return () => {
      closed = true;
      clearInterval(timer);
      stopListening();
    };
  });
}
