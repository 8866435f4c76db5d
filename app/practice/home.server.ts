import { findTune } from "~/tunes/tunes.server";
// The student's home page figures: day streak, recent sessions and passes, and progress per note.
import { and, eq, gte } from "drizzle-orm";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { practiceAnswers, rhythmAttempts } from "~/db/schema";
import { homeSpotFor } from "~/music/positions";
import { readingPreset } from "~/reading/presets";
import { setsFor } from "~/reading/sets.server";
import { classesFor } from "~/school/classes.server";
import { HISTORY_DAYS, spotMapFor } from "./practice.server";
import { rhythmPasses } from "./rhythmPass.server";
import { dayStreak, noteCells, sessionsOf } from "./summary";

const DAY_MS = 86_400_000;
/** Names what was practised, for the student: a set's or tune's name. */
async function sourceNamer(db: Db, user: SessionUser, sources: string[]) {
  const needSets = sources.some((s) => s.startsWith("set:"));
  const sets = needSets ? new Map((await setsFor(db, user)).map((s) => [s.id, s.name])) : new Map<string, string>();
  const tunes = new Map<string, string>();
  for (const s of sources.filter((x) => x.startsWith("tune:"))) tunes.set(s, (await findTune(db, user.orgId, s.slice(5)))?.title ?? "A tune");
  return (source: string) => {
    const [kind, id = ""] = source.split(/:(.*)/s);
    if (kind === "preset") return readingPreset(id)?.name ?? "Ready-made reading set";
    if (kind === "set") return sets.get(id) ?? "A reading set";
    if (kind === "tune") return tunes.get(source) ?? "A tune";
    return `Position ${id}, naturals`;
  };
}

export async function practiceHome(db: Db, user: SessionUser, tzOffsetMinutes: number, now = Date.now()) {
  const since = new Date(now - HISTORY_DAYS * DAY_MS);
  const [rows, passTimes, passes, classes] = await Promise.all([
    db
      .select({
        source: practiceAnswers.source,
        position: practiceAnswers.position,
        tuning: practiceAnswers.tuning,
        written: practiceAnswers.written,
        writtenMidi: practiceAnswers.writtenMidi,
        kind: practiceAnswers.kind,
        pitchRight: practiceAnswers.pitchRight,
        reactionMs: practiceAnswers.reactionMs,
        at: practiceAnswers.at,
      })
      .from(practiceAnswers)
      .where(and(eq(practiceAnswers.userId, user.id), gte(practiceAnswers.at, since))),
    db.select({ at: rhythmAttempts.at }).from(rhythmAttempts).where(and(eq(rhythmAttempts.userId, user.id), gte(rhythmAttempts.at, since))),
    rhythmPasses(db, user.id, undefined, 5),
    classesFor(db, user),
  ]);
  const answers = rows.map((r) => ({ ...r, at: r.at.getTime() }));
  const streak = dayStreak([...answers.map((a) => a.at), ...passTimes.map((p) => p.at.getTime())], now, tzOffsetMinutes);
  const sessions = sessionsOf(answers).slice(0, 5);
  const name = await sourceNamer(db, user, [...new Set([...sessions.map((s) => s.source), ...passes.map((p) => `tune:${p.tuneId}`)])]);

  // Progress per note in the position and tuning practised most: a note's home spot belongs to a position.
  const counts = new Map<string, number>();
  for (const a of answers) counts.set(`${a.position} ${a.tuning}`, (counts.get(`${a.position} ${a.tuning}`) ?? 0) + 1);
  const top = [...counts].sort((a, b) => b[1] - a[1])[0]?.[0];
  let notes = null;
  if (top) {
    const [positionText, tuning] = top.split(" ") as [string, string];
    const position = Number(positionText);
    const { map } = await spotMapFor(db, classes[0]?.id ?? null, position, tuning);
    const inPlace = answers.filter((a) => a.position === position && a.tuning === tuning);
    const cells = noteCells(inPlace, (midi) => {
      const home = homeSpotFor(map, midi);
      return home ? { string: home.string, fret: home.fret } : null;
    });
    notes = { position, tuning, cells };
  }
  return {
    streak,
    sessions: sessions.map((s) => ({ ...s, title: name(s.source) })),
    passes: passes.map((p) => ({ id: p.id, tuneId: p.tuneId, title: name(`tune:${p.tuneId}`), tempo: p.tempo, score: p.score, at: p.at })),
    notes,
  };
}
