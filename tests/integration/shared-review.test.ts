// Two nodes of one cluster (one database, one Redis): a round is played on node A, and the
// teacher's live class review, served by node B, follows it through the round news.
import { eq } from "drizzle-orm";
import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { rooms } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { freePort, startRedisServer, type RedisServer } from "../../server/cluster/redis-server";
import { answerFirstPrompt, joinPlayer, openStage, openTestRoom } from "../../server/scripted-rooms";
import { seedDemo } from "../../server/seed";
import { Client, readUntil, startTestServer, type TestServer } from "./harness";

let redis: RedisServer;
let a: TestServer;
let b: TestServer;
const secret = randomBytes(24).toString("hex");

beforeAll(async () => {
  redis = await startRedisServer();
  // Nodes share the database (this file's), Redis and the secret that signs host keys and seats.
  const cluster = { REDIS_URL: redis.url, SESSION_SECRET: secret };
  const node = async (id: string) => {
    const port = String(await freePort());
    return startTestServer({ ...cluster, NODE_ID: id, PORT: port, NODE_ADDRESS: `127.0.0.1:${port}` });
  };
  a = await node("node-a");
  b = await node("node-b");
  await seedDemo(a.services.db);
});
afterAll(async () => {
  await Promise.all([a?.close(), b?.close()]);
  await redis?.stop();
});

describe("live class review across nodes", () => {
  it("hears on node B of an answer stored on node A, and shows it", async () => {
    const room = await openTestRoom(a.services.db);
    await a.services.db.update(rooms).set({ classId: "demo-class-tue" }).where(eq(rooms.id, room.id));
    const teacher = new Client(b.url);
    expect((await teacher.post("/signin", { email: DEMO_SCHOOL.teachers[0].email, password: DEMO_PASSWORD })).status).toBe(302);
    const res = await teacher.get(`/teach/classes/demo-class-tue/review/live?round=${room.id}`);
    expect(res.status).toBe(200);
    expect(await readUntil(res.body!, /data: 0\n\n/)).toContain("event: answers\ndata: 0\n\n");

    let heardOnB = 0;
    const stop = b.services.rounds.listen(room.id, () => heardOnB++);
    const stage = await openStage(a.url, secret, room);
    const { pad } = await joinPlayer(a.url, room.code, "Pia");
    await answerFirstPrompt(stage, pad, room);
    // Node A stored and acknowledged the answer; node B hears of it through Redis.
    await expect.poll(() => heardOnB, { timeout: 3_000 }).toBeGreaterThan(0);
    expect(await readUntil(res.body!, /data: 1\n\n/)).toContain("event: answers\ndata: 1\n\n");

    stage.send({ type: "host", action: "end" });
    expect(await readUntil(res.body!, /event: ended\ndata: \w+\n\n/)).toContain("event: ended\ndata: ended\n\n");
    stop();
    stage.close();
    pad.close();
  });
});
