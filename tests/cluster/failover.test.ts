/**
 * Issue 17's fail-over: 5 classes of 10 pads play through nginx on three nodes; the node holding the
 * most rooms is killed (SIGKILL) while answers are on their way. Its rooms are taken by the other
 * nodes and rebuilt from their logs, the stages and pads come back by themselves with their seat
 * tokens, and every acknowledged answer is stored exactly once, scores intact.
 */
import { expect, it } from "vitest";
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
  sleep,
  teacherResumes,
  WAIT_MS,
} from "./harness";

const ctx = classesOnCluster(5, 10);

it("moves a killed node's rooms to the others, losing and doubling no acknowledged answer", async () => {
  const { t, classes } = ctx;
  const stopResuming = teacherResumes(classes);
  try {
    const { acks, owners } = await playFirstPrompt(t, classes);
    const counts = new Map<string, number>();
    for (const o of owners) counts.set(o!, (counts.get(o!) ?? 0) + 1);
    const victimId = [...counts.entries()].sort((a, b) => b[1] - a[1])[0]![0];
    const moved = classes.filter((_, i) => owners[i] === victimId);
    const stayed = classes.filter((_, i) => owners[i] !== victimId);

    // Prompt 2: half the pads answer, then the other half while the owner is killed under them.
    const ids = await Promise.all(classes.map((c) => nextPrompt(c, 1, lastPrompt(c, 0))));
    await Promise.all(classes.map((c, i) => answerAll(c, 1, ids[i]!, acks, c.pads.slice(0, 5))));
    const stageMessages = moved.map((c) => c.stage.messages.length);
    const answering = Promise.all(classes.map((c, i) => answerAll(c, 1, ids[i]!, acks, c.pads.slice(5))));
    await sleep(5);
    const killedAt = Date.now();
    nodeNamed(t, victimId).signal("SIGKILL");
    // Every moved stage is welcomed back by a new owner.
    await Promise.all(moved.map((c, i) => c.stage.next("welcome", () => true, stageMessages[i], WAIT_MS)));
    const backWithinMs = Date.now() - killedAt;
    await answering;

    await playOn(classes, 2, acks);

    const after = await Promise.all(classes.map((c) => ownerOf(t.db, c.room.id)));
    for (const c of moved) {
      expect(after[classes.indexOf(c)]).not.toBe(victimId);
      expect(c.stage.reconnects).toBeGreaterThanOrEqual(1);
      for (const p of c.pads) expect(p.pad.reconnects).toBeGreaterThanOrEqual(1);
    }
    // Rooms on the nodes that lived were not disturbed.
    for (const c of stayed) {
      expect(after[classes.indexOf(c)]).toBe(owners[classes.indexOf(c)]);
      expect(c.stage.reconnects).toBe(0);
    }
    // Within about 5 s (the lease's 3 s TTL, then the rebuild); a loaded test machine gets some slack.
    expect(backWithinMs).toBeLessThan(12_000);
    console.log(`fail-over: ${moved.length} of 5 rooms moved; their stages were back ${backWithinMs} ms after the kill`);

    await expectEverythingKept(t.db, classes, acks);
  } finally {
    stopResuming();
  }
});
