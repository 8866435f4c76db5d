import { describe, expect, it } from "vitest";
import { seededRandom } from "~/music/pools";
import {
  CLOCK_KEEP,
  CLOCK_WINDOW,
  MAX_LEAD_MS,
  MIN_LEAD_MS,
  addSample,
  emptyClock,
  estimate,
  leadFor,
  reactionTime,
  recordPong,
  reportPong,
  sampleDelay,
  sampleOffset,
  scheduleShowAt,
  tapServerTime,
  type ClockEstimate,
  type ClockSample,
  type ClockState,
} from "./clock";

const withSamples = (samples: ClockSample[]): ClockState => samples.reduce(addSample, emptyClock());
const est = (offsetMs: number, worstDelayMs: number): ClockEstimate => ({ offsetMs, bestDelayMs: worstDelayMs, worstDelayMs, samples: 8 });

describe("one sample", () => {
  it.each<[ClockSample, number, number]>([
    // pad clock 1000 ms behind the server, 50 ms each way, 2 ms in the server
    [{ t0: 0, t1: 1050, t2: 1052, t3: 102 }, 1000, 100],
    // symmetric 0 offset
    [{ t0: 500, t1: 520, t2: 520, t3: 540 }, 0, 40],
    // asymmetric legs (10 up, 90 down) bias the offset by half the difference
    [{ t0: 0, t1: 10, t2: 10, t3: 100 }, -40, 100],
  ])("%j → offset %d, delay %d", (s, offset, delay) => {
    expect(sampleOffset(s)).toBe(offset);
    expect(sampleDelay(s)).toBe(delay);
  });
});

describe("estimate", () => {
  it("is null without samples", () => {
    expect(estimate(emptyClock())).toBeNull();
  });

  it("intersects the intervals of the kept samples", () => {
    // true offset 1000; the first sample has a slow uplink, the second a slow downlink
    const e = estimate(withSamples([
      { t0: 0, t1: 1080, t2: 1080, t3: 100 }, // proves 980 ≤ θ ≤ 1080
      { t0: 200, t1: 1220, t2: 1220, t3: 300 }, // proves 920 ≤ θ ≤ 1020
    ]));
    expect(e).toEqual({ offsetMs: 1000, bestDelayMs: 100, worstDelayMs: 100, samples: 2 });
  });

  it("ignores high-delay samples beyond the kept ones", () => {
    const good = Array.from({ length: CLOCK_KEEP }, (_, i) => ({ t0: i * 1000, t1: i * 1000 + 520, t2: i * 1000 + 520, t3: i * 1000 + 40 }));
    const spike = { t0: 99_000, t1: 99_900, t2: 99_900, t3: 99_400 }; // 400 ms round trip, offset 700
    const e = estimate(withSamples([...good, spike]))!;
    expect(e.offsetMs).toBe(500);
    expect(e.worstDelayMs).toBe(40);
  });

  it("falls back to the lowest-delay sample when the intervals do not meet (pad clock stepped)", () => {
    const e = estimate(withSamples([
      { t0: 0, t1: 520, t2: 520, t3: 50 }, // θ in [470, 520], delay 50
      { t0: 1000, t1: 3530, t2: 3530, t3: 1060 }, // θ in [2470, 2530], delay 60
    ]))!;
    expect(e.offsetMs).toBe(495);
  });

  it("keeps only the last CLOCK_WINDOW samples", () => {
    const old = { t0: 0, t1: 100, t2: 100, t3: 0 }; // zero delay, offset 100: would win if kept
    const recent = Array.from({ length: CLOCK_WINDOW }, (_, i) => ({ t0: i, t1: i + 210, t2: i + 210, t3: i + 20 }));
    expect(estimate(withSamples([old, ...recent]))!.offsetMs).toBe(200);
  });

  it.each<[string, ClockSample]>([
    ["negative round trip", { t0: 0, t1: 10, t2: 10, t3: -5 }],
    ["server time running backwards", { t0: 0, t1: 10, t2: 5, t3: 30 }],
  ])("drops an impossible sample: %s", (_, s) => {
    expect(addSample(emptyClock(), s).samples).toEqual([]);
  });
});

describe("recordPong / reportPong (server side)", () => {
  it("forms a sample only from a pong the server sent", () => {
    let c = recordPong(emptyClock(), { t0: 10, t1: 1060, t2: 1061 });
    c = reportPong(c, 99, 200); // never sent
    expect(c.samples).toEqual([]);
    c = reportPong(c, 10, 111);
    expect(c.samples).toEqual([{ t0: 10, t1: 1060, t2: 1061, t3: 111 }]);
    expect(c.pending).toEqual([]);
    expect(reportPong(c, 10, 111)).toBe(c); // a replayed report adds nothing
  });
});

describe("tapServerTime", () => {
  it.each<[string, ClockEstimate | null, number, number, number]>([
    ["converts with the offset", est(1000, 100), 4_000, 5_060, 5_000],
    ["cannot be later than receipt", est(1000, 100), 4_500, 5_060, 5_060],
    ["cannot be earlier than receipt − (worst round trip + 50)", est(1000, 100), 2_000, 5_060, 4_910],
    ["uplink allowance is capped at 1 s", est(0, 5_000), 0, 10_000, 9_000],
    ["without clock sync the receive time is used", null, 1, 5_060, 5_060],
  ])("%s", (_, e, tap, received, expected) => {
    expect(tapServerTime(e, tap, received)).toBe(expected);
  });
});

describe("reactionTime", () => {
  it.each([
    [10_500, 10_000, 8_000, 500],
    [9_990, 10_000, 8_000, 0],
    [19_000, 10_000, 8_000, 8_000],
  ])("tap %i, shown %i, limit %i → %i", (tap, showAt, limit, r) => {
    expect(reactionTime(tap, showAt, limit)).toBe(r);
  });
});

describe("leadFor / scheduleShowAt", () => {
  it.each<[string, (ClockEstimate | null)[], number]>([
    ["nobody yet", [], MIN_LEAD_MS],
    ["fast network", [est(0, 40), est(0, 60)], MIN_LEAD_MS],
    ["worst pad decides", [est(0, 40), est(0, 700)], 450],
    ["an unsynced pad counts as 250 ms one-way", [est(0, 40), null], 350],
    ["bounded", [est(0, 9_000)], MAX_LEAD_MS],
  ])("%s", (_, estimates, lead) => {
    expect(leadFor(estimates)).toBe(lead);
  });

  it.each([
    [1_000, 400, 0, 1_400],
    [1_000, 400, 3_000, 4_000],
    [1_000, 50, 0, 1_300], // lead below the minimum is raised
  ])("now %i, lead %i, countdown %i → %i", (now, lead, countdown, showAt) => {
    expect(scheduleShowAt(now, lead, countdown)).toBe(showAt);
  });
});

/**
 * Simulated classroom: 30 pads, each with its own clock (±10 min off, ±20 ppm drift); every
 * network leg takes 75 ms ± 40 ms (uniform), so round trips are 150 ms ± 80 ms. Pads ping 8 times
 * on joining and every 2 s after, as docs/protocol.md asks; 20 prompts, one every 8 s.
 */
function simulateReactionErrors(seed: number): number[] {
  const rand = seededRandom(seed);
  const leg = () => 75 + (rand() * 2 - 1) * 40;
  const errors: number[] = [];
  for (let pad = 0; pad < 30; pad++) {
    const offset = (rand() * 2 - 1) * 600_000;
    const drift = (rand() * 2 - 1) * 20e-6;
    const padTime = (serverTime: number) => serverTime - offset + serverTime * drift;
    const pingTimes = [...Array.from({ length: 8 }, (_, i) => i * 250), ...Array.from({ length: 90 }, (_, i) => 2_000 + i * 2_000)];
    let clock = emptyClock();
    const promptTimes = Array.from({ length: 20 }, (_, i) => 5_000 + i * 8_000);
    const events = [
      ...pingTimes.map((at) => ({ at, kind: "ping" as const })),
      ...promptTimes.map((at) => ({ at, kind: "tap" as const })),
    ].sort((a, b) => a.at - b.at);
    for (const event of events) {
      if (event.kind === "ping") {
        const t1 = event.at + leg();
        const t2 = t1 + rand() * 2;
        const t3 = padTime(t2 + leg());
        clock = reportPong(recordPong(clock, { t0: padTime(event.at), t1, t2 }), padTime(event.at), t3);
      } else {
        const showAt = event.at;
        const trueReaction = 300 + rand() * 5_700;
        const tap = showAt + trueReaction;
        const received = tap + leg();
        const measured = reactionTime(tapServerTime(estimate(clock), padTime(tap), received), showAt, 8_000);
        errors.push(Math.abs(measured - trueReaction));
      }
    }
  }
  return errors;
}

describe("clock sync under simulated latency and jitter", () => {
  it.each([1, 2, 3])("seed %i: ≥ 95 % of reaction times are within 10 ms of the truth", (seed) => {
    const errors = simulateReactionErrors(seed);
    const within = errors.filter((e) => e <= 10).length / errors.length;
    expect(errors).toHaveLength(600);
    expect(within).toBeGreaterThanOrEqual(0.95);
  });
});
