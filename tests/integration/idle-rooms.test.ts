import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { answers, rooms } from "~/db/schema";
import { CLOSE_CODES } from "~/game/protocol";
import { seedDemo } from "../../server/seed";
import { answerFirstPrompt, joinPlayer, openStage, openTestRoom } from "../../server/scripted-rooms";
import { signedIn, startTestServer, type TestServer } from "./harness";

// 0.0003 h ≈ 1.1 s: a room with nothing recorded for that long ends (the sweep runs every ~0.27 s).
const IDLE_HOURS = "0.0003";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer({ ROOM_IDLE_HOURS: IDLE_HOURS });
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

const roomRow = async (id: string) => (await server.services.db.select().from(rooms).where(eq(rooms.id, id)))[0]!;

describe("rooms nobody uses end by themselves", () => {
  it("a round left on its reveal ends as idle, and keeps its answers, standings and results", async () => {
    const { db, env } = server.services;
    const room = await openTestRoom(db, { prompts: 3 });
    const stage = await openStage(server.url, env.SESSION_SECRET, room);
    const { pad, you } = await joinPlayer(server.url, room.code, "Wren");
    await answerFirstPrompt(stage, pad, room);
    const activeUntil = Date.now();

    // Nobody presses Next: the sweep ends the room, telling the stage and the pad as an "End" would.
    const ended = await stage.next("ended", () => true, 0, 10_000);
    expect(ended.reason).toBe("idle");
    expect(Date.now() - activeUntil).toBeGreaterThanOrEqual(1000);
    const final = await pad.next("standings", (m) => m.final);
    expect(final.points).toMatchObject([{ playerId: you.playerId, rank: 1 }]);
    expect((await pad.next("ended")).summaries).toMatchObject([{ playerId: you.playerId, correct: 1 }]);
    expect((await pad.waitClose()).code).toBe(CLOSE_CODES.roomGone);

    expect((await roomRow(room.id)).endedAt).not.toBeNull();
    expect(await db.select().from(answers).where(eq(answers.roomId, room.id))).toHaveLength(1);
    const results = await (await signedIn(server.url, "rafe@larkspur.example")).get(`/results/${room.id}`);
    expect(results.status).toBe(200);
    expect(await results.text()).toContain("Wren");
  }, 30_000);

  it("a room nobody ever joined ends too, with no socket open", async () => {
    const room = await openTestRoom(server.services.db);
    for (let i = 0; i < 50 && !(await roomRow(room.id)).endedAt; i++) await new Promise((r) => setTimeout(r, 200));
    expect((await roomRow(room.id)).endedAt).not.toBeNull();
  });

  it("a room in use is left alone", async () => {
    const { db, env } = server.services;
    const room = await openTestRoom(db);
    const stage = await openStage(server.url, env.SESSION_SECRET, room);
    // A join every half second is activity: after three idle spans the room is still open.
    for (let i = 0; i < 7; i++) {
      const { pad } = await joinPlayer(server.url, room.code, `Pupil ${i + 1}`);
      pad.close();
      await new Promise((r) => setTimeout(r, 500));
    }
    expect((await roomRow(room.id)).endedAt).toBeNull();
    expect(stage.messages.some((m) => m.type === "ended")).toBe(false);
    stage.close();
  }, 30_000);
});
