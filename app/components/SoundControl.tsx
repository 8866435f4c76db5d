// Visible mute and a capped volume slider, with the headphone caution beside them.
import { useId, useSyncExternalStore } from "react";
import {
  DEFAULT_PREFS,
  getSoundPrefs,
  MAX_VOLUME_DB,
  MIN_VOLUME_DB,
  setSoundPrefs,
  subscribeSoundPrefs,
  type SoundPrefs,
} from "./sound";

/** The current sound settings; the server render uses the defaults, the browser its stored choice. */
export function useSoundPrefs(): SoundPrefs {
  return useSyncExternalStore(subscribeSoundPrefs, getSoundPrefs, () => DEFAULT_PREFS);
}

function SpeakerIcon({ muted }: { muted: boolean }) {
  return (
    <svg
      viewBox="0 0 24 24"
      width="22"
      height="22"
      aria-hidden="true"
      fill="none"
      stroke="currentColor"
      strokeWidth="2"
      strokeLinecap="round"
      strokeLinejoin="round"
    >
      <path d="M4 9h4l5-4v14l-5-4H4z" fill="currentColor" />
      {muted ? <path d="M16 9l5 6M21 9l-5 6" /> : <path d="M16.5 8.5a5 5 0 0 1 0 7M19 6a8.5 8.5 0 0 1 0 12" />}
    </svg>
  );
}

/** `compact` keeps only the mute button, for a bar that has no room; the full control sits elsewhere on the page. */
export function SoundControl({ className = "", compact = false }: { className?: string; compact?: boolean }) {
  const { volumeDb, muted } = useSoundPrefs();
  return (
    <div className={`flex flex-wrap items-center gap-x-4 gap-y-2 ${className}`}>
      <button
        type="button"
        aria-pressed={muted}
        onClick={() => setSoundPrefs({ muted: !muted })}
        className={`inline-flex min-h-11 items-center gap-2 rounded-2xl border-2 px-4 font-medium ${muted ? "border-brick text-brick" : "border-ink/20 text-ink"}`}
      >
        <SpeakerIcon muted={muted} />
        {muted ? "Sound off" : "Sound on"}
      </button>
      {compact ? null : <Volume volumeDb={volumeDb} disabled={muted} />}
    </div>
  );
}

/** The capped volume slider with the headphone caution beside it. */
function Volume({ volumeDb, disabled }: { volumeDb: number; disabled: boolean }) {
  const id = useId();
  return (
    <>
      <label htmlFor={id} className="flex min-h-11 items-center gap-2">
        Volume
        <input
          id={id}
          type="range"
          min={MIN_VOLUME_DB}
          max={MAX_VOLUME_DB}
          step={1}
          value={volumeDb}
          disabled={disabled}
          aria-valuetext={`${volumeDb} decibels${volumeDb === MAX_VOLUME_DB ? ", the highest allowed" : ""}`}
          onChange={(e) => setSoundPrefs({ volumeDb: Number(e.target.value) })}
          className="w-32 accent-teal disabled:opacity-50"
        />
        <output htmlFor={id} className="w-16 tabular-nums text-ink-soft">
          {String(volumeDb).replace("-", "−")} dB
        </output>
      </label>
      <p className="text-sm text-ink-soft">Keep headphone volume moderate.</p>
    </>
  );
}

/**
 * The pad's sound in a live round: off until the player turns it on (for headphones), remembered on this
 * device; the class hears each note from the stage.
 */
export function PadSoundControl() {
  const { volumeDb, padSound } = useSoundPrefs();
  return (
    <div className="flex flex-wrap items-center gap-x-4 gap-y-2">
      <button
        type="button"
        aria-pressed={padSound}
        // Turning it on means the player wants to hear it, whatever was muted elsewhere.
        onClick={() => setSoundPrefs(padSound ? { padSound: false } : { padSound: true, muted: false })}
        className={`inline-flex min-h-12 items-center gap-2 rounded-2xl border-2 px-4 text-lg font-medium ${padSound ? "border-teal bg-teal/10" : "border-ink/20"}`}
      >
        <SpeakerIcon muted={!padSound} />
        {padSound ? "Sound on (headphones)" : "Sound off"}
      </button>
      {padSound ? (
        <Volume volumeDb={volumeDb} disabled={false} />
      ) : (
        <p className="text-sm text-ink-soft">The class screen plays each note. Turn sound on to hear your taps in headphones.</p>
      )}
    </div>
  );
}
