// Fretboard geometry in screen pixels, drawn to scale; pure so it can be tested without a browser.
import type { Spot } from "~/music/fretboard";

export type FretboardSize = "page" | "pad" | "stage";

/** Pixel sizes per preset; every cell is at least 44 px each way (WCAG 2.5.5 target size) so phones can tap it. */
export const SIZE_METRICS: Readonly<Record<FretboardSize, { stringGap: number; minCell: number; font: number }>> = {
  page: { stringGap: 44, minCell: 44, font: 14 },
  pad: { stringGap: 60, minCell: 44, font: 16 },
  // The stage shows the whole neck on a projector: cells as small as a page's, lettering for the back row.
  stage: { stringGap: 50, minCell: 44, font: 22 },
};

const SINGLE_DOTS = [3, 5, 7, 9, 15, 17, 19, 21];
const DOUBLE_DOTS = [12, 24];
const EDGE = 8;

export interface LayoutOptions {
  strings: number;
  frets: number;
  size: FretboardSize;
  leftHanded: boolean;
  /** Width of the scrolling box; the zoom window (or the whole neck) is fitted to it when cells allow. */
  viewportWidth: number;
  /** Frets to fit on screen, both included (0 = the open strings). */
  window?: { first: number; last: number };
  fretLabels: boolean;
}

export interface Rect {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface FretboardLayout {
  width: number;
  height: number;
  board: Rect;
  /** x of the nut and of each fret wire, index = fret number (0 = nut). */
  wires: number[];
  /** y of each string, index 0 = string 1 (top). */
  stringY: number[];
  inlays: { x: number; y: number }[];
  fretLabelY: number;
  /** Horizontal scroll that centres the zoom window in the viewport. */
  scrollLeft: number;
  /** The tap area of a spot: between its fret wire and the one before (the open strings: before the nut). */
  cell(spot: Spot): Rect;
}

/** Width in scale units of the cell behind fret n (n ≥ 1). */
const cellShare = (n: number) => 2 ** (-(n - 1) / 12) - 2 ** (-n / 12);

export function fretboardLayout(o: LayoutOptions): FretboardLayout {
  const m = SIZE_METRICS[o.size];
  const gutter = EDGE;
  const openWidth = m.minCell * 1.1;
  const nut = gutter + openWidth;

  // Without a window the neck is to scale throughout: the narrowest cell, the last, sets the least scale length.
  const minScale = o.window ? 0 : m.minCell / cellShare(o.frets);
  // The board runs a little past the last fret, as a real one does.
  const tailShare = 0.6 * cellShare(o.frets);
  const first = Math.max(0, Math.min(o.window?.first ?? 0, o.frets));
  const last = Math.max(first, Math.min(o.window?.last ?? o.frets, o.frets));
  // Fit the window's cells, with half a cell of margin either side, or else the whole board, into the viewport.
  const margin = m.minCell / 2;
  const fitScale = !o.window
    ? (o.viewportWidth - nut - EDGE) / (1 - 2 ** (-o.frets / 12) + tailShare)
    : first === 0
      ? (o.viewportWidth - nut - margin) / (1 - 2 ** (-last / 12))
      : (o.viewportWidth - 2 * margin) / (2 ** (-(first - 1) / 12) - 2 ** (-last / 12));
  // On a wide screen a short window would blow the frets up to absurd widths; three targets wide is plenty.
  const maxScale = (3 * m.minCell) / cellShare(Math.max(1, first));
  let scale = Math.max(minScale, Math.min(fitScale, maxScale));
  if (o.window) {
    // No cell is drawn narrower than a target, which widens a window's far frets; shrink the scale until it fits again.
    const room = first === 0 ? o.viewportWidth - nut - margin : o.viewportWidth - 2 * margin;
    const windowWidth = (s: number) => {
      let sum = 0;
      for (let n = Math.max(1, first); n <= last; n++) sum += Math.max(m.minCell, s * cellShare(n));
      return sum;
    };
    if (windowWidth(scale) > room) {
      let lo = 0;
      for (let i = 0; i < 40; i++) {
        const mid = (lo + scale) / 2;
        if (windowWidth(mid) > room) scale = mid;
        else lo = mid;
      }
      scale = lo;
    }
  }

  // To scale, except that no cell gets narrower than a target: past a zoomed window the frets stop closing up.
  const plain = [nut];
  for (let n = 1; n <= o.frets; n++) plain.push(plain[n - 1]! + Math.max(m.minCell, scale * cellShare(n)));
  const boardEnd = plain[o.frets]! + scale * tailShare;
  const width = Math.floor(boardEnd + EDGE);
  const mirror = (x: number) => (o.leftHanded ? width - x : x);

  const top = EDGE;
  const boardHeight = o.strings * m.stringGap;
  const stringY = Array.from({ length: o.strings }, (_, i) => top + (i + 0.5) * m.stringGap);
  const board = { x: Math.min(mirror(nut), mirror(boardEnd)), y: top, width: boardEnd - nut, height: boardHeight };

  const cellCentre = (n: number) => mirror((plain[n - 1]! + plain[n]!) / 2);
  const inlays = [
    ...SINGLE_DOTS.filter((n) => n <= o.frets).map((n) => ({ x: cellCentre(n), y: top + boardHeight / 2 })),
    ...DOUBLE_DOTS.filter((n) => n <= o.frets).flatMap((n) => [
      { x: cellCentre(n), y: top + boardHeight / 4 },
      { x: cellCentre(n), y: top + (3 * boardHeight) / 4 },
    ]),
  ];

  const cellsStart = first === 0 ? 0 : plain[first - 1]!;
  // Half a cell of margin either side, less when only that keeps the whole window on screen.
  const roomLeft = o.viewportWidth - (plain[last]! - cellsStart);
  const slack = roomLeft >= 0 ? Math.min(margin, roomLeft / 2) : margin;
  const plainStart = first === 0 ? 0 : cellsStart - slack;
  const plainEnd = plain[last]! + slack;
  // A window that fits is centred; one that doesn't is shown from its nut side, where the hand's first fret is.
  const spare = o.viewportWidth - (plainEnd - plainStart);
  const wanted = o.leftHanded
    ? width - plainEnd - Math.max(0, spare / 2) - Math.min(0, spare)
    : plainStart - Math.max(0, spare / 2);
  const scrollLeft = Math.max(0, Math.min(width - o.viewportWidth, wanted));

  return {
    width,
    height: Math.ceil(top + boardHeight + (o.fretLabels ? m.font * 2 : EDGE)),
    board,
    wires: plain.map(mirror),
    stringY,
    inlays,
    fretLabelY: top + boardHeight + m.font * 1.3,
    scrollLeft: Math.round(scrollLeft),
    cell({ string, fret }) {
      const from = fret === 0 ? gutter : plain[fret - 1]!;
      const to = fret === 0 ? nut : plain[fret]!;
      return {
        x: Math.min(mirror(from), mirror(to)),
        y: top + (string - 1) * m.stringGap,
        width: to - from,
        height: m.stringGap,
      };
    },
  };
}

export type NavKey = "ArrowUp" | "ArrowDown" | "ArrowLeft" | "ArrowRight" | "Home" | "End";

/**
 * The spot a key moves focus to: up and down change string (string 1 is on top), left and right move along
 * the neck as drawn, so they swap for a left-handed board; Home and End jump to the open string and the last fret.
 */
export function moveSpot(from: Spot, key: NavKey, neck: { strings: number; frets: number; leftHanded: boolean }): Spot {
  const clamp = (v: number, hi: number, lo: number) => Math.max(lo, Math.min(hi, v));
  const towardBody = neck.leftHanded ? -1 : 1;
  switch (key) {
    case "ArrowUp":
      return { ...from, string: clamp(from.string - 1, neck.strings, 1) };
    case "ArrowDown":
      return { ...from, string: clamp(from.string + 1, neck.strings, 1) };
    case "ArrowRight":
      return { ...from, fret: clamp(from.fret + towardBody, neck.frets, 0) };
    case "ArrowLeft":
      return { ...from, fret: clamp(from.fret - towardBody, neck.frets, 0) };
    case "Home":
      return { ...from, fret: 0 };
    case "End":
      return { ...from, fret: neck.frets };
  }
}

export const isNavKey = (key: string): key is NavKey =>
  ["ArrowUp", "ArrowDown", "ArrowLeft", "ArrowRight", "Home", "End"].includes(key);

/** Heat circles grow and darken with the count, relative to the busiest spot. */
export function heatShare(count: number, max: number): number {
  return max > 0 ? Math.min(1, Math.max(0, count / max)) : 0;
}
