// Start-up data step: answers stored before `answers.verdict` existed get the verdict their round gave,
// by replaying each room's event log through the reducer (the one place the scoring rules live).
import { and, eq, isNull } from "drizzle-orm";
import type { Db } from "~/db/client.server";
import { answers } from "~/db/schema";
import { loadRoomState } from "./log.server";

/**
 * Fills every NULL verdict it can and returns how many rows it filled. Idempotent: rows already
 * filled are never touched, so running it at every start costs one indexed look-up once done.
 * An answer row the log does not hold (none is written that way) stays NULL and counts as not right.
 */
export async function fillAnswerVerdicts(db: Db): Promise<number> {
  const pending = await db.selectDistinct({ roomId: answers.roomId }).from(answers).where(isNull(answers.verdict));
  let filled = 0;
  for (const { roomId } of pending) {
    const loaded = await loadRoomState(db, roomId);
    if (!loaded) continue;
    const updates = loaded.state.answers.map((a) =>
      db
        .update(answers)
        .set({ verdict: a.verdict })
        .where(
          and(
            eq(answers.roomId, roomId),
            eq(answers.playerId, a.playerId),
            eq(answers.promptIndex, a.index),
            eq(answers.string, a.spot.string),
            eq(answers.fret, a.spot.fret),
            isNull(answers.verdict),
          ),
        ),
    );
    const [first, ...rest] = updates;
    if (!first) continue;
    // One transaction per room: a room is either filled whole or left for the next start.
    for (const result of await db.batch([first, ...rest])) filled += result.rowsAffected;
  }
  return filled;
}
