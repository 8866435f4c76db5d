import { describe, expect, it } from "vitest";
import { spotSounding, soundingMidi } from "./fretboard";
import { MusicError } from "./pitch";
import { defaultSpotMap, homeSpotFor, positionWindow, validateSpotMap, type SpotMap } from "./positions";
import { resolveTuning, TUNINGS } from "./tuning";

const standard = TUNINGS.standard;
const TUNING_IDS = [...Object.keys(TUNINGS), "C2 G2 D3 G3 B3 E4"];
const at = (map: SpotMap, written: string) => {
  const s = map.spots.find((h) => h.written === written);
  return s && { string: s.string, fret: s.fret };
};
const codes = (map: SpotMap, tuning = standard) => validateSpotMap(map, tuning).map((p) => p.code);
const edited = (map: SpotMap, edit: (spots: SpotMap["spots"]) => SpotMap["spots"]): SpotMap => ({
  ...map,
  spots: edit(map.spots.map((s) => ({ ...s }))),
});

describe("positionWindow", () => {
  it.each([
    [1, { position: 1, first: 1, last: 4, stretchLow: 0, stretchHigh: 5 }],
    [5, { position: 5, first: 5, last: 8, stretchLow: 4, stretchHigh: 9 }],
    [20, { position: 20, first: 20, last: 23, stretchLow: 19, stretchHigh: 24 }],
  ])("position %i", (n, w) => expect(positionWindow(n)).toEqual(w));

  it.each([0, 21, 2.5])("rejects %d", (n) => expect(() => positionWindow(n)).toThrow(/Position must be a whole number from 1 to 20/));
});

describe("defaultSpotMap", () => {
  it("first position in standard tuning uses open strings and the 4th-finger reach to A5", () => {
    const map = defaultSpotMap(1, standard);
    expect(map.spots[0]).toEqual({ string: 6, fret: 0, writtenMidi: 52, written: "E3" });
    expect(map.spots.at(-1)).toEqual({ string: 1, fret: 5, writtenMidi: 81, written: "A5" });
    expect(at(map, "A3")).toEqual({ string: 5, fret: 0 }); // open string beats the stretch to fret 5 on string 6
    expect(at(map, "B4")).toEqual({ string: 2, fret: 0 }); // tie with string 3, fret 4 → higher-pitched string
    expect(at(map, "E5")).toEqual({ string: 1, fret: 0 });
    expect(map.spots).toHaveLength(30);
  });

  it("fifth position in standard tuning stays in frets 5–8 and stretches only between strings a fourth apart", () => {
    const map = defaultSpotMap(5, standard, { frets: 19 });
    expect(at(map, "A3")).toEqual({ string: 6, fret: 5 });
    expect(at(map, "C#4")).toEqual({ string: 5, fret: 4 }); // tie with string 6, fret 9 → index reaches back
    expect(at(map, "B4")).toEqual({ string: 3, fret: 4 });
    expect(at(map, "C5")).toEqual({ string: 3, fret: 5 });
    expect(at(map, "E5")).toEqual({ string: 2, fret: 5 });
    expect(at(map, "G#5")).toEqual({ string: 1, fret: 4 });
    expect(at(map, "C#6")).toEqual({ string: 1, fret: 9 }); // nothing above string 1, so the 4th finger stretches
    const stretched = map.spots.filter((s) => s.fret < 5 || s.fret > 8).map((s) => s.written);
    expect(stretched).toEqual(["G#3", "C#4", "F#4", "B4", "G#5", "C#6"]);
  });

  it("fills the hole a fifth between strings leaves with a two-fret stretch (drop D)", () => {
    const map = defaultSpotMap(5, TUNINGS["drop-d"]);
    expect(at(map, "B3")).toEqual({ string: 6, fret: 9 });
    expect(at(map, "C4")).toEqual({ string: 5, fret: 3 }); // neither string reaches within one fret
    expect(at(map, "C#4")).toEqual({ string: 5, fret: 4 });
  });

  it("concert reading places each written pitch an octave higher on the neck", () => {
    const guitar = defaultSpotMap(3, standard);
    const concert = defaultSpotMap(3, standard, { reading: "concert" });
    expect(concert.spots.map((s) => s.writtenMidi)).toEqual(guitar.spots.map((s) => s.writtenMidi - 12));
    expect(concert.reading).toBe("concert");
  });

  it("uses the tuning id so the map names its tuning", () => {
    expect(defaultSpotMap(2, resolveTuning("D2 A2 D3 G3 B3 E4")).tuning).toBe("D2 A2 D3 G3 B3 E4");
  });

  it("rejects a position that runs off the neck, and bad options", () => {
    expect(() => defaultSpotMap(10, standard, { frets: 12 })).toThrow(/stretches to fret 14, but this neck has only 12 frets/);
    expect(() => defaultSpotMap(3, standard, { frets: 30 })).toThrow(MusicError);
    expect(() => defaultSpotMap(3, standard, { reading: "piano" as never })).toThrow(/Reading must be/);
  });

  // Every default map for positions 1–12 × every tuning × every neck it fits on passes validation.
  it.each(TUNING_IDS)("every default map in %s is valid, chromatic, and stretches only when it must", (id) => {
    const tuning = resolveTuning(id);
    let maps = 0;
    for (let frets = 12; frets <= 24; frets++) {
      for (let position = 1; position <= 12 && position + 4 <= frets; position++) {
        const map = defaultSpotMap(position, tuning, { frets });
        expect(validateSpotMap(map, tuning)).toEqual([]);
        const w = positionWindow(position);
        map.spots.forEach((s, i) => {
          expect(s.writtenMidi).toBe(map.spots[0]!.writtenMidi + i);
          expect(s.fret).toBeLessThanOrEqual(frets);
          expect(spotSounding(s, tuning)).toBe(soundingMidi(s.writtenMidi));
          const inSpan = (f: number) => (f >= w.first && f <= w.last) || (position === 1 && f === 0);
          if (!inSpan(s.fret)) {
            // no string offers this pitch inside the four-fret span
            expect(tuning.strings.some((open) => inSpan(soundingMidi(s.writtenMidi) - open))).toBe(false);
          }
        });
        maps++;
      }
    }
    expect(maps).toBeGreaterThan(100);
  });
});

describe("validateSpotMap", () => {
  const map = defaultSpotMap(5, standard);
  const g4 = map.spots.findIndex((s) => s.written === "G4");

  it("accepts the default map", () => expect(validateSpotMap(map, standard)).toEqual([]));

  it("names a spot that doesn't hold the claimed pitch", () => {
    const bad = edited(map, (spots) => {
      spots[g4]!.fret += 1;
      return spots;
    });
    expect(validateSpotMap(bad, standard)).toEqual([
      { code: "wrong-pitch", writtenMidi: 67, message: "G4 is placed at string 4, fret 6, which plays G♯4." },
    ]);
  });

  it("names a pitch given twice", () => {
    const bad = edited(map, (spots) => [...spots.slice(0, g4 + 1), { ...spots[g4]!, string: 3, fret: 0 }, ...spots.slice(g4 + 1)]);
    expect(validateSpotMap(bad, standard)).toEqual([
      { code: "duplicate-pitch", writtenMidi: 67, message: "G4 has more than one home spot; keep one." },
    ]);
  });

  it("names a spot outside the position", () => {
    const bad = edited(map, (spots) => {
      Object.assign(spots[g4]!, { string: 3, fret: 0 });
      return spots;
    });
    expect(validateSpotMap(bad, standard)).toEqual([
      { code: "outside-position", writtenMidi: 67, message: "G4 at string 3, fret 0 is outside position 5 (frets 4 to 9)." },
    ]);
  });

  it("accepts a teacher's other spot inside the position, refuses a two-fret stretch where a nearer spot exists", () => {
    const c4 = map.spots.findIndex((s) => s.written === "C4");
    const moved = edited(map, (spots) => {
      Object.assign(spots[c4 + 1]!, { string: 6, fret: 9 }); // C#4: the other one-fret stretch
      return spots;
    });
    expect(codes(moved)).toEqual([]);
    const wide = edited(map, (spots) => {
      Object.assign(spots[c4]!, { string: 5, fret: 3 }); // C4 lies inside the span at string 6, fret 8
      return spots;
    });
    expect(codes(wide)).toEqual(["outside-position"]);
  });

  it("names a gap in the chromatic range", () => {
    const bad = edited(map, (spots) => spots.filter((_, i) => i !== g4));
    expect(validateSpotMap(bad, standard)).toEqual([
      { code: "gap", writtenMidi: 67, message: "G4 has no home spot, but notes below and above it do." },
    ]);
  });

  it("names a string the tuning doesn't have", () => {
    const bad = edited(map, (spots) => {
      spots[0]!.string = 7;
      return spots;
    });
    expect(validateSpotMap(bad, standard)).toEqual([
      { code: "string-not-in-tuning", writtenMidi: map.spots[0]!.writtenMidi, message: "G♯3 is on string 7, but Standard has strings 1 to 6." },
    ]);
  });

  it("names a spelling that is not the pitch, the wrong tuning, order and shape problems", () => {
    expect(codes(edited(map, (spots) => ((spots[g4]!.written = "A4"), spots)))).toEqual(["wrong-spelling"]);
    expect(codes(edited(map, (spots) => ((spots[g4]!.written = "Q4"), spots)))).toEqual(["wrong-spelling"]);
    expect(codes(map, TUNINGS["drop-d"])).toContain("tuning-mismatch");
    expect(codes(edited(map, (spots) => spots.reverse()))).toEqual(Array(map.spots.length - 1).fill("out-of-order"));
    expect(codes({ ...map, position: 0 })).toEqual(["bad-position"]);
    expect(codes({ ...map, spots: [] })).toEqual(["empty"]);
    expect(codes(null as unknown as SpotMap)).toEqual(["not-a-map"]);
    expect(codes(edited(map, (spots) => [...spots, { writtenMidi: 900 } as never]))).toEqual(["not-a-map"]);
  });

  it("reports several problems at once", () => {
    const bad = edited(map, (spots) => {
      spots[0]!.fret = 20;
      return spots.filter((_, i) => i !== g4);
    });
    expect(codes(bad).sort()).toEqual(["gap", "wrong-pitch"]);
  });
});

describe("homeSpotFor", () => {
  const map = defaultSpotMap(5, standard);
  it("finds a home spot, or undefined outside the map", () => {
    expect(homeSpotFor(map, 67)).toMatchObject({ string: 4, fret: 5, written: "G4" });
    expect(homeSpotFor(map, 20)).toBeUndefined();
    expect(homeSpotFor({ ...map, spots: [...map.spots].reverse() }, 67)).toMatchObject({ string: 4, fret: 5 });
  });
});
