// Synthetic guitar sounds with known ground truth, for the detector's tests, its benchmark and the fake microphone's WAV files.
// A plucked string is drawn additively: decaying partials, stretched by string stiffness, shaped by where the string is plucked.
// Randomness is seeded, so every run hears the same room.
import { seededRandom } from "~/music/pools";

export interface PluckOptions {
  hz: number /* the fundamental */;
  seconds: number /* length of the returned buffer, silence before `startSeconds` included */;
  sampleRate: number;
  startSeconds?: number /* silence before the attack */;
  amplitude?: number /* peak of the first partial's envelope, 0..1 */;
  decaySeconds?: number /* the fundamental's time constant; higher partials die faster */;
  partials?: number;
  inharmonicity?: number /* B in f_n = n·f·√(1 + B·n²) */;
  pluckPosition?: number /* fraction of the string length from the bridge */;
  fundamentalGain?: number /* < 1 for a weak fundamental (a small body, a phone's microphone) */;
  secondHarmonicGain?: number /* multiplies the 2nd partial, for octave-error cases */;
  attackNoise?: number /* level of the pick's click, relative to amplitude */;
  seed?: number;
}

/** One plucked note. */
export function pluck(opts: PluckOptions): Float32Array {
  const {
    hz, seconds, sampleRate, startSeconds = 0, amplitude = 0.5, decaySeconds = 1.2, partials = 16,
    inharmonicity = 0.00005, pluckPosition = 0.18, fundamentalGain = 1, secondHarmonicGain = 1, attackNoise = 0.3, seed = 1,
  } = opts;
  const out = new Float32Array(Math.round(seconds * sampleRate));
  const start = Math.round(startSeconds * sampleRate);
  const random = seededRandom(seed);
  for (let n = 1; n <= partials; n++) {
    const f = n * hz * Math.sqrt(1 + inharmonicity * n * n);
    if (f >= sampleRate / 2) break;
    // A string plucked at a point has partials falling as 1/n, with those that have a node there missing.
    let gain = (amplitude * Math.abs(Math.sin(Math.PI * n * pluckPosition))) / (n * Math.sin(Math.PI * pluckPosition));
    if (n === 1) gain *= fundamentalGain;
    if (n === 2) gain *= secondHarmonicGain;
    const tau = decaySeconds / (1 + 0.4 * (n - 1));
    const phase = random() * 2 * Math.PI;
    const step = (2 * Math.PI * f) / sampleRate;
    for (let i = start; i < out.length; i++) {
      const t = (i - start) / sampleRate;
      out[i]! += gain * Math.exp(-t / tau) * Math.sin(phase + step * (i - start));
    }
  }
  // The pick's click: a few milliseconds of fast-decaying noise at the attack.
  const clickLength = Math.round(0.006 * sampleRate);
  for (let i = 0; i < clickLength && start + i < out.length; i++) {
    out[start + i]! += amplitude * attackNoise * (random() * 2 - 1) * Math.exp(-i / (clickLength / 4));
  }
  return out;
}

/** Steady room noise: white noise with the given RMS level. */
export function roomNoise(opts: { seconds: number; sampleRate: number; rms: number; seed?: number }): Float32Array {
  const out = new Float32Array(Math.round(opts.seconds * opts.sampleRate));
  const random = seededRandom(opts.seed ?? 7);
  // A uniform variable on [-1, 1] has RMS 1/√3.
  const scale = opts.rms * Math.sqrt(3);
  for (let i = 0; i < out.length; i++) out[i] = (random() * 2 - 1) * scale;
  return out;
}

/** Sums tracks sample by sample; the result is as long as the longest. */
export function mix(...tracks: Float32Array[]): Float32Array {
  const out = new Float32Array(Math.max(0, ...tracks.map((t) => t.length)));
  for (const track of tracks) for (let i = 0; i < track.length; i++) out[i]! += track[i]!;
  return out;
}

/** 16-bit PCM mono RIFF/WAVE, the format a fake microphone plays from a file. */
export function encodeWav(samples: Float32Array, sampleRate: number): Uint8Array {
  const bytes = new Uint8Array(44 + samples.length * 2);
  const view = new DataView(bytes.buffer);
  const text = (offset: number, s: string) => {
    for (let i = 0; i < s.length; i++) view.setUint8(offset + i, s.charCodeAt(i));
  };
  text(0, "RIFF");
  view.setUint32(4, 36 + samples.length * 2, true);
  text(8, "WAVE");
  text(12, "fmt ");
  view.setUint32(16, 16, true) /* fmt chunk size */;
  view.setUint16(20, 1, true) /* PCM */;
  view.setUint16(22, 1, true) /* mono */;
  view.setUint32(24, sampleRate, true);
  view.setUint32(28, sampleRate * 2, true) /* bytes per second */;
  view.setUint16(32, 2, true) /* bytes per frame */;
  view.setUint16(34, 16, true) /* bits per sample */;
  text(36, "data");
  view.setUint32(40, samples.length * 2, true);
  for (let i = 0; i < samples.length; i++) {
    const s = Math.max(-1, Math.min(1, samples[i]!));
    view.setInt16(44 + i * 2, Math.round(s < 0 ? s * 0x8000 : s * 0x7fff), true);
  }
  return bytes;
}
