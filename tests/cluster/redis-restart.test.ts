/**
 * Redis restarted mid-round: the owners keep serving their rooms while it is away (the fence in the
 * database keeps their writes safe), set their leases again when it is back, and nothing is lost;
 * no socket is moved.
 */
import { Redis } from "ioredis";
import { expect, it } from "vitest";
import { LEASE_TTL_MS, leaseKey, parseLease } from "../../server/cluster/leases";
import {
  answerAll,
  classesOnCluster,
  expectEverythingKept,
  lastPrompt,
  nextPrompt,
  ownerOf,
  playFirstPrompt,
  playOn,
  sleep,
} from "./harness";

const ctx = classesOnCluster(3, 4);

/** Who Redis says holds each room, once every lease is there again (bounded). */
async function leaseHolders(roomIds: string[]) {
  const redis = new Redis(ctx.t.cluster.redis.url, { maxRetriesPerRequest: 1, lazyConnect: true });
  try {
    await redis.connect();
    const until = Date.now() + 3 * LEASE_TTL_MS;
    for (;;) {
      const holders = (await redis.mget(roomIds.map(leaseKey))).map((v) => parseLease(v)?.nodeId);
      if (holders.every(Boolean) || Date.now() > until) return holders;
      await sleep(200);
    }
  } finally {
    redis.disconnect();
  }
}

it("keeps every room playing on its owner while Redis restarts, and the leases come back", async () => {
  const { t, classes } = ctx;
  const roomIds = classes.map((c) => c.room.id);
  const { acks, owners } = await playFirstPrompt(t, classes);
  expect(await leaseHolders(roomIds)).toEqual(owners);

  const ids = await Promise.all(classes.map((c) => nextPrompt(c, 1, lastPrompt(c, 0))));
  await Promise.all(classes.map((c, i) => answerAll(c, 1, ids[i]!, acks, c.pads.slice(0, 2))));
  await t.cluster.redis.stop();
  // Redis away for longer than a lease lives: the rooms play on.
  await Promise.all(classes.map((c, i) => answerAll(c, 1, ids[i]!, acks, c.pads.slice(2))));
  await sleep(LEASE_TTL_MS);
  await t.cluster.redis.start();

  // The restarted Redis kept nothing: each owner sets its lease again, with the fence it holds.
  expect(await leaseHolders(roomIds)).toEqual(owners);
  await playOn(classes, 2, acks);

  expect(await Promise.all(roomIds.map((id) => ownerOf(t.db, id)))).toEqual(owners);
  for (const c of classes) for (const s of [c.stage, ...c.pads.map((p) => p.pad)]) expect(s.reconnects).toBe(0);
  await expectEverythingKept(t.db, classes, acks);
});
