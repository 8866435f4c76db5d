// What every page that listens shows: the privacy promise before asking, a visible listening indicator with a
// level meter and a stop button, and what to do when the microphone is refused or missing.
import { Icon } from "~/components/Icon";
import { Button, Notice } from "~/components/ui";
import type { Listening, ListeningStatus } from "./useListening";

export const PRIVACY_WORDS = "Fretcall listens on this device only: the sound is analysed here and never sent or stored.";

// RMS of a loud pluck near the phone is about 0.3; a square root spreads quiet and loud over the bar.
function meterPercent(level: number): number {
  return Math.round(Math.min(1, Math.sqrt(level / 0.3)) * 100);
}

export function ListeningMeter({ listening, startLabel = "Start listening" }: { listening: Listening; startLabel?: string }) {
  if (listening.status === "listening") {
    return (
      <div className="flex flex-wrap items-center gap-3 rounded-2xl border-2 border-teal bg-teal/10 p-3">
        <span className="flex items-center gap-2 font-medium" role="status">
          <span className="text-teal">
            <Icon name="dot" className="h-5 w-5 motion-safe:animate-pulse" />
          </span>
          Listening
        </span>
        <span className="flex-1">
          <span
            role="meter"
            aria-label="Sound level"
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={meterPercent(listening.level)}
            className="block h-3 w-full min-w-24 overflow-hidden rounded-full bg-ink/10"
          >
            <span className="block h-full bg-ink" style={{ width: `${meterPercent(listening.level)}%` }} />
          </span>
        </span>
        <Button tone="ghost" onClick={listening.stop}>
          <Icon name="stop" /> Stop listening
        </Button>
      </div>
    );
  }
  return (
    <div className="space-y-2">
      <p className="flex items-start gap-2 text-ink-soft">
        <Icon name="lock" className="mt-1 h-4 w-4" />
        {PRIVACY_WORDS}
      </p>
      <Button tone="ink" onClick={() => void listening.start()} disabled={listening.status === "asking"}>
        <Icon name="play" /> {listening.status === "asking" ? "Waiting for the microphone…" : startLabel}
      </Button>
    </div>
  );
}

/** Why listening stopped or never started, and what to do about it; nothing while all is well. */
export function ListeningHelp({ status }: { status: ListeningStatus }) {
  if (status === "denied") {
    return (
      <Notice tone="error">
        The microphone is blocked for this site. Open the site settings (the icon beside the address, or your browser's settings → Site
        settings → Microphone), allow the microphone, then press Start listening again. You can also answer by tapping instead.
      </Notice>
    );
  }
  if (status === "missing") {
    return (
      <Notice tone="error">
        No microphone was found, or this browser cannot listen. Plug one in or try another browser, or answer by tapping instead.
      </Notice>
    );
  }
  if (status === "failed") {
    return <Notice tone="error">The microphone could not start. Close other apps that use it and try again, or answer by tapping instead.</Notice>;
  }
  return null;
}
