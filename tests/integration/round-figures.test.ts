// One round played by hand over real sockets, then read back four ways: the results page, the JSON API,
// the class review and the CSV export must give the same figures, and the same as the stage's own summary.
import { eq } from "drizzle-orm";
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { rooms } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import type { Summary } from "~/game/protocol";
import { spotsFor } from "~/music/fretboard";
import { resolveTuning } from "~/music/tuning";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";
import { joinPlayer, openStage, openTestRoom, spotOf, untilShown } from "../../server/scripted-rooms";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

const CLASS = "demo-class-tue";

interface Figures {
  points: number;
  answered: number;
  correct: number;
  accuracyPct: number;
  medianS: string;
  longestStreak: number;
}

/** A page's words without its markup, for reading figures the way a teacher sees them. */
const wordsOf = (html: string) => html.replace(/<!-- -->/g, "").replace(/<[^>]+>/g, " ").replace(/&nbsp;/g, " ").replace(/\s+/g, " ");
const num = (m: RegExpMatchArray | null, i: number) => Number(m![i]);

function fromResultsPage(words: string, nick: string): Figures {
  const row = words.match(new RegExp(`${nick} (\\d+) (\\d+)/(\\d+) \\((\\d+) %\\) ([\\d.]+) s`));
  const streak = words.match(new RegExp(`${nick} (\\d+) in a row`));
  expect(row, `${nick} on the results page`).not.toBeNull();
  return { points: num(row, 1), correct: num(row, 2), answered: num(row, 3), accuracyPct: num(row, 4), medianS: row![5]!, longestStreak: num(streak, 1) };
}

function fromReviewPage(words: string, nick: string): Figures {
  const row = words.match(new RegExp(`${nick} \\(nickname only\\) (\\d+) (\\d+) (\\d+) % \\((\\d+)/(\\d+)\\) ([\\d.]+) s`));
  expect(row, `${nick} in the class review`).not.toBeNull();
  return { points: num(row, 1), longestStreak: num(row, 2), accuracyPct: num(row, 3), correct: num(row, 4), answered: num(row, 5), medianS: row![6]! };
}

describe("one round, four reports", () => {
  it("agree on every player's figures when home spot only makes an other-spot answer half credit", async () => {
    const { db } = server.services;
    const room = await openTestRoom(db, { prompts: 3, homeOnly: true });
    await db.update(rooms).set({ classId: CLASS }).where(eq(rooms.id, room.id));
    const tuning = resolveTuning(room.config.tuning);
    const otherSpot = (index: number) => {
      const note = room.config.prompts[index]!;
      const spot = spotsFor(note.written, { tuning, frets: room.config.frets }).find((s) => s.string !== note.home.string);
      expect(spot, `prompt ${index} has a second spot`).toBeDefined();
      return spot!;
    };
    const home = (index: number) => spotOf(room.config.prompts[index]!.home);
    const wrong = { string: 6, fret: 15 };
    // Ana: home, other spot (right pitch, half credit), home. Bea: wrong, home, other spot.
    const plan: Record<string, { string: number; fret: number }[]> = {
      "Agree Ana": [home(0), otherSpot(1), home(2)],
      "Agree Bea": [wrong, home(1), otherSpot(2)],
    };

    const stage = await openStage(server.url, server.services.env.SESSION_SECRET, room);
    const players = await Promise.all(Object.keys(plan).map((nick) => joinPlayer(server.url, room.code, nick)));
    await stage.next("roster", (m) => m.players.length === 2);
    stage.send({ type: "host", action: "start" });
    for (let index = 0; index < 3; index++) {
      const prompt = await stage.next("prompt", (m) => m.index === index);
      await untilShown(prompt.showAt);
      await Promise.all(
        players.map(async ({ pad }, i) => {
          pad.send({ type: "answer", promptId: prompt.promptId, spot: Object.values(plan)[i]![index], tapAt: Date.now() });
          expect((await pad.next("answer-ack", (m) => m.promptId === prompt.promptId)).accepted).toBe(true);
        }),
      );
      await stage.next("reveal", (m) => m.promptId === prompt.promptId);
      stage.send({ type: "host", action: "next" });
    }
    const ended = await stage.next("ended");
    for (const { pad } of players) pad.close();
    stage.close();
    await expect.poll(async () => (await db.select({ endedAt: rooms.endedAt }).from(rooms).where(eq(rooms.id, room.id)))[0]!.endedAt).not.toBeNull();

    const teacher = new Client(server.url);
    expect((await teacher.post("/signin", { email: DEMO_SCHOOL.teachers[0].email, password: DEMO_PASSWORD })).status).toBe(302);
    const resultsPage = wordsOf(await (await teacher.get(`/results/${room.id}`)).text());
    const reviewPage = wordsOf(await (await teacher.get(`/teach/classes/${CLASS}/review?round=${room.id}`)).text());
    const api = (await (await teacher.get(`/api/v1/rounds/${room.id}/results`)).json()) as { players: { nickname: string; points: number; answered: number; correct: number; accuracy: number; medianMs: number | null; longestStreak: number }[] };
    const csv = Papa.parse<string[]>(await (await teacher.get(`/teach/classes/${CLASS}/export.csv?round=${room.id}`)).text(), { skipEmptyLines: true }).data;

    for (const nick of Object.keys(plan)) {
      const stageSaid = ended.summaries.find((s: Summary) => s.nickname === nick)!;
      const fromApi = api.players.find((p) => p.nickname === nick)!;
      const viaApi: Figures = {
        points: fromApi.points,
        answered: fromApi.answered,
        correct: fromApi.correct,
        accuracyPct: Math.round(fromApi.accuracy * 100),
        medianS: (fromApi.medianMs! / 1000).toFixed(1),
        longestStreak: fromApi.longestStreak,
      };
      const line = csv.find((r) => r[3] === nick)!;
      const viaCsv: Figures = { points: Number(line[5]), answered: Number(line[6]), correct: Number(line[7]), accuracyPct: Number(line[8]), medianS: Number(line[9]).toFixed(1), longestStreak: Number(line[10]) };

      // The stage's end-of-round summary is the reducer's own count.
      expect(viaApi).toMatchObject({ points: stageSaid.points, answered: 3, correct: stageSaid.correct, longestStreak: stageSaid.longestStreak });
      expect(fromResultsPage(resultsPage, nick)).toEqual(viaApi);
      expect(fromReviewPage(reviewPage, nick)).toEqual(viaApi);
      expect(viaCsv).toEqual(viaApi);
    }
    // The other-spot answer was right pitch but not full credit: it is not counted as correct.
    expect(api.players.find((p) => p.nickname === "Agree Ana")!.correct).toBe(2);
    expect(api.players.find((p) => p.nickname === "Agree Bea")!.correct).toBe(1);
  }, 60_000);
});
