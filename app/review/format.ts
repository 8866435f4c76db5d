// How review figures read on screen and in words.
import { displayPitch, parsePitch } from "~/music/pitch";

export const pct = (x: number) => `${Math.round(x * 100)} %`;
export const secs = (ms: number | null) => (ms === null ? "—" : `${(ms / 1000).toFixed(1)} s`);
export const noteName = (written: string) => displayPitch(parsePitch(written));
export const day = (ms: number) => new Date(ms).toLocaleDateString(undefined, { day: "numeric", month: "short", year: "numeric" });
/** A change in accuracy, in percentage points, with a word for its direction. */
export const change = (delta: number) => {
  const points = Math.round(delta * 100);
  const n = Math.abs(points);
  const words = `${n} ${n === 1 ? "point" : "points"}`;
  return points > 0 ? `▲ up ${words}` : points < 0 ? `▼ down ${words}` : "= no change";
};
