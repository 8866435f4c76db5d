// How review figures read on screen and in words.
import { noteName as nameIn, type NoteNaming } from "~/music/naming";
import { parsePitch } from "~/music/pitch";
import { plural } from "~/lib/plural";

export const pct = (x: number) => `${Math.round(x * 100)} %`;
export const secs = (ms: number | null) => (ms === null ? "—" : `${(ms / 1000).toFixed(1)} s`);
/** A written note with its octave, in the school's or the device's naming: "F♯5", "Fa♯5", "Fis5". */
export const noteName = (written: string, naming?: NoteNaming) => nameIn(parsePitch(written), naming, { octave: true });
/** A day as "2 Dec 2026" or "Dec 2, 2026", by the reader's locale; a date from a loader may come as a string. */
export const day = (at: number | string | Date) => new Date(at).toLocaleDateString(undefined, { day: "numeric", month: "short", year: "numeric" });
/** A change in accuracy, in percentage points, with a word for its direction. */
export const change = (delta: number) => {
  const points = Math.round(delta * 100);
  const n = Math.abs(points);
  const words = plural(n, "point");
  return points > 0 ? `▲ up ${words}` : points < 0 ? `▼ down ${words}` : "= no change";
};
