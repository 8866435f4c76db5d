import { describe, expect, it } from "vitest";
import { fretboardLayout, heatShare, moveSpot, SIZE_METRICS, type LayoutOptions } from "./fretboardLayout";

const base: LayoutOptions = {
  strings: 6,
  frets: 19,
  size: "pad",
  leftHanded: false,
  viewportWidth: 360,
  fretLabels: true,
};

describe("fretboardLayout", () => {
  it("spaces frets to scale: fret 12 halves the string, so it sits halfway from nut to bridge", () => {
    const l = fretboardLayout(base);
    const nut = l.wires[0]!;
    const toTwelve = l.wires[12]! - nut;
    // Each fret shortens the vibrating length by 2^(−1/12) (equal temperament; the rule of 18 approximates it).
    expect((l.wires[1]! - nut) / toTwelve).toBeCloseTo((1 - 2 ** (-1 / 12)) / 0.5, 6);
    expect((l.wires[7]! - l.wires[5]!) / toTwelve).toBeCloseTo((2 ** (-5 / 12) - 2 ** (-7 / 12)) / 0.5, 6);
  });

  it("keeps every cell at least the minimum target size, even the narrowest last fret", () => {
    for (const size of ["page", "pad", "stage"] as const) {
      const l = fretboardLayout({ ...base, size, frets: 24, viewportWidth: 320 });
      for (let fret = 0; fret <= 24; fret++) {
        const c = l.cell({ string: 1, fret });
        expect(c.width).toBeGreaterThanOrEqual(SIZE_METRICS[size].minCell - 1e-9);
        expect(c.height).toBeGreaterThanOrEqual(44);
      }
    }
  });

  it("fits the position window to the viewport and centres it", () => {
    const l = fretboardLayout({ ...base, viewportWidth: 500, window: { first: 5, last: 8 } });
    const start = l.cell({ string: 1, fret: 5 }).x;
    const end = l.cell({ string: 1, fret: 8 }).x + l.cell({ string: 1, fret: 8 }).width;
    expect(end - start).toBeCloseTo(500 - SIZE_METRICS.pad.minCell, 0);
    expect(start - l.scrollLeft).toBeCloseTo(SIZE_METRICS.pad.minCell / 2, 0);
    expect(l.width).toBeGreaterThan(500);
  });

  it("keeps every cell of a window a full target on a narrow phone, trimming the margins to show it whole", () => {
    // Fifth position with its stretches (frets 4–9) on a 19-fret neck, in the 294 px a 360 px phone leaves beside the string names.
    const l = fretboardLayout({ ...base, frets: 19, viewportWidth: 294, window: { first: 4, last: 9 } });
    for (let fret = 4; fret <= 9; fret++) expect(l.cell({ string: 1, fret }).width).toBeGreaterThan(SIZE_METRICS.pad.minCell - 1e-9);
    const four = l.cell({ string: 1, fret: 4 });
    const nine = l.cell({ string: 1, fret: 9 });
    expect(four.x - l.scrollLeft).toBeGreaterThanOrEqual(0);
    expect(nine.x + nine.width - l.scrollLeft).toBeLessThanOrEqual(294);
  });

  it("stops zooming at three targets per fret on a wide screen, and still centres the window", () => {
    const l = fretboardLayout({ ...base, viewportWidth: 1400, window: { first: 5, last: 8 } });
    const five = l.cell({ string: 1, fret: 5 });
    const eight = l.cell({ string: 1, fret: 8 });
    expect(five.width).toBeCloseTo(3 * SIZE_METRICS.pad.minCell, 6);
    const middle = (five.x + eight.x + eight.width) / 2;
    expect(middle - l.scrollLeft).toBeCloseTo(700, 0);
  });

  it("shows a window too wide for the screen from its nut side, on either hand", () => {
    const opts = { ...base, frets: 24, viewportWidth: 320, window: { first: 5, last: 8 } };
    const right = fretboardLayout(opts);
    expect(right.cell({ string: 1, fret: 5 }).x - right.scrollLeft).toBeCloseTo(SIZE_METRICS.pad.minCell / 2, 0);
    const left = fretboardLayout({ ...opts, leftHanded: true });
    const five = left.cell({ string: 1, fret: 5 });
    expect(left.scrollLeft + 320 - (five.x + five.width)).toBeCloseTo(SIZE_METRICS.pad.minCell / 2, 0);
  });

  it("starts a whole neck wider than the screen at the nut", () => {
    expect(fretboardLayout({ ...base, frets: 24, viewportWidth: 800 }).scrollLeft).toBe(0);
    const left = fretboardLayout({ ...base, frets: 24, viewportWidth: 800, leftHanded: true });
    expect(left.scrollLeft).toBe(left.width - 800);
  });

  it("fits the whole neck when there is room and no window", () => {
    const l = fretboardLayout({ ...base, frets: 12, viewportWidth: 2000 });
    expect(l.width).toBeLessThanOrEqual(2000 + 1);
    expect(l.scrollLeft).toBe(0);
  });

  it("puts string 1 on top and the lowest string at the bottom", () => {
    const l = fretboardLayout(base);
    expect(l.stringY[0]!).toBeLessThan(l.stringY[5]!);
    expect(l.cell({ string: 6, fret: 3 }).y).toBeGreaterThan(l.cell({ string: 1, fret: 3 }).y);
  });

  it("mirrors left to right for a left-handed player, nut on the right", () => {
    const right = fretboardLayout(base);
    const left = fretboardLayout({ ...base, leftHanded: true });
    expect(left.width).toBe(right.width);
    expect(left.wires[0]!).toBeCloseTo(right.width - right.wires[0]!, 6);
    expect(left.wires[0]!).toBeGreaterThan(left.wires[5]!);
    const r = right.cell({ string: 2, fret: 7 });
    const m = left.cell({ string: 2, fret: 7 });
    expect(m.x + m.width).toBeCloseTo(right.width - r.x, 6);
    expect(m.y).toBe(r.y);
  });

  it("places inlays at 3, 5, 7, 9, 15, 17, 19 and doubles at 12 on a 19-fret neck", () => {
    const l = fretboardLayout(base);
    expect(l.inlays).toHaveLength(7 + 2);
    const twelve = l.cell({ string: 1, fret: 12 });
    expect(l.inlays.filter((d) => d.x > twelve.x && d.x < twelve.x + twelve.width)).toHaveLength(2);
    expect(fretboardLayout({ ...base, frets: 24 }).inlays).toHaveLength(8 + 4);
  });

  it("puts the open-string cell before the nut", () => {
    const l = fretboardLayout(base);
    const open = l.cell({ string: 1, fret: 0 });
    expect(open.x + open.width).toBeCloseTo(l.wires[0]!, 6);
  });
});

describe("moveSpot", () => {
  const neck = { strings: 6, frets: 12, leftHanded: false };
  it("moves between strings and frets and stops at the edges", () => {
    expect(moveSpot({ string: 3, fret: 5 }, "ArrowUp", neck)).toEqual({ string: 2, fret: 5 });
    expect(moveSpot({ string: 1, fret: 5 }, "ArrowUp", neck)).toEqual({ string: 1, fret: 5 });
    expect(moveSpot({ string: 6, fret: 5 }, "ArrowDown", neck)).toEqual({ string: 6, fret: 5 });
    expect(moveSpot({ string: 3, fret: 5 }, "ArrowRight", neck)).toEqual({ string: 3, fret: 6 });
    expect(moveSpot({ string: 3, fret: 0 }, "ArrowLeft", neck)).toEqual({ string: 3, fret: 0 });
    expect(moveSpot({ string: 3, fret: 12 }, "ArrowRight", neck)).toEqual({ string: 3, fret: 12 });
    expect(moveSpot({ string: 3, fret: 5 }, "Home", neck)).toEqual({ string: 3, fret: 0 });
    expect(moveSpot({ string: 3, fret: 5 }, "End", neck)).toEqual({ string: 3, fret: 12 });
  });
  it("follows the drawing on a mirrored board: right goes toward the nut", () => {
    expect(moveSpot({ string: 3, fret: 5 }, "ArrowRight", { ...neck, leftHanded: true })).toEqual({
      string: 3,
      fret: 4,
    });
    expect(moveSpot({ string: 3, fret: 5 }, "ArrowLeft", { ...neck, leftHanded: true })).toEqual({
      string: 3,
      fret: 6,
    });
  });
});

describe("heatShare", () => {
  it("scales counts against the busiest spot", () => {
    expect(heatShare(5, 10)).toBe(0.5);
    expect(heatShare(10, 10)).toBe(1);
    expect(heatShare(3, 0)).toBe(0);
  });
});
