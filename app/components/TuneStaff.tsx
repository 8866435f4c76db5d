// A whole tune engraved as a printed melody, in systems as wide as the page; the engraver loads on first use and
// draws again when the width changes. The words are there from the start for screen readers and if drawing fails.
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import { barsBetween, barsSoFar, engraveTune, tuneWords, type EngraveInput } from "~/tunes/engraving";

export interface TuneStaffProps {
  tune: EngraveInput;
  /** Index of the tune note being asked (Tune walk, rhythm pass): marked in colour and with a band and pointer. */
  asked?: number | null;
  /** Only bars from…to (1-based, inclusive); the whole tune when left out. */
  from?: number;
  to?: number;
  /** End just after the asked note, the tune's last note given (a Tune walk's melody so far on the stage). */
  soFar?: boolean;
  /** CSS pixels per VexFlow unit (10 units to a staff space); 1 is about a printed part's size. */
  scale?: number;
  /** Width to lay out for, in CSS pixels, when the staff is drawn before it is in the page; else its own width. */
  width?: number;
  className?: string;
}

/** A ref to give an element, and its content width, followed as it changes (0 until it is in the page). */
export function useWidth(): [(element: HTMLElement | null) => void, number] {
  const [node, setNode] = useState<HTMLElement | null>(null);
  const [width, setWidth] = useState(0);
  useEffect(() => {
    if (!node) return;
    const observer = new ResizeObserver(([entry]) => setWidth(Math.round(entry!.contentRect.width)));
    observer.observe(node);
    return () => observer.disconnect();
  }, [node]);
  return [setNode, width];
}

export function TuneStaff({ tune, asked = null, from = 1, to = Infinity, soFar = false, scale = 1, width: given, className = "" }: TuneStaffProps) {
  const host = useRef<HTMLDivElement>(null);
  const [state, setState] = useState<"loading" | "drawn" | "failed">("loading");
  const engraved = useMemo(() => engraveTune(tune), [tune]);
  const bars = useMemo(() => (soFar && asked !== null ? barsSoFar(engraved, from, asked) : barsBetween(engraved, from, to)), [engraved, soFar, asked, from, to]);
  const words = useMemo(() => tuneWords(bars), [bars]);
  // Systems wrap to the width, so a new width (a turned phone, a resized window) means a new layout.
  const [observe, own] = useWidth();
  const hostRef = useCallback(
    (element: HTMLDivElement | null) => {
      host.current = element;
      observe(element);
    },
    [observe],
  );
  const width = given ?? own;

  useEffect(() => {
    if (width === 0) return;
    let current = true;
    import("./tuneRender")
      .then(({ drawTune }) => (current && host.current ? drawTune(host.current, bars, { asked, scale, width }) : undefined))
      .then(() => current && setState("drawn"))
      .catch(() => current && setState("failed"));
    return () => {
      current = false;
    };
  }, [bars, asked, scale, width]);

  return (
    <figure role="img" aria-label={words} className={`w-full min-w-0 ${className}`} data-testid="tune-staff">
      <div ref={hostRef} aria-hidden="true" className={`w-full ${state === "drawn" ? "" : "h-0 overflow-hidden"}`} />
      {state === "drawn" ? null : (
        <p aria-hidden="true" className="flex min-h-32 items-center justify-center text-center text-sm text-ink-soft">
          {state === "failed" ? `Could not draw the score. ${words}` : "Engraving the score…"}
        </p>
      )}
    </figure>
  );
}
