import { describe, expect, it } from "vitest";
import { migrateDb, openDb } from "~/db/client.server";
import { answers, roomEvents, rooms } from "~/db/schema";
import { loadRoomState } from "~/rooms/log.server";
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
  });
});
