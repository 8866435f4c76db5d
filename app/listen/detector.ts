// Turns a stream of microphone samples into counted notes: McLeod pitch method (pitchy) per hop, an octave guard for
// guitar overtones, an energy-rise onset detector, and the rule that one plucked note counts once.
// Pure: no DOM, no Web Audio; the browser feeds it from a Worker (see useListening.ts), tests feed it synthetic plucks.
import { PitchDetector } from "pitchy";
import { A4_HZ, hzToMidi, midiToHz } from "./pitch";

export interface HeardNote {
  midi: number /* sounding, MIDI number */;
  hz: number;
  cents: number /* from the nearest equal-tempered note, positive = sharp */;
  onsetMs: number /* the attack, in the caller's clock */;
  countedMs: number /* when the pitch had been stable long enough to count */;
  clarity: number /* McLeod clarity 0..1, mean over the stable run */;
}

export interface DetectorOptions {
  sampleRate: number;
  a4Hz?: number;
  minHz?: number /* lowest fundamental expected: drop-D's D2 is 73.4 Hz */;
  maxHz?: number /* highest: E6 at the 24th fret of string 1 is 1318.5 Hz */;
}

// A window of 42 ms holds three periods of D2, enough for the method to see the true period of the lowest strings.
const WINDOW_SECONDS = 0.042;
// Level and attacks are read every 5 ms, the pitch every 10 ms: the attack's time stays sharp, the count waits at
// most 10 ms past the stability rule, and the costly part (an FFT per reading) runs 100 times a second.
const HOP_SECONDS = 0.005;
const PITCH_EVERY_HOPS = 2;
// A note counts once its pitch has held within ±35 cents for this long (issue 15: ~80–120 ms).
export const STABLE_MS = 90;
export const STABLE_CENTS = 35;
// Below this clarity a reading is noise, a chord or a transient (the MPM paper suggests k in 0.8–1).
const MIN_CLARITY = 0.85;
// After this much quiet the string has stopped: the same note played again counts again.
const SILENCE_MS = 60;
// Sound below about −54 dBFS is never a note, however quiet the room.
const MIN_LEVEL = 0.002;
// The room's noise floor rises through unpitched sound by 3 dB a second (see followRoom).
const ROOM_RISE_PER_MS = 10 ** (3 / 20 / 1000);
// A note stands this far above the room's noise floor (10 dB).
const GATE_OVER_FLOOR = 3.2;
// An attack raises the high-frequency energy (the pick's click, fresh upper partials) at least this much (6 dB) …
const ONSET_RISE = 2;
// … over the mean of this many hops before it, and attacks closer together than this are one attack.
const ONSET_HISTORY_HOPS = 4;
const ONSET_DEBOUNCE_MS = 60;
// The octave guard's thresholds: how much better a sound repeats after two periods than after one shows the true
// period is the longer one (a likeness gain of 0.06 is odd partials at −15 dB of the whole), and how little energy at
// the odd multiples of f shows the note is 2f (−20 dB).
const SUB_OCTAVE_GAIN = 0.06;
const UP_OCTAVE_RATIO = 0.01;
// When a string from before the latest attack still rings, its period is cancelled before reading the new note; if
// less than this share of the energy is left, the sound is that same note (plucked again), read as it is.
const NEW_NOTE_SHARE = 0.2;
// A pitch held this many readings is a note that may go on ringing under the next one.
const RINGING_FRAMES = 3;

interface Run {
  firstMs: number;
  sumMidi: number;
  sumClarity: number;
  frames: number;
}

export class NoteDetector {
  readonly sampleRate: number;
  readonly a4Hz: number;
  readonly minHz: number;
  readonly maxHz: number;
  /** RMS of the latest hop, 0..1: a live level meter. */
  level = 0;
  /** The pitch heard now, or null in silence or noise. */
  current: { midi: number; cents: number; hz: number } | null = null;

  private readonly windowSize: number;
  private readonly hopSize: number;
  private readonly pitchy: PitchDetector<Float32Array>;
  private readonly ring: Float32Array;
  /** The ring unrolled, oldest first: the window plus one longest period before it, for cancelling a ringing string. */
  private readonly history: Float32Array;
  private readonly frame: Float32Array;
  private readonly cancelled: Float32Array;
  private readonly hann: Float32Array;
  private ringPos = 0;
  private hops = 0;
  private filled = 0;
  private sinceHop = 0;
  private samples = 0;
  private anchor = { sample: 0, ms: 0 };
  private lastSample = 0;
  private noiseFloor = MIN_LEVEL / GATE_OVER_FLOOR;
  private onsetHistory: number[] = [];
  private lastOnsetMs = Number.NEGATIVE_INFINITY;
  private quietMs = 0;
  private armed = true;
  private run: Run | null = null;
  /** The latest pitch held for a few readings (Hz), and the one still ringing from before the latest attack. */
  private heldHz = 0;
  private ringingHz = 0;

  constructor(opts: DetectorOptions) {
    if (!Number.isFinite(opts.sampleRate) || opts.sampleRate < 8000) throw new Error(`Sample rate ${opts.sampleRate} is too low to hear a guitar.`);
    this.sampleRate = opts.sampleRate;
    this.a4Hz = opts.a4Hz ?? A4_HZ;
    this.minHz = opts.minHz ?? 70;
    this.maxHz = opts.maxHz ?? 1400;
    this.windowSize = Math.round(WINDOW_SECONDS * this.sampleRate);
    this.hopSize = Math.round(HOP_SECONDS * this.sampleRate);
    this.pitchy = PitchDetector.forFloat32Array(this.windowSize);
    this.pitchy.minVolumeAbsolute = 0;
    this.ring = new Float32Array(this.windowSize + Math.ceil(this.sampleRate / (this.minHz * 0.97)) + 2);
    this.history = new Float32Array(this.ring.length);
    this.frame = this.history.subarray(this.ring.length - this.windowSize);
    this.cancelled = new Float32Array(this.windowSize);
    this.hann = Float32Array.from({ length: this.windowSize }, (_, i) => 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / (this.windowSize - 1)));
  }

  /** Feeds consecutive samples; `startMs` is the time of samples[0]. Returns the notes that counted in them. */
  push(samples: Float32Array, startMs: number): HeardNote[] {
    this.anchor = { sample: this.samples, ms: startMs };
    const heard: HeardNote[] = [];
    for (let i = 0; i < samples.length; i++) {
      this.ring[this.ringPos] = samples[i]!;
      this.ringPos = (this.ringPos + 1) % this.ring.length;
      this.samples++;
      if (this.filled < this.windowSize) this.filled++;
      if (++this.sinceHop === this.hopSize) {
        this.sinceHop = 0;
        const note = this.hop();
        if (note) heard.push(note);
      }
    }
    return heard;
  }

  /** Forgets everything heard, as after stopping and starting the microphone. */
  reset(): void {
    this.ring.fill(0);
    this.ringPos = this.filled = this.sinceHop = this.samples = this.hops = 0;
    this.anchor = { sample: 0, ms: 0 };
    this.lastSample = 0;
    this.noiseFloor = MIN_LEVEL / GATE_OVER_FLOOR;
    this.onsetHistory = [];
    this.lastOnsetMs = Number.NEGATIVE_INFINITY;
    this.quietMs = 0;
    this.armed = true;
    this.run = null;
    this.heldHz = this.ringingHz = 0;
    this.level = 0;
    this.current = null;
  }

  private msAt(sample: number): number {
    return this.anchor.ms + ((sample - this.anchor.sample) * 1000) / this.sampleRate;
  }

  private hop(): HeardNote | null {
    // The window, oldest sample first.
    const { ring, history, frame, windowSize, hopSize } = this;
    history.set(ring.subarray(this.ringPos), 0);
    history.set(ring.subarray(0, this.ringPos), ring.length - this.ringPos);
    const hopStart = windowSize - hopSize;
    let energy = 0;
    let diffEnergy = 0;
    let previous = this.lastSample;
    for (let i = hopStart; i < windowSize; i++) {
      const x = frame[i]!;
      energy += x * x;
      diffEnergy += (x - previous) ** 2;
      previous = x;
    }
    this.lastSample = previous;
    this.level = Math.sqrt(energy / hopSize);
    const diffLevel = Math.sqrt(diffEnergy / hopSize);
    const endMs = this.msAt(this.samples);
    const hopMs = (hopSize * 1000) / this.sampleRate;

    const gate = Math.max(MIN_LEVEL, this.noiseFloor * GATE_OVER_FLOOR);

    const recent = this.onsetHistory;
    const before = recent.length === 0 ? 0 : recent.reduce((a, b) => a + b, 0) / recent.length;
    recent.push(diffLevel);
    if (recent.length > ONSET_HISTORY_HOPS) recent.shift();
    if (this.level >= gate && diffLevel > ONSET_RISE * before + 1e-6 && endMs - this.lastOnsetMs >= ONSET_DEBOUNCE_MS) {
      this.lastOnsetMs = this.onsetTime(frame, hopStart, before);
      this.armed = true;
      this.run = null;
      this.ringingHz = this.heldHz;
    }

    if (this.level < gate || this.filled < windowSize) {
      this.quietMs += hopMs;
      if (this.quietMs >= SILENCE_MS) {
        this.armed = true;
        this.run = null;
        this.heldHz = this.ringingHz = 0;
      }
      this.current = null;
      this.followRoom(false, hopMs);
      return null;
    }
    this.quietMs = 0;
    if (++this.hops % PITCH_EVERY_HOPS !== 0) return null;

    const heard = this.ringingHz > 0 && this.cancelRinging() ? this.cancelled : frame;
    const [found, clarity] = this.pitchy.findPitch(heard, this.sampleRate);
    const hz = clarity >= MIN_CLARITY ? this.guardOctave(heard, found) : 0;
    const pitched = hz >= this.minHz * 0.97 && hz <= this.maxHz * 1.03;
    this.followRoom(pitched, hopMs * PITCH_EVERY_HOPS);
    if (!pitched) {
      this.current = null;
      this.run = null;
      return null;
    }
    const midiExact = hzToMidi(hz, this.a4Hz);
    const midi = Math.round(midiExact);
    this.current = { midi, cents: (midiExact - midi) * 100, hz };

    // A reading belongs to the note after the latest attack only once most of its window is past that attack.
    if (endMs - ((windowSize / 2) * 1000) / this.sampleRate < this.lastOnsetMs) return null;
    const run = this.run;
    if (run && Math.abs(midiExact - run.sumMidi / run.frames) * 100 <= STABLE_CENTS) {
      run.sumMidi += midiExact;
      run.sumClarity += clarity;
      run.frames++;
      if (run.frames >= RINGING_FRAMES) this.heldHz = midiToHz(run.sumMidi / run.frames, this.a4Hz);
    } else {
      this.run = { firstMs: endMs, sumMidi: midiExact, sumClarity: clarity, frames: 1 };
      return null;
    }
    if (!this.armed || endMs - run.firstMs < STABLE_MS) return null;
    this.armed = false;
    const mean = run.sumMidi / run.frames;
    const note = Math.round(mean);
    // Without a detected attack (a soft start, a slur), the note began about when its first window was half full.
    const windowMs = (windowSize * 1000) / this.sampleRate;
    const startedMs = run.firstMs - windowMs / 2;
    const attack = this.lastOnsetMs <= startedMs && startedMs - this.lastOnsetMs <= windowMs * 2 ? this.lastOnsetMs : startedMs;
    return {
      midi: note,
      hz: midiToHz(mean, this.a4Hz),
      cents: (mean - note) * 100,
      onsetMs: attack,
      countedMs: endMs,
      clarity: run.sumClarity / run.frames,
    };
  }

  /** The first sample of the hop (or the one before) whose change stands out from what came before: the attack. */
  private onsetTime(frame: Float32Array, hopStart: number, before: number): number {
    const from = Math.max(1, hopStart - this.hopSize);
    let peak = 0;
    for (let i = from; i < frame.length; i++) peak = Math.max(peak, Math.abs(frame[i]! - frame[i - 1]!));
    const threshold = Math.max(3 * before, 0.25 * peak);
    let at = hopStart;
    for (let i = from; i < frame.length; i++) {
      if (Math.abs(frame[i]! - frame[i - 1]!) > threshold) {
        at = i;
        break;
      }
    }
    return this.msAt(this.samples - (frame.length - at));
  }

  /**
   * The room's noise floor drops to any quieter reading at once and rises slowly (about 3 dB a second) through
   * unpitched sound only, so notes played one after another never become "the room" and raise the gate over them.
   */
  private followRoom(pitched: boolean, ms: number): void {
    if (this.level < this.noiseFloor) this.noiseFloor = this.level;
    else if (!pitched) this.noiseFloor *= ROOM_RISE_PER_MS ** ms;
  }

  /**
   * Subtracts the window delayed by one period of the string still ringing (a comb with zeros at all its harmonics),
   * leaving the newly plucked note. False when little is left: the new attack was that same note.
   */
  private cancelRinging(): boolean {
    const { history, cancelled, windowSize } = this;
    const delay = this.sampleRate / this.ringingHz;
    const whole = Math.floor(delay);
    const part = delay - whole;
    const offset = history.length - windowSize;
    let before = 0;
    let after = 0;
    for (let i = 0; i < windowSize; i++) {
      const at = offset + i;
      // Linear interpolation between the two samples around the fractional period.
      const y = history[at]! - ((1 - part) * history[at - whole]! + part * history[at - whole - 1]!);
      cancelled[i] = y;
      before += history[at]! * history[at]!;
      after += y * y;
    }
    // A comb doubles uncorrelated energy on average, so the share left of a new note is measured against twice the input.
    return after > NEW_NOTE_SHARE * 2 * before;
  }

  /** Energy at one frequency over the Hann-windowed buffer (a single DFT bin at any frequency). */
  private power(buffer: Float32Array, hz: number): number {
    // Goertzel's recurrence: one multiply-add per sample, no trigonometry in the loop.
    const coeff = 2 * Math.cos((2 * Math.PI * hz) / this.sampleRate);
    let s1 = 0;
    let s2 = 0;
    for (let i = 0; i < buffer.length; i++) {
      const s = buffer[i]! * this.hann[i]! + coeff * s1 - s2;
      s2 = s1;
      s1 = s;
    }
    return s1 * s1 + s2 * s2 - coeff * s1 * s2;
  }

  /** How alike the buffer is to itself `lag` samples (fractional) earlier, over the same stretch for every lag: −1..1. */
  private likeness(buffer: Float32Array, lag: number, from: number): number {
    const whole = Math.floor(lag);
    const part = lag - whole;
    let cross = 0;
    let energy = 0;
    for (let i = from; i < buffer.length; i++) {
      const earlier = (1 - part) * buffer[i - whole]! + part * buffer[i - whole - 1]!;
      cross += buffer[i]! * earlier;
      energy += buffer[i]! * buffer[i]! + earlier * earlier;
    }
    return energy === 0 ? 0 : (2 * cross) / energy;
  }

  /**
   * Guitar strings can have a weak fundamental (the method then finds the 2nd harmonic's period: an octave too high)
   * or, rarely, a period twice the true one. A sound whose true period is twice the one found repeats clearly better
   * after two periods than after one; a sound whose odd multiples of f are missing is really at 2f.
   */
  private guardOctave(buffer: Float32Array, hz: number): number {
    const period = this.sampleRate / hz;
    if (hz / 2 >= this.minHz * 0.97 && 2 * period + 1 < buffer.length / 2) {
      const from = Math.ceil(2 * period) + 1;
      if (this.likeness(buffer, 2 * period, from) - this.likeness(buffer, period, from) > SUB_OCTAVE_GAIN) return hz / 2;
    }
    const nyquist = this.sampleRate / 2;
    if (2 * hz <= this.maxHz * 1.03 && 4 * hz < nyquist) {
      const power = (f: number) => this.power(buffer, f);
      const odd = power(hz) + (3 * hz < nyquist ? power(3 * hz) : 0);
      const even = power(2 * hz) + power(4 * hz);
      if (odd < UP_OCTAVE_RATIO * even) return hz * 2;
    }
    return hz;
  }
}
