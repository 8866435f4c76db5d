// A treble staff with written notes. The engraving loads on first use; the words are there from the start.
import { useEffect, useMemo, useRef, useState } from "react";
import type { PrintedAccidental } from "~/music/keys";
import { toPitch, type Pitch } from "~/music/pitch";
import { accidentalFor, staffWords } from "./staffText";

export type StaffSize = "stage" | "reveal" | "card" | "phone";

/**
 * Heights, so the placeholder and the drawing take the same room. The stage's prompt fills well over a third of
 * the screen so it reads from the back row; at the reveal it shrinks to leave room for the neck.
 */
const SIZE_CLASS: Record<StaffSize, string> = {
  stage: "h-[58vh] min-h-56",
  reveal: "h-[26vh] min-h-40",
  card: "h-40",
  phone: "h-28",
};

export interface StaffNoteSpec {
  written: string | Pitch;
  /** The sign to print, exactly as given; null prints none; left out, the key signature decides. */
  accidental?: PrintedAccidental | null;
}

export interface StaffProps {
  notes: StaffNoteSpec[];
  keyFifths?: number;
  /** Guitar music's treble clef with a small 8 below; false for a plain treble clef (concert pitch). */
  octaveClef?: boolean;
  size?: StaffSize;
  className?: string;
}

export function Staff({ notes, keyFifths = 0, octaveClef = true, size = "card", className = "" }: StaffProps) {
  const host = useRef<HTMLDivElement>(null);
  const [drawn, setDrawn] = useState(false);
  const [failed, setFailed] = useState(false);
  const drawing = useMemo(() => {
    const resolved = notes.map((n) => {
      const pitch = toPitch(n.written);
      return { pitch, printed: n.accidental === undefined ? accidentalFor(pitch, keyFifths) : n.accidental };
    });
    return { notes: resolved, fifths: keyFifths, octaveClef };
    // Callers build `notes` inline, so its content, not its identity, decides when to redraw.
  }, [JSON.stringify(notes), keyFifths, octaveClef]);
  const words = staffWords(drawing.notes, drawing.fifths, drawing.octaveClef);

  useEffect(() => {
    let current = true;
    import("./staffRender")
      .then(({ drawStaff }) => (current && host.current ? drawStaff(host.current, drawing) : undefined))
      .then(() => current && setDrawn(true))
      .catch(() => current && setFailed(true));
    return () => {
      current = false;
    };
  }, [drawing]);

  return (
    <figure
      role="img"
      aria-label={words}
      className={`relative flex items-center justify-center ${SIZE_CLASS[size]} ${className}`}
    >
      <div
        ref={host}
        aria-hidden="true"
        className={`flex h-full items-center justify-center ${drawn && !failed ? "" : "hidden"}`}
      />
      {drawn && !failed ? null : <StaffPlaceholder words={words} failed={failed} />}
    </figure>
  );
}

/** Five plain lines with the notes in words: cheap to show while the engraver loads, and readable if it fails. */
function StaffPlaceholder({ words, failed }: { words: string; failed: boolean }) {
  return (
    <div aria-hidden="true" className="flex h-full w-full max-w-md flex-col items-center justify-center gap-2">
      <svg viewBox="0 0 200 50" preserveAspectRatio="none" className="h-1/2 w-full">
        {[5, 15, 25, 35, 45].map((y) => (
          <line
            key={y}
            x1="0"
            x2="200"
            y1={y}
            y2={y}
            className="stroke-ink/30"
            strokeWidth="1"
            vectorEffect="non-scaling-stroke"
          />
        ))}
      </svg>
      <p className="text-center text-sm text-ink-soft">{failed ? `Could not draw the staff. ${words}` : words}</p>
    </div>
  );
}
