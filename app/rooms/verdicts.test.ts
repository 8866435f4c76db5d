import { asc, isNull, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { closeDb, migrateDb, openDb } from "~/db/client.server";
import { answers } from "~/db/schema";
import { seedDemo } from "../../server/seed";
import { fillAnswerVerdicts } from "./verdicts.server";

describe("filling stored answers' verdicts from their rooms' logs", () => {
  it("gives every row the verdict its round gave, and a second run changes nothing", async () => {
    const db = await openDb(`file:tests/.tmp/verdicts-${process.pid}.db`);
    await migrateDb(db);
    await seedDemo(db);
    const stored = () => db.select({ roomId: answers.roomId, playerId: answers.playerId, promptIndex: answers.promptIndex, verdict: answers.verdict }).from(answers).orderBy(asc(answers.roomId), asc(answers.playerId), asc(answers.promptIndex), asc(answers.string), asc(answers.fret));
    const written = await stored();
    // The demo's home-spot-only rounds have other-spot answers: the verdict is not the mistake kind.
    expect(new Set(written.map((a) => a.verdict))).toEqual(new Set(["right", "partial", "wrong"]));

    // As if these rows were stored before the column existed.
    await db.run(sql`UPDATE answers SET verdict = NULL`);
    expect(await fillAnswerVerdicts(db)).toBe(written.length);
    expect(await stored()).toEqual(written);
    expect(await db.$count(answers, isNull(answers.verdict))).toBe(0);

    expect(await fillAnswerVerdicts(db)).toBe(0);
    await migrateDb(db);
    expect(await stored()).toEqual(written);
    await closeDb(db);
  });
});
