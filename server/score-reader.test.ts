import { strToU8 } from "fflate";
import { afterEach, describe, expect, it } from "vitest";
import { hugeLegalScore } from "../tests/fixtures/hostile-scores";
import { SCORE_READER_LIMITS, ScoreReader } from "./score-reader";

const SMALL = `<score-partwise version="4.0"><part-list><score-part id="P1"><part-name>Guitar</part-name></score-part></part-list>
<part id="P1"><measure number="1"><attributes><divisions>1</divisions></attributes>
<note><pitch><step>G</step><octave>4</octave></pitch><duration>4</duration></note></measure></part></score-partwise>`;

let reader: ScoreReader;
afterEach(() => reader.close());

describe("the score reader thread", () => {
  it("reads a score, and passes the parser's refusal on as words", async () => {
    reader = new ScoreReader();
    const read = await reader.read(strToU8(SMALL));
    expect(read.ok && read.score.notes.map((n) => n.written)).toEqual(["G4"]);
    expect(await reader.read(strToU8("<score-partwise><part"))).toMatchObject({ ok: false, error: expect.stringMatching(/not well-formed XML \(line 1\)/) });
  });

  it("stops a read that runs past the time limit, and the next upload gets a fresh thread", async () => {
    reader = new ScoreReader({ ...SCORE_READER_LIMITS, timeMs: 200 });
    const started = Date.now();
    expect(await reader.read(strToU8(hugeLegalScore()))).toEqual({ ok: false, error: expect.stringMatching(/took longer than 0.2 s, so it was stopped/) });
    expect(Date.now() - started).toBeLessThan(10_000);
    expect((await reader.read(strToU8(SMALL))).ok).toBe(true);
  });

  it("refuses at once when too many uploads are waiting, and reads the rest in turn", async () => {
    reader = new ScoreReader({ ...SCORE_READER_LIMITS, waiting: 2 });
    const reads = [1, 2, 3].map(() => reader.read(strToU8(SMALL)));
    expect(await reads[2]).toEqual({ ok: false, error: expect.stringMatching(/Several scores are being read/) });
    expect((await Promise.all(reads.slice(0, 2))).map((r) => r.ok)).toEqual([true, true]);
  });

  it("refuses new uploads once closing", async () => {
    reader = new ScoreReader();
    await reader.close();
    expect(await reader.read(strToU8(SMALL))).toMatchObject({ ok: false, error: expect.stringMatching(/restarting/) });
  });
});
