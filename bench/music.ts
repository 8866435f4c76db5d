// Prints how long the music engine takes for its two hot sweeps, each beside a plain-arithmetic baseline run
// in the same process, so the figures can be compared across machines. Run: npx tsx bench/music.ts
import { spotsFor, type Spot } from "../app/music/fretboard";
import { LETTERS, MusicError, parsePitch, pitchMidi, type Pitch } from "../app/music/pitch";
import { defaultSpotMap, validateSpotMap } from "../app/music/positions";
import { MAX_FRETS, MIN_FRETS, resolveTuning, TUNINGS, type Tuning } from "../app/music/tuning";

const ROUNDS = 15;
const tunings: Tuning[] = [...Object.values(TUNINGS), resolveTuning("C2 G2 D3 G3 B3 E4")];

// Every spelling from double flat to double sharp, octaves 0–8, that exists in MIDI.
const written: Pitch[] = [];
for (let octave = 0; octave <= 8; octave++) {
  for (const letter of LETTERS) {
    for (let alter = -2; alter <= 2; alter++) {
      try {
        written.push(parsePitch(`${letter}${["bb", "b", "", "#", "##"][alter + 2]}${octave}`));
      } catch (error) {
        if (!(error instanceof MusicError)) throw error;
      }
    }
  }
}
const writtenMidi = written.map(pitchMidi);

/** Median wall time in ms of `ROUNDS` runs; the returned count keeps the work observable so it isn't skipped. */
function time(run: () => number): { ms: number; count: number } {
  let count = 0;
  const samples: number[] = [];
  for (let r = 0; r < ROUNDS; r++) {
    const start = performance.now();
    count = run();
    samples.push(performance.now() - start);
  }
  samples.sort((a, b) => a - b);
  return { ms: samples[Math.floor(ROUNDS / 2)]!, count };
}

function report(label: string, calls: number, result: { ms: number; count: number }) {
  const perCall = (result.ms * 1e6) / calls;
  console.log(`${label.padEnd(44)} ${result.ms.toFixed(2).padStart(9)} ms  ${perCall.toFixed(0).padStart(8)} ns/call  (${result.count} results)`);
}

const fretCounts = Array.from({ length: MAX_FRETS - MIN_FRETS + 1 }, (_, i) => MIN_FRETS + i);

const spotCalls = written.length * tunings.length * fretCounts.length;
console.log(`Spots: ${written.length} written pitches × ${tunings.length} tunings × frets ${MIN_FRETS}–${MAX_FRETS} = ${spotCalls} calls, median of ${ROUNDS}`);
report("  spotsFor (engine)", spotCalls, time(() => {
  let n = 0;
  for (const tuning of tunings) for (const frets of fretCounts) for (const p of written) n += spotsFor(p, { tuning, frets }).length;
  return n;
}));
report("  baseline: plain MIDI arithmetic", spotCalls, time(() => {
  let n = 0;
  for (const tuning of tunings) {
    for (const frets of fretCounts) {
      for (const midi of writtenMidi) {
        const spots: Spot[] = [];
        for (let i = 0; i < tuning.strings.length; i++) {
          const fret = midi - 12 - tuning.strings[i]!;
          if (fret >= 0 && fret <= frets) spots.push({ string: i + 1, fret });
        }
        n += spots.length;
      }
    }
  }
  return n;
}));

const mapJobs: { position: number; tuning: Tuning; frets: number }[] = [];
for (const tuning of tunings) {
  for (const frets of fretCounts) {
    for (let position = 1; position <= 12 && position + 4 <= frets; position++) mapJobs.push({ position, tuning, frets });
  }
}
console.log(`\nMaps: positions 1–12 × ${tunings.length} tunings × every neck they fit (${MIN_FRETS}–${MAX_FRETS} frets) = ${mapJobs.length} maps, median of ${ROUNDS}`);
report("  defaultSpotMap (engine)", mapJobs.length, time(() => {
  let n = 0;
  for (const job of mapJobs) n += defaultSpotMap(job.position, job.tuning, { frets: job.frets }).spots.length;
  return n;
}));
const maps = mapJobs.map((job) => ({ map: defaultSpotMap(job.position, job.tuning, { frets: job.frets }), tuning: job.tuning }));
report("  validateSpotMap (engine)", maps.length, time(() => {
  let n = 0;
  for (const { map, tuning } of maps) n += validateSpotMap(map, tuning).length + map.spots.length;
  return n;
}));
report("  baseline: lowest-fret-in-window loop", mapJobs.length, time(() => {
  let n = 0;
  for (const { position, tuning, frets } of mapJobs) {
    const low = Math.min(...tuning.strings) + position - 1;
    const high = Math.max(...tuning.strings) + Math.min(position + 4, frets);
    for (let midi = low; midi <= high; midi++) {
      let best = -1;
      for (let i = 0; i < tuning.strings.length; i++) {
        const fret = midi - tuning.strings[i]!;
        if (fret >= position - 2 && fret <= position + 5 && (best < 0 || fret < best)) best = fret;
      }
      if (best >= 0) n++;
    }
  }
  return n;
}));
console.log(`\nNode ${process.version}`);
