import { describe, expect, it } from "vitest";
import { seededRandom } from "~/music/pools";
import {
  allSteady,
  chooseNext,
  nextBox,
  notesInPlay,
  noteName,
  noteStates,
  outcomeOf,
  QUICK_MS,
  type OrderedNote,
  type PracticeAnswer,
} from "./adaptive";

// A small pool in progression order: the third space up to just above the top line (written MIDI).
const C5 = { written: "C5", writtenMidi: 72 };
const D5 = { written: "D5", writtenMidi: 74 };
const E5 = { written: "E5", writtenMidi: 76 };
const F5 = { written: "F5", writtenMidi: 77 };
const G5 = { written: "G5", writtenMidi: 79 };
const ORDER: OrderedNote[] = [C5, D5, E5, F5, G5];

// "Today" starts at midnight; answers are minutes after 09:00 that day (negative minutes reach back to yesterday).
const DAY = Date.UTC(2026, 2, 10);
const at = (minute: number) => DAY + 9 * 3600_000 + minute * 60_000;
const quick = (n: { writtenMidi: number }, minute: number): PracticeAnswer => ({ writtenMidi: n.writtenMidi, kind: "home-spot", reactionMs: 1200, at: at(minute) });
const slow = (n: { writtenMidi: number }, minute: number): PracticeAnswer => ({ writtenMidi: n.writtenMidi, kind: "home-spot", reactionMs: 4500, at: at(minute) });
const as = (kind: string) => (n: { writtenMidi: number }, minute: number): PracticeAnswer => ({ writtenMidi: n.writtenMidi, kind, reactionMs: 1500, at: at(minute) });
const miss = as("half-step-off");
const otherSpot = as("other-spot");
const fixed = (r: number) => () => r;
const boxes = (history: PracticeAnswer[]) => Object.fromEntries([...noteStates(history, DAY)].map(([midi, s]) => [midi, s.box]));

describe("boxes", () => {
  it.each([
    // [box before, outcome, box after]
    [0, "quick-home", 1],
    [3, "quick-home", 4],
    [4, "quick-home", 4], // the top box holds
    [3, "slow-home", 2],
    [2, "other-spot", 1],
    [0, "other-spot", 0], // the bottom box holds
    [4, "miss", 0], // one wrong pitch sends a steady note back to the start
  ] as const)("box %i after %s → %i", (before, outcome, after) => {
    expect(nextBox(before, outcome)).toBe(after);
  });

  it("a home spot in exactly 3 s is quick, one millisecond more is slow; every wrong pitch is a miss", () => {
    expect(outcomeOf({ kind: "home-spot", reactionMs: QUICK_MS })).toBe("quick-home");
    expect(outcomeOf({ kind: "home-spot", reactionMs: QUICK_MS + 1 })).toBe("slow-home");
    expect(outcomeOf({ kind: "other-spot", reactionMs: 500 })).toBe("other-spot");
    for (const kind of ["octave-off", "key-signature-miss", "accidental-miss", "half-step-off", "string-over", "wide-miss"]) {
      expect(outcomeOf({ kind, reactionMs: 500 })).toBe("miss");
    }
  });

  it("replays the history in time order, whatever order the rows come in", () => {
    // C5: quick (box 1), quick (2), miss (0), quick (1). Given newest first, it must still end in box 1.
    const history = [quick(C5, 4), miss(C5, 3), quick(C5, 2), quick(C5, 1)];
    expect(boxes(history)).toEqual({ 72: 1 });
  });

  it("enharmonic spellings share a box: F♯4 and G♭4 are one home spot", () => {
    const history = [quick({ writtenMidi: 66 }, 1), quick({ writtenMidi: 66 }, 2)];
    expect(boxes(history)).toEqual({ 66: 2 });
  });
});

describe("which notes are in play", () => {
  it("starts with the first three notes in progression order", () => {
    expect(notesInPlay(ORDER, new Map()).joining).toEqual([C5, D5, E5]);
  });

  it("lets the next note in order join once every active note is steady (box 2 or more), one at a time", () => {
    // C5 box 2, D5 box 3, E5 box 2: all steady, so F5 joins (and G5 waits for F5).
    const history = [quick(C5, 1), quick(C5, 2), quick(D5, 3), quick(D5, 4), quick(D5, 5), quick(E5, 6), quick(E5, 7)];
    expect(notesInPlay(ORDER, noteStates(history, DAY))).toMatchObject({ joining: [F5], joinReason: "steady" });
  });

  it("keeps new notes out while any active note is not steady", () => {
    // E5 has had one quick home spot only: box 1, so F5 must wait.
    const history = [quick(C5, 1), quick(C5, 2), quick(D5, 3), quick(D5, 4), quick(E5, 5)];
    expect(notesInPlay(ORDER, noteStates(history, DAY)).joining).toEqual([]);
  });

  it("counts notes met elsewhere (a live round) as active, whatever their place in the order", () => {
    // G5 was answered in class; only two more notes join to make three.
    const inPlay = notesInPlay(ORDER, noteStates([miss(G5, 1)], DAY));
    expect(inPlay.active).toEqual([G5]);
    expect(inPlay.joining).toEqual([C5, D5]);
  });
});

describe("the next note, against worked histories", () => {
  it("with no history, the first note of the set, and says so", () => {
    const choice = chooseNext(ORDER, new Map(), { random: fixed(0.9) });
    expect(choice.note).toEqual(C5);
    expect(choice.reason).toBe("C (third space) is one of your first notes here. Find its home spot.");
  });

  it("after the first answer, the next joining note rather than a repeat", () => {
    // C5 answered once; D5 and E5 are still to join, so D5 comes next whatever the draw.
    const choice = chooseNext(ORDER, noteStates([quick(C5, 1)], DAY), { previous: 72, random: fixed(0) });
    expect(choice.note).toEqual(D5);
  });

  it("a note missed twice today comes back, and the reason says so", () => {
    // C5: quick, quick → box 2. D5: quick ×3 → box 3. E5: quick (1), then two misses today → box 0.
    // D5 was just asked, so the list is E5 (box 0, weight 2^4 = 16) then C5 (box 2, weight 2^2 = 4): total 20.
    // random 0.5 → 0.5 × 20 = 10; 10 − 16 < 0 → E5.
    const history = [quick(C5, 1), quick(C5, 2), quick(D5, 3), quick(D5, 4), quick(E5, 5), miss(E5, 6), miss(E5, 7), quick(D5, 8)];
    const choice = chooseNext(ORDER, noteStates(history, DAY), { previous: 74, random: fixed(0.5) });
    expect(choice.candidates).toEqual([
      { writtenMidi: 76, box: 0, weight: 16 },
      { writtenMidi: 72, box: 2, weight: 4 },
    ]);
    expect(choice.note).toEqual(E5);
    expect(choice.reason).toBe("E (top space) keeps coming back: you missed it twice today.");
  });

  it("a steady note still comes back now and then for review", () => {
    // Same history and list as above; random 0.85 → 0.85 × 20 = 17; 17 − 16 = 1 ≥ 0; 1 − 4 < 0 → C5 (box 2).
    const history = [quick(C5, 1), quick(C5, 2), quick(D5, 3), quick(D5, 4), quick(E5, 5), miss(E5, 6), miss(E5, 7), quick(D5, 8)];
    const choice = chooseNext(ORDER, noteStates(history, DAY), { previous: 74, random: fixed(0.85) });
    expect(choice.note).toEqual(C5);
    expect(choice.reason).toBe("C (third space) is steady (box 2 of 4); a quick review keeps it that way.");
  });

  it("misses from yesterday do not count as today's", () => {
    // E5 was missed twice yesterday (minutes −900 and −899 are 18:00 the day before) and once today.
    // It is still box 0, but today has one miss only: the reason names the last answer instead.
    const history = [quick(C5, 1), quick(D5, 2), miss(E5, -900), miss(E5, -899), miss(E5, 3)];
    const choice = chooseNext(ORDER, noteStates(history, DAY), { previous: 74, random: fixed(0) });
    expect(choice.note).toEqual(E5);
    expect(choice.reason).toBe("E (top space) keeps coming back: you missed it last time.");
  });

  it("never repeats the note just asked, even when it is the weakest", () => {
    // E5 is the only box-0 note, but it was just asked: the list is C5 and D5 (both box 1, weights 8 and 8).
    // Ties in the box go to the least recently asked: C5 (minute 1) before D5 (minute 2). random 0 → C5.
    const history = [quick(C5, 1), quick(D5, 2), miss(E5, 3)];
    const choice = chooseNext(ORDER, noteStates(history, DAY), { previous: 76, random: fixed(0) });
    expect(choice.candidates.map((c) => c.writtenMidi)).toEqual([72, 74]);
    expect(choice.note).toEqual(C5);
    expect(choice.reason).toBe("C (third space) is climbing (box 1 of 4): quick home spots make it steady.");
  });

  it("a new note joins as soon as the others are steady, and is asked first", () => {
    // C5 box 2, D5 box 3, E5 box 2: all steady, so F5 joins and is asked now, whatever the draw.
    const history = [quick(C5, 1), quick(C5, 2), quick(D5, 3), quick(D5, 4), quick(D5, 5), quick(E5, 6), quick(E5, 7)];
    const choice = chooseNext(ORDER, noteStates(history, DAY), { previous: 76, random: fixed(0.99) });
    expect(choice.note).toEqual(F5);
    expect(choice.reason).toBe("New note: F (top line). Your other 3 notes are steady (box 2 or higher), so it joins now.");
  });

  it("a slow home spot and another spot each cost a box, and the reason says what to do", () => {
    // C5: quick ×3 → box 3, then slow → box 2. D5: quick → 1, other spot → 0. E5: quick → 1.
    // Just asked E5, so the list is D5 (box 0, 16) then C5 (box 2, 4): random 0 → D5; 0.9 × 20 = 18 → C5.
    const history = [quick(C5, 1), quick(C5, 2), quick(C5, 3), slow(C5, 4), quick(D5, 5), otherSpot(D5, 6), quick(E5, 7)];
    const states = noteStates(history, DAY);
    expect(chooseNext(ORDER, states, { previous: 76, random: fixed(0) }).reason).toBe(
      "D (fourth line) again: last time you played it at another spot. Look for its home spot.",
    );
    expect(chooseNext(ORDER, states, { previous: 76, random: fixed(0.9) }).reason).toBe(
      "C (third space) again: you found its home spot, but it took over 3 seconds. Aim for quicker.",
    );
  });

  it("a pool of one note asks it again rather than stall", () => {
    expect(chooseNext([C5], noteStates([quick(C5, 1)], DAY), { previous: 72, random: fixed(0.3) }).note).toEqual(C5);
  });
});

describe("a whole session, seeded", () => {
  /** A student who answers every note quickly at its home spot. */
  function session(seed: number, count: number) {
    const random = seededRandom(seed);
    const history: PracticeAnswer[] = [];
    const asked: number[] = [];
    for (let i = 0; i < count; i++) {
      const choice = chooseNext(ORDER, noteStates(history, DAY), { previous: asked.at(-1), random });
      asked.push(choice.note.writtenMidi);
      history.push(quick(choice.note, i));
    }
    return { asked, states: noteStates(history, DAY) };
  }

  it("is the same for the same seed, never repeats a note at once, and brings notes in by the progression order", () => {
    const a = session(42, 30);
    expect(session(42, 30).asked).toEqual(a.asked);
    a.asked.forEach((midi, i) => i > 0 && expect(midi).not.toBe(a.asked[i - 1]));
    const firstSeen = [...new Set(a.asked)];
    expect(firstSeen).toEqual(ORDER.map((n) => n.writtenMidi));
    // All quick: after 30 answers every note of the pool is steady, which is what unlocks a rhythm pass.
    expect(allSteady(ORDER, a.states)).toBe(true);
  });
});

describe("names", () => {
  it("names a note by letter, sign and place on the staff", () => {
    expect(noteName("F#5")).toBe("F♯ (top line)");
    expect(noteName("A3")).toBe("A (second ledger line below)");
  });
});
