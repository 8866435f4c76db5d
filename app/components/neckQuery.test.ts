import { describe, expect, it } from "vitest";
import {
  apiAnswer,
  EXPLORER_DEFAULTS,
  noteOnNeck,
  parseExplorerQuery,
  parseSpotMapQuery,
  parseSpotsQuery,
} from "./neckQuery";

const q = (s: string) => new URLSearchParams(s);

describe("parseSpotsQuery", () => {
  it("reads the documented example", () => {
    const parsed = parseSpotsQuery(q("note=E5&tuning=standard&frets=15&reading=guitar"));
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
    // Written E5 on guitar sounds E4, MIDI 64, 329.63 Hz (MIDI 1.0 numbering; 12-TET with A4 = 440 Hz).
    expect(noteOnNeck(parsed.data)).toEqual({
      written: "E5",
      sounding: "E4",
      midi: 64,
      frequency: 329.63,
      tuning: "standard",
      frets: 15,
      reading: "guitar",
      // Standard tuning: E4 is the open first string, B string fret 5, G fret 9, D fret 14 (common practice, no source).
      spots: [
        { string: 1, fret: 0 },
        { string: 2, fret: 5 },
        { string: 3, fret: 9 },
        { string: 4, fret: 14 },
      ],
    });
  });

  it("defaults tuning, frets and reading, and keeps the written spelling", () => {
    const parsed = parseSpotsQuery(q("note=Db4"));
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
    expect(parsed.data.frets).toBe(24);
    const answer = noteOnNeck(parsed.data);
    expect(answer).toMatchObject({ written: "Db4", sounding: "Db3", midi: 49, reading: "guitar", tuning: "standard" });
  });

  it("reads concert pitch as written", () => {
    const parsed = parseSpotsQuery(q("note=A4&reading=concert"));
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
    expect(noteOnNeck(parsed.data)).toMatchObject({ sounding: "A4", midi: 69, frequency: 440 });
  });

  it.each([
    ["", "note"],
    ["note=H4", "note"],
    ["note=E5&tuning=banjo", "tuning"],
    ["note=E5&frets=30", "frets"],
    ["note=E5&frets=11", "frets"],
    ["note=E5&frets=twelve", "frets"],
    ["note=E5&reading=piano", "reading"],
  ])("refuses %j with a message on %s", (query, field) => {
    const parsed = parseSpotsQuery(q(query));
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.errors[field]).toMatch(/\w/);
  });
});

describe("parseSpotMapQuery", () => {
  it("builds the position's home-spot map", () => {
    const parsed = parseSpotMapQuery(q("position=5&tuning=standard"));
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
    expect(parsed.data.map.position).toBe(5);
    // Fifth position, standard tuning: written A3 (sounding A2) is the low E string at fret 5.
    expect(parsed.data.map.spots[1]).toMatchObject({ written: "A3", string: 6, fret: 5 });
  });
  it.each(["", "position=0", "position=21", "position=five", "position=5&tuning=E2"])("refuses %j", (query) => {
    const parsed = parseSpotMapQuery(q(query));
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(Object.values(parsed.errors).join(" ")).toMatch(/\w/);
  });
  it("refuses a position that runs off the neck, naming the position", () => {
    const parsed = parseSpotMapQuery(q("position=12&frets=15"));
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.errors.position).toMatch(/fret 16/);
  });
});

describe("parseExplorerQuery", () => {
  it("fills every gap with the defaults", () => {
    const parsed = parseExplorerQuery(q(""));
    expect(parsed.values).toEqual(EXPLORER_DEFAULTS);
    expect(parsed.ok).toBe(true);
  });
  it("keeps the raw values for the form and reports each bad one", () => {
    const parsed = parseExplorerQuery(q("note=Q9&key=H-major&frets=19&position=17"));
    expect(parsed.values.note).toBe("Q9");
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) {
      expect(Object.keys(parsed.errors).sort()).toEqual(["key", "note"]);
    }
  });
  it("refuses a position beyond the chosen neck", () => {
    const parsed = parseExplorerQuery(q("frets=19&position=17"));
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.errors.position).toMatch(/19 frets/);
  });
});

describe("apiAnswer", () => {
  it("answers 400 with one readable error", async () => {
    const res = apiAnswer(parseSpotsQuery(q("note=E5&frets=30&tuning=banjo")), () => ({}));
    expect(res.status).toBe(400);
    const body = (await res.json()) as { error: string };
    expect(body.error).toMatch(/^tuning: .*frets: /s);
  });
  it("lets caches keep good answers", () => {
    const res = apiAnswer({ ok: true, data: 1 }, (n) => ({ n }));
    expect(res.status).toBe(200);
    expect(res.headers.get("Cache-Control")).toMatch(/public, max-age=\d+/);
  });
});
