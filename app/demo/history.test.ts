import { describe, expect, it } from "vitest";
import { migrateDb, openDb } from "~/db/client.server";
import { answers, roomEvents, rooms } from "~/db/schema";
import { loadRoomState } from "~/rooms/log.server";
import { reviewInput } from "~/review/review.server";
import { noteHeatmap } from "~/review/stats";
import { demoEditedMap } from "./reading";
import { seedDemo } from "../../server/seed";
import { eq } from "drizzle-orm";

describe("demo history", () => {
  it("stores rounds whose event log replays to the same answers", async () => {
    const db = await openDb(`file:tests/.tmp/history-${process.pid}.db`);
    await migrateDb(db);
    await seedDemo(db);
    const all = await db.select().from(rooms);
    expect(all.length).toBe(15);
    for (const room of all.slice(0, 3)) {
      const stored = await db.select().from(answers).where(eq(answers.roomId, room.id));
      const replayed = (await loadRoomState(db, room.id))!.state;
      expect(replayed.phase).toBe("ended");
      expect(replayed.answers.map((a) => [a.playerId, a.index, a.points, a.diagnosis.kind]).sort()).toEqual(stored.map((a) => [a.playerId, a.promptIndex, a.points, a.kind]).sort());
    }
    expect((await db.select().from(roomEvents)).length).toBeGreaterThan(500);

    // Each class's rounds follow its own home-spot map: the Tuesday class's edited B4, the others' default one.
    const homeOfB4 = async (classId: string) => noteHeatmap(await reviewInput(db, { classId })).find((c) => c.written === "B4")?.home;
    const edited = demoEditedMap().spots.find((s) => s.written === "B4")!;
    expect(await homeOfB4("demo-class-tue")).toEqual({ string: edited.string, fret: edited.fret });
    expect(await homeOfB4("demo-class-sat")).toEqual({ string: 3, fret: 4 });
  });
});
