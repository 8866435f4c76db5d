// The demo school is seeded on the first run only: a restarted demo keeps its live rooms.
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, openDb } from "~/db/client.server";
import { rooms } from "~/db/schema";
import { ensureDemo, seedDemo } from "../../server/seed";
import { openTestRoom } from "../../server/scripted-rooms";

const db = await openDb(process.env.DATABASE_URL!);
afterAll(() => closeDb(db));

describe("ensureDemo", () => {
  it("seeds once, keeps the school (and its open rooms) after that, and seedDemo starts it afresh", async () => {
    expect(await ensureDemo(db)).toBe(false);
    const room = await openTestRoom(db);
    expect(await ensureDemo(db)).toBe(true);
    expect(await db.select().from(rooms).where(eq(rooms.id, room.id))).toHaveLength(1);
    await seedDemo(db);
    expect(await db.select().from(rooms).where(eq(rooms.id, room.id))).toHaveLength(0);
  });
});
