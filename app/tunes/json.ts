// The tunes JSON API's shapes: a list row, and one tune with its notes and bars.
import type { Tune } from "./builtin";

type Listed = Tune & { builtin: boolean };

export function tuneSummary(t: Listed) {
  return { id: t.id, title: t.title, composer: t.composer, builtin: t.builtin, keyFifths: t.keyFifths, notes: t.notes.length, bars: t.notes.at(-1)?.bar ?? 0 };
}

/**
 * Every bar with its meter and key: an upload's from its stored score; a built-in tune (or an upload
 * stored before scores were kept) has one meter of `beatsPerBar` quarter notes and one key throughout.
 */
function barsOf(t: Tune) {
  if (t.score) return t.score.measures.map((m, i) => ({ bar: i + 1, number: m.number, beats: m.beats, beatType: m.beatType, keyFifths: m.keyFifths, pickup: m.pickup }));
  const count = t.notes.at(-1)?.bar ?? 0;
  return Array.from({ length: count }, (_, i) => ({ bar: i + 1, number: String(i + 1), beats: t.beatsPerBar, beatType: 4, keyFifths: t.keyFifths, pickup: false }));
}

export function tuneDetail(t: Listed) {
  return {
    ...tuneSummary(t),
    beatsPerBar: t.beatsPerBar,
    part: t.score?.part ?? null,
    notes: t.notes.map((n) => ({ pitch: n.pitch, beats: n.beats, bar: n.bar, onset: n.onset ?? null, tied: n.tied ?? false })),
    bars: barsOf(t),
  };
}
