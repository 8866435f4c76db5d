// The rhythm pass's count-in and click, with Tone.js loaded on first use. It plays on the page's one audio
// context (unlockSound from the sound component, called inside the student's tap) and keeps to the same volume
// cap and mute as every other sound in the app.
import { clampVolume, getSoundPrefs, subscribeSoundPrefs } from "~/components/sound";

export interface ClickRun {
  /** performance.now() time at which the first click is heard: taps are measured from here. */
  startPerfMs: number;
  stop(): void;
}

const LEAD_MS = 400;
// A short high tick, brighter on the bar line, in the range a phone speaker plays well.
const TICK_HZ = 1320;
const ACCENT_HZ = 1760;
/** The click's pitches, so that listening can tell the click heard back from a note played. */
export const CLICK_HZ = [TICK_HZ, ACCENT_HZ] as const;

/**
 * Schedules every click ahead on the audio clock, so the beat stays steady however busy the page is. Without
 * an audio context (no Web Audio, or sound off) the run still starts: the page shows the beat instead.
 */
export async function startClickTrack(context: AudioContext | null, clicks: readonly { at: number; accent: boolean }[]): Promise<ClickRun> {
  const prefs = getSoundPrefs();
  if (!context || prefs.muted) return { startPerfMs: performance.now() + LEAD_MS, stop() {} };
  const Tone = await import("tone");
  // Our own wrapper of the shared context: Tone's global context stays the one the note player set.
  const tone = new Tone.Context(context);
  const volume = new Tone.Volume({ context: tone, volume: clampVolume(prefs.volumeDb) }).connect(tone.destination);
  const unsubscribe = subscribeSoundPrefs(() => {
    const p = getSoundPrefs();
    volume.volume.value = clampVolume(p.volumeDb);
    volume.mute = p.muted;
  });
  const synth = (hz: number) => ({
    hz,
    voice: new Tone.Synth({ context: tone, oscillator: { type: "triangle" }, envelope: { attack: 0.001, decay: 0.05, sustain: 0, release: 0.02 } }).connect(volume),
  });
  const tick = synth(TICK_HZ);
  const accent = synth(ACCENT_HZ);
  const audioNow = context.currentTime;
  const perfNow = performance.now();
  const first = audioNow + LEAD_MS / 1000;
  for (const c of clicks) (c.accent ? accent : tick).voice.triggerAttackRelease(c.accent ? accent.hz : tick.hz, 0.04, first + c.at / 1000);
  // What the ear hears lags the audio clock by the output path (speaker, Bluetooth): measure taps from the sound.
  const latencyMs = ((context.outputLatency || 0) + (context.baseLatency || 0)) * 1000;
  return {
    startPerfMs: perfNow + LEAD_MS + latencyMs,
    stop() {
      unsubscribe();
      tick.voice.dispose();
      accent.voice.dispose();
      volume.dispose();
    },
  };
}
