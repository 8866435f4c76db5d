// What one reducer step adds to the tables beside the event log: new seats, new answer rows, and
// whether the room just ended. Shared by the live hub and the demo history, so both store the same rows.
import type { answers, roomPlayers } from "~/db/schema";
import type { RoomState } from "~/game/room";

export interface StepRows {
  players: (typeof roomPlayers.$inferInsert)[];
  answers: (typeof answers.$inferInsert)[];
  ended: boolean;
}

/** `userId` links the seats this step created to the signed-in student who joined. */
export function stepRows(roomId: string, before: RoomState, after: RoomState, userId: string | null): StepRows {
  const prompts = after.config.prompts;
  return {
    players: after.players.slice(before.players.length).map((p) => ({ id: p.id, roomId, nickname: p.nickname, userId })),
    answers: after.answers.slice(before.answers.length).map((a) => {
      const note = prompts[a.index]!;
      return {
        roomId,
        playerId: a.playerId,
        promptIndex: a.index,
        written: note.written,
        writtenMidi: note.writtenMidi,
        string: a.spot.string,
        fret: a.spot.fret,
        kind: a.diagnosis.kind,
        pitchRight: a.diagnosis.pitchRight,
        verdict: a.verdict,
        points: a.points,
        reactionMs: Math.round(a.reactionMs),
        streak: a.streak,
        at: a.at,
      };
    }),
    ended: after.phase === "ended" && before.phase !== "ended",
  };
}
