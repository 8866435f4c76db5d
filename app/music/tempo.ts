// Tempo markings as MusicXML 4.0 writes them, in quarter notes per minute and in a meter's own beat.

export interface ScoreTempo {
  /** Quarter notes per minute, the unit of MusicXML's <sound tempo>. */
  quarterBpm: number;
  /** The printed marking when the score has one: "dotted quarter = 60" is { beatUnit: "quarter", dots: 1, perMinute: 60 }. */
  marking: { beatUnit: string; dots: number; perMinute: number } | null;
}

/** MusicXML 4.0 note-type-value names a <beat-unit> may take, in quarter notes. */
const UNIT_QUARTERS: Readonly<Record<string, number>> = {
  maxima: 32,
  long: 16,
  breve: 8,
  whole: 4,
  half: 2,
  quarter: 1,
  eighth: 1 / 2,
  "16th": 1 / 4,
  "32nd": 1 / 8,
  "64th": 1 / 16,
};

/** A beat unit's length in quarter notes; each dot adds half of what the previous one added. */
export function unitQuarters(beatUnit: string, dots = 0): number | null {
  const plain = UNIT_QUARTERS[beatUnit];
  if (plain === undefined || !Number.isInteger(dots) || dots < 0 || dots > 4) return null;
  return plain * (2 - 1 / 2 ** dots);
}

/** The first number of a <per-minute>, which MusicXML 4.0 allows to be text such as "c. 108" or "96-104". */
function firstNumber(text: string | undefined): number | null {
  const match = /\d+(?:\.\d+)?/u.exec(text ?? "");
  const n = match ? Number(match[0]) : NaN;
  return n > 0 && Number.isFinite(n) ? n : null;
}

/**
 * A tempo from what one <direction> (or a bare <sound>) says: the <metronome>'s beat-unit, beat-unit-dots and
 * per-minute, the <sound tempo> in quarters per minute, either or both. When both are there the sound's value
 * is the tempo (it is what a player hears) and the metronome its printed form. A metric modulation (a beat
 * unit equal to another, no per-minute) or a tempo of 0 (MusicXML 4.0: the player asks) says no tempo.
 */
export function readTempo(input: { beatUnit?: string; dots?: number; perMinute?: string; soundTempo?: string }): ScoreTempo | null {
  const unit = input.beatUnit === undefined ? null : unitQuarters(input.beatUnit, input.dots ?? 0);
  const perMinute = firstNumber(input.perMinute);
  const marking = unit !== null && perMinute !== null ? { beatUnit: input.beatUnit!, dots: input.dots ?? 0, perMinute } : null;
  const sound = input.soundTempo === undefined ? NaN : Number(input.soundTempo);
  if (sound > 0 && Number.isFinite(sound)) return { quarterBpm: sound, marking };
  return marking && unit !== null ? { quarterBpm: perMinute! * unit, marking } : null;
}

/** Beats per minute in a beat of `beatQuarters` quarter notes (a dotted quarter is 1.5). */
export function tempoInBeat(tempo: ScoreTempo, beatQuarters: number): number {
  return tempo.quarterBpm / beatQuarters;
}
