// Rounds and answers written straight into the database, so a test knows exactly the figures behind the class hub.
import type { Db } from "~/db/client.server";
import { answers, roomPlayers, rooms } from "~/db/schema";
import { configFromSetup } from "~/rooms/rooms.server";
import { parsedSetup, QUICK_DEFAULTS } from "~/rooms/setup";

export type Play = (i: number) => { home: boolean; ms: number };
export const quick: Play = () => ({ home: true, ms: 2_000 });

/**
 * One ended round of naturals in fifth position (step 1 of the progression) in which each student answers every
 * prompt as `play` says; a home-spot miss is the same spot an octave up. `oneNote` asks the first note every time.
 */
export async function playedRound(
  db: Db,
  round: { n: number; orgId: string; hostId: string; classId: string; title?: string; oneNote?: boolean },
  play: Record<string, { userId: string; play: Play }>,
) {
  const { n, classId } = round;
  const made = configFromSetup(parsedSetup({ ...QUICK_DEFAULTS, classId }), `HUB${n}`, n);
  const config = round.oneNote ? { ...made, prompts: made.prompts.map(() => made.prompts[0]!) } : made;
  const roomId = `hub-round-${classId}-${n}`;
  const title = round.title ?? "Sprint · naturals";
  await db.insert(rooms).values({ id: roomId, code: `HUB${n}`, orgId: round.orgId, hostUserId: round.hostId, classId, title, mode: "sprint", position: 5, config, createdAt: new Date(Date.now() - (10 - n) * 60_000), endedAt: new Date() });
  for (const [name, { userId, play: answer }] of Object.entries(play)) {
    const playerId = `${roomId}-${name}`;
    await db.insert(roomPlayers).values({ id: playerId, roomId, userId, nickname: name });
    await db.insert(answers).values(
      config.prompts.map((p, i) => {
        const { home, ms } = answer(i);
        return { roomId, playerId, promptIndex: i, written: p.written, writtenMidi: p.writtenMidi, string: p.home.string, fret: home ? p.home.fret : p.home.fret + 12, kind: home ? "home-spot" : "octave-off", pitchRight: home, verdict: home ? ("right" as const) : ("wrong" as const), points: home ? 900 : 0, reactionMs: ms, streak: 0, at: Date.now() - 1000 };
      }),
    );
  }
  return config;
}
