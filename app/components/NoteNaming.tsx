// Note names the way the class says them: the school's naming, unless this device chose its own.
import { useId, useSyncExternalStore } from "react";
import { useRouteLoaderData } from "react-router";
import { DEFAULT_NAMING, isNoteNaming, NOTE_NAMING_LABELS, NOTE_NAMINGS, noteName, type NoteNaming } from "~/music/naming";
import { parsePitch, type Pitch } from "~/music/pitch";
import type { loader as rootLoader } from "~/root";

export const NAMING_KEY = "fretcall-note-naming";

const listeners = new Set<() => void>();
/** This device's own choice, if it made one (the live pad sends it with each answer, for its feedback). */
export function deviceNaming(): NoteNaming | null {
  try {
    const stored = localStorage.getItem(NAMING_KEY);
    return isNoteNaming(stored) ? stored : null;
  } catch {
    return null;
  }
}
function subscribe(fn: () => void): () => void {
  listeners.add(fn);
  window.addEventListener("storage", fn);
  return () => {
    listeners.delete(fn);
    window.removeEventListener("storage", fn);
  };
}
function chooseDeviceNaming(naming: NoteNaming | null): void {
  try {
    if (naming) localStorage.setItem(NAMING_KEY, naming);
    else localStorage.removeItem(NAMING_KEY);
  } catch {
    // Storage refused (private browsing): nothing to keep, the school's naming stays.
  }
  listeners.forEach((fn) => fn());
}

/** The school's naming, as the server rendered the page with it. */
export function useSchoolNaming(): NoteNaming {
  return useRouteLoaderData<typeof rootLoader>("root")?.naming ?? DEFAULT_NAMING;
}

/**
 * The naming for this screen: the device's own choice once hydrated, else the school's. The server
 * render and hydration both use the school's (the server snapshot), so they agree.
 */
export function useNoteNaming(): NoteNaming {
  const school = useSchoolNaming();
  return useSyncExternalStore(subscribe, deviceNaming, () => null) ?? school;
}

/** A namer for written notes ("G4" or a Pitch) in this screen's naming. */
export function useNoteNamer(): (written: string | Pitch, options?: { octave?: boolean }) => string {
  const naming = useNoteNaming();
  return (written, options) => noteName(typeof written === "string" ? parsePitch(written) : written, naming, options);
}

/** The device's choice, beside the sound and left-handed settings. */
export function NoteNamingChoice({ className = "" }: { className?: string }) {
  const school = useSchoolNaming();
  const device = useSyncExternalStore(subscribe, deviceNaming, () => null);
  const id = useId();
  return (
    <label htmlFor={id} className={`flex min-h-11 flex-wrap items-center gap-2 ${className}`}>
      Note names on this device
      <select
        id={id}
        value={device ?? ""}
        onChange={(e) => chooseDeviceNaming(isNoteNaming(e.target.value) ? e.target.value : null)}
        className="min-h-11 max-w-full rounded-xl border-2 border-ink/20 bg-white px-2"
      >
        <option value="">The school's: {NOTE_NAMING_LABELS[school].split(":")[0]}</option>
        {NOTE_NAMINGS.map((n) => (
          <option key={n} value={n}>
            {NOTE_NAMING_LABELS[n]}
          </option>
        ))}
      </select>
    </label>
  );
}
