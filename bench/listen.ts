// Prints the note detector's reaction (attack → counted note) and its CPU time per second of audio, beside a baseline
// measured in the same run: an analyser reading (the level over the same window, every hop) with no detection.
// Run: npx tsx bench/listen.ts
import { NoteDetector, type HeardNote } from "../app/listen/detector";
import { mix, pluck, roomNoise } from "../app/listen/synth";

const SR = 48_000;
const ROUNDS = 5;
// Audio arrives in blocks of 1024 samples from the capture worklet (capture.worklet.ts).
const BLOCK = 1024;
const GAP_SECONDS = 0.6;
// Every note of a 24-fret guitar, E2 (MIDI 40) to E6 (MIDI 88), low to high; then the same with the open A string
// plucked first and left ringing under the whole run, softly (−18 dB, a string ringing in sympathy) and loudly (−10 dB).
const MIDIS = Array.from({ length: 49 }, (_, i) => 40 + i);
const hzOf = (midi: number) => 440 * 2 ** ((midi - 69) / 12);

const CASES = [
  { label: "detector", ringing: 0 },
  { label: "detector, A string at −18 dB", ringing: 0.06 },
  { label: "detector, A string at −10 dB", ringing: 0.15 },
];

function practice(ringing: number): { samples: Float32Array; attacksMs: number[] } {
  const seconds = MIDIS.length * GAP_SECONDS + 1;
  const samples = mix(
    roomNoise({ seconds, sampleRate: SR, rms: 0.004 }),
    // The open A string, plucked once and left ringing under the whole run.
    ringing ? pluck({ hz: hzOf(45), seconds, sampleRate: SR, startSeconds: 0.05, decaySeconds: 30, amplitude: ringing, seed: 99 }) : new Float32Array(0),
  );
  const attacksMs = MIDIS.map((_, i) => (0.2 + i * GAP_SECONDS) * 1000);
  MIDIS.forEach((midi, i) => {
    // Each note lasts until the next stops it, as a fretting hand does.
    const note = pluck({ hz: hzOf(midi), seconds: GAP_SECONDS, sampleRate: SR, seed: i + 1 });
    const at = Math.round((attacksMs[i]! * SR) / 1000);
    for (let k = 0; k < note.length; k++) samples[at + k]! += note[k]!;
  });
  return { samples, attacksMs };
}

function detect(samples: Float32Array): HeardNote[] {
  const detector = new NoteDetector({ sampleRate: SR });
  const heard: HeardNote[] = [];
  for (let i = 0; i < samples.length; i += BLOCK) heard.push(...detector.push(samples.subarray(i, i + BLOCK), (i * 1000) / SR));
  return heard;
}

/** What an analyser loop with no detection does on the same schedule: copy the latest window and take its level. */
function analyserOnly(samples: Float32Array): number {
  const window = new Float32Array(Math.round(0.042 * SR));
  const hop = Math.round(0.005 * SR);
  let sum = 0;
  for (let end = window.length; end <= samples.length; end += hop) {
    window.set(samples.subarray(end - window.length, end));
    let energy = 0;
    for (let i = 0; i < window.length; i++) energy += window[i]! * window[i]!;
    sum += Math.sqrt(energy / window.length);
  }
  return sum;
}

function medianMs(run: () => unknown): number {
  const times: number[] = [];
  for (let r = 0; r < ROUNDS; r++) {
    const start = process.cpuUsage();
    run();
    const used = process.cpuUsage(start);
    times.push((used.user + used.system) / 1000);
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(ROUNDS / 2)]!;
}

const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]!;

console.log(`Note detector: ${MIDIS.length} plucks E2–E6 every ${GAP_SECONDS * 1000} ms at ${SR / 1000} kHz in room noise, blocks of ${BLOCK}; CPU median of ${ROUNDS}`);
console.log(`${"case".padEnd(30)} ${"right".padStart(7)} ${"extra".padStart(6)} ${"attack→count median".padStart(20)} ${"p95".padStart(6)} ${"onset error p95".padStart(16)} ${"CPU ms per s of audio".padStart(22)}`);
for (const { label, ringing } of CASES) {
  const { samples, attacksMs } = practice(ringing);
  const audioSeconds = samples.length / SR;
  // The ringing string's own pluck, before the run, is a note too but not one of the run's.
  const heard = detect(samples).filter((n) => n.onsetMs >= attacksMs[0]! - 20);
  const latencies: number[] = [];
  const onsetErrors: number[] = [];
  let right = 0;
  for (const [i, attack] of attacksMs.entries()) {
    const match = heard.find((n) => n.onsetMs >= attack - 20 && n.onsetMs < attack + GAP_SECONDS * 1000 - 20);
    if (!match || match.midi !== MIDIS[i]) continue;
    right++;
    latencies.push(match.countedMs - attack);
    onsetErrors.push(Math.abs(match.onsetMs - attack));
  }
  latencies.sort((a, b) => a - b);
  onsetErrors.sort((a, b) => a - b);
  const cpu = medianMs(() => detect(samples)) / audioSeconds;
  console.log(
    `${label.padEnd(30)} ${`${right}/${MIDIS.length}`.padStart(7)} ${String(heard.length - right).padStart(6)} ${`${percentile(latencies, 50).toFixed(1)} ms`.padStart(20)} ${`${percentile(latencies, 95).toFixed(0)} ms`.padStart(6)} ${`${percentile(onsetErrors, 95).toFixed(1)} ms`.padStart(16)} ${cpu.toFixed(2).padStart(22)}`,
  );
  if (ringing === 0) {
    const baseline = medianMs(() => analyserOnly(samples)) / audioSeconds;
    console.log(`${"baseline: analyser level".padEnd(30)} ${"".padStart(7)} ${"".padStart(6)} ${"".padStart(20)} ${"".padStart(6)} ${"".padStart(16)} ${baseline.toFixed(2).padStart(22)}`);
  }
}
console.log(`\nNode ${process.version}`);
