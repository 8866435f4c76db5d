// Sound: a plucked string for a sounding pitch, only after a gesture, never louder than the cap.
// Tone.js is imported on the first play, so pages that never sound a note never download it.
import { midiFrequency } from "~/music/pitch";

export const DEFAULT_VOLUME_DB = -12;
/** Hard ceiling for the whole app: keeps a class full of headphones at a moderate level. */
export const MAX_VOLUME_DB = -6;
export const MIN_VOLUME_DB = -40;

export interface SoundPrefs {
  volumeDb: number;
  muted: boolean;
  /**
   * A pad in a live round sounds its taps only when its player asked for it (headphones): thirty phones
   * playing at once drown the stage, which sounds each note at the reveal.
   */
  padSound: boolean;
}

const STORAGE_KEY = "fretcall-sound";
export const DEFAULT_PREFS: SoundPrefs = { volumeDb: DEFAULT_VOLUME_DB, muted: false, padSound: false };

export function clampVolume(db: number): number {
  if (!Number.isFinite(db)) return DEFAULT_VOLUME_DB;
  return Math.min(MAX_VOLUME_DB, Math.max(MIN_VOLUME_DB, Math.round(db)));
}

/** Reads stored preferences, tolerating anything a browser may hold; a stored volume above the cap is cut to it. */
export function parseSoundPrefs(raw: string | null): SoundPrefs {
  if (!raw) return DEFAULT_PREFS;
  try {
    const value: unknown = JSON.parse(raw);
    if (typeof value !== "object" || value === null) return DEFAULT_PREFS;
    const { volumeDb, muted, padSound } = value as Record<string, unknown>;
    return {
      volumeDb: typeof volumeDb === "number" ? clampVolume(volumeDb) : DEFAULT_VOLUME_DB,
      muted: muted === true,
      padSound: padSound === true,
    };
  } catch {
    return DEFAULT_PREFS;
  }
}

/**
 * Karplus–Strong plucked string (Karplus & Strong 1983) with Jaffe & Smith's all-pass fine tuning (1983): a burst
 * of noise circulates in a delay line one period long and a two-point average softens it each pass, as a real
 * string loses its high partials first. Computed here rather than with Tone.PluckSynth, whose comb filter runs in
 * an AudioWorklet loaded from a blob: URL that the production Content-Security-Policy rightly refuses.
 */
export function pluckSamples(
  frequency: number,
  sampleRate: number,
  seconds = 1.8,
  random: () => number = Math.random,
): Float32Array {
  const period = sampleRate / frequency;
  // The average delays by half a sample; the all-pass supplies the fraction d ∈ [0.1, 1.1) that is left.
  const length = Math.max(2, Math.floor(period - 0.6));
  const d = period - 0.5 - length;
  const c = (1 - d) / (1 + d);
  // Per-period loss so low and high strings ring for a similar time (about 1.5 s to −60 dB).
  const loss = 10 ** (-3 / (1.5 * frequency));

  const line = new Float32Array(length);
  let mean = 0;
  for (let i = 0; i < length; i++) mean += line[i] = random() * 2 - 1;
  mean /= length;
  for (let i = 0; i < length; i++) line[i]! -= mean;

  const out = new Float32Array(Math.round(seconds * sampleRate));
  let index = 0;
  let previous = 0;
  let apIn = 0;
  let apOut = 0;
  let peak = 0;
  for (let n = 0; n < out.length; n++) {
    const sample = line[index]!;
    out[n] = sample;
    peak = Math.max(peak, Math.abs(sample));
    const averaged = loss * 0.5 * (sample + previous);
    previous = sample;
    apOut = c * averaged + apIn - c * apOut;
    apIn = averaged;
    line[index] = apOut;
    index = (index + 1) % length;
  }
  // Normalise, and fade the last 30 ms so the end never clicks.
  const fade = Math.min(out.length, Math.round(0.03 * sampleRate));
  for (let n = 0; n < out.length; n++) {
    const tail = out.length - n;
    out[n] = (out[n]! / (peak || 1)) * 0.8 * (tail < fade ? tail / fade : 1);
  }
  return out;
}

// ---- preferences store, shared by every SoundControl and player on the page ----

let prefs: SoundPrefs = DEFAULT_PREFS;
let loaded = false;
const listeners = new Set<() => void>();

export function getSoundPrefs(): SoundPrefs {
  if (!loaded && typeof localStorage !== "undefined") {
    loaded = true;
    prefs = parseSoundPrefs(localStorage.getItem(STORAGE_KEY));
  }
  return prefs;
}

export function setSoundPrefs(change: Partial<SoundPrefs>): void {
  const current = getSoundPrefs();
  prefs = { volumeDb: clampVolume(change.volumeDb ?? current.volumeDb), muted: change.muted ?? current.muted, padSound: change.padSound ?? current.padSound };
  try {
    localStorage.setItem(STORAGE_KEY, JSON.stringify(prefs));
  } catch {
    // Private browsing may refuse storage; the setting still holds for this page.
  }
  void engine?.then((e) => e.apply(prefs));
  listeners.forEach((fn) => fn());
}

export function subscribeSoundPrefs(fn: () => void): () => void {
  listeners.add(fn);
  return () => listeners.delete(fn);
}

// ---- playback ----

type ToneModule = typeof import("tone");
interface Engine {
  apply(p: SoundPrefs): void;
  play(midi: number): void;
}
let engine: Promise<Engine> | null = null;
let unlocked: AudioContext | null = null;

async function startEngine(context: AudioContext): Promise<Engine> {
  const Tone: ToneModule = await import("tone");
  // Play through the context the gesture resumed; the one Tone made on import is never needed.
  Tone.setContext(context, true);
  await Tone.start();
  const buffers = new Map<number, InstanceType<ToneModule["ToneAudioBuffer"]>>();
  const destination = Tone.getDestination();
  const apply = (p: SoundPrefs) => {
    destination.volume.value = clampVolume(p.volumeDb);
    destination.mute = p.muted;
  };
  apply(getSoundPrefs());
  return {
    apply,
    play(midi) {
      let buffer = buffers.get(midi);
      if (!buffer) {
        buffer = Tone.ToneAudioBuffer.fromArray(pluckSamples(midiFrequency(midi), context.sampleRate));
        buffers.set(midi, buffer);
      }
      const source = new Tone.ToneBufferSource(buffer).connect(destination);
      source.onended = () => source.dispose();
      source.start();
    },
  };
}

/**
 * Creates and resumes the audio context; call it from a click or key handler. A page whose sound comes without a
 * gesture of its own (the stage's reveal) calls this on the teacher's clicks, then plays once soundUnlocked().
 */
export function unlockSound(): AudioContext | null {
  if (typeof AudioContext === "undefined") return null;
  unlocked ??= new AudioContext();
  void unlocked.resume();
  // Returned for anything else that sounds (the rhythm pass's click), so Tone.js keeps to this one context.
  return unlocked;
}

export const soundUnlocked = (): boolean => unlocked?.state === "running";

/**
 * Plays a sounding MIDI pitch. Call it from a click or key handler: the audio context is created and resumed
 * right there, inside the gesture, because Safari refuses audio that starts after an await.
 */
export function playSounding(midi: number): Promise<void> {
  const context = getSoundPrefs().muted ? null : unlockSound();
  if (!context) return Promise.resolve();
  // A failed start (say, the chunk could not load offline) is forgotten so the next tap tries again.
  engine ??= startEngine(context).catch((error: unknown) => {
    engine = null;
    throw error;
  });
  return engine.then((e) => e.play(midi));
}
