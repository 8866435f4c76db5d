/**
 * Fencing: a node paused (SIGSTOP) until its leases lapse, its rooms taken meanwhile by another
 * node, then resumed (SIGCONT): the answers its pads sent it while it slept are never stored by it
 * nor acknowledged by it, its sockets are closed with 1012 (service restart) and come back through
 * nginx to the new owner, where every answer is stored exactly once.
 */
import { expect, it } from "vitest";
import { LEASE_TTL_MS } from "../../server/cluster/leases";
import { CLOSE_SERVICE_RESTART } from "../../server/live-room";
import { openStage } from "../../server/scripted-rooms";
import {
  answerAll,
  classesOnCluster,
  expectEverythingKept,
  lastPrompt,
  nextPrompt,
  nodeNamed,
  ownerOf,
  playFirstPrompt,
  playOn,
  SECRET,
  sleep,
  teacherResumes,
} from "./harness";

const ctx = classesOnCluster(3, 4);

it("a paused node that lost its leases writes nothing for those rooms and sends their sockets to the new owner", async () => {
  const { t, classes } = ctx;
  const stopResuming = teacherResumes(classes);
  try {
    const { acks, owners } = await playFirstPrompt(t, classes);
    const pausedId = owners[0]!;
    const paused = nodeNamed(t, pausedId);
    const taker = t.cluster.nodes.find((n) => n.nodeId !== pausedId)!;
    const fenced = classes.filter((_, i) => owners[i] === pausedId);
    const ids = await Promise.all(classes.map((c) => nextPrompt(c, 1, lastPrompt(c, 0))));

    // One pad of each class answers first: its ack follows the commit of everything before it,
    // the step that opened the prompt included (a step itself does not wait for its commit).
    await Promise.all(classes.map((c, i) => answerAll(c, 1, ids[i]!, acks, c.pads.slice(0, 1))));
    paused.signal("SIGSTOP");
    // The other pads of the paused node's rooms answer into its frozen sockets (and keep trying, as real pads do).
    const answering = Promise.all(classes.map((c, i) => answerAll(c, 1, ids[i]!, acks, c.pads.slice(1))));
    await sleep(500);
    // Meanwhile another node is asked for each of those rooms: it waits out the lease and takes the room.
    for (const c of fenced) (await openStage(`http://${taker.address}`, SECRET, c.room)).close();
    for (const c of fenced) expect(await ownerOf(t.db, c.room.id)).toBe(taker.nodeId);
    await sleep(LEASE_TTL_MS);
    paused.signal("SIGCONT");
    await answering;

    for (const c of fenced) {
      for (const s of [c.stage, ...c.pads.map((p) => p.pad)]) {
        expect(s.closes, "told to reconnect").toContain(CLOSE_SERVICE_RESTART);
        expect(s.reconnects).toBeGreaterThanOrEqual(1);
      }
      // Acknowledged only after the pad came back, by the new owner.
      for (const p of c.pads.slice(1)) {
        const ack = p.pad.messages.findLastIndex((m) => m.type === "answer-ack" && m.promptId === ids[classes.indexOf(c)] && m.accepted);
        const backAt = p.pad.messages.findLastIndex((m) => m.type === "welcome");
        expect(ack).toBeGreaterThan(backAt);
      }
    }

    await playOn(classes, 2, acks);
    await expectEverythingKept(t.db, classes, acks);
  } finally {
    stopResuming();
  }
});
