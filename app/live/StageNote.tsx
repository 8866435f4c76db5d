// How the stage shows a prompt's note: kept off the page until its show time, and in a Tune walk the
// melody so far, engraved as written.
import { useLayoutEffect, useMemo, useRef, useState } from "react";
import { createPortal } from "react-dom";
import { TuneStaff } from "~/components/TuneStaff";
import type { Melody } from "~/game/messages";

/**
 * What must not be on the page before `at` (local time; null: not now, as in a paused prompt). It is
 * rendered ahead into a node outside the document — the staff drawn, yet nowhere in the page or its
 * accessibility tree — and a timer moves that node in at `at` exactly, without waiting for a render.
 * It covers what lies beneath it (the empty staff) once it is in.
 */
export function OffScreenUntil({ at, children }: { at: number | null; children: React.ReactNode }) {
  const slot = useRef<HTMLDivElement>(null);
  const [box] = useState(() => {
    const node = document.createElement("div");
    node.className = "flex h-full w-full items-center justify-center";
    return node;
  });
  useLayoutEffect(() => {
    const show = () => void slot.current?.appendChild(box);
    box.remove();
    if (at === null) return;
    if (at <= Date.now()) return show();
    const t = window.setTimeout(show, at - Date.now());
    return () => window.clearTimeout(t);
  }, [at, box]);
  return (
    <>
      <div ref={slot} className="absolute inset-0 rounded-3xl bg-white px-4 empty:hidden" />
      {createPortal(children, box)}
    </>
  );
}

/** Bars of a Tune walk's melody drawn on the stage: the asked note's and those before it, two systems at most on a 1366×768 projector. */
const MELODY_BARS = { prompt: 4, reveal: 2 } as const;
/** CSS pixels to a VexFlow unit: a staff space of 15 px reads from the back row; the reveal leaves room for the neck. */
const MELODY_SCALE = { prompt: 1.5, reveal: 1 } as const;

/** A Tune walk's melody so far, engraved as written, the asked note (its last) marked; no later note is ever sent. */
export function MelodySoFar({ melody, reveal, width }: { melody: Melody; reveal: boolean; width: number }) {
  const view = reveal ? "reveal" : "prompt";
  const asked = melody.notes.length - 1;
  const from = Math.max(melody.from, (melody.notes[asked]?.bar ?? 1) - MELODY_BARS[view] + 1);
  const tune = useMemo(() => ({ ...melody, score: melody.measures && { measures: melody.measures } }), [melody]);
  return <TuneStaff tune={tune} asked={asked} soFar from={from} scale={MELODY_SCALE[view]} width={width} className="py-2" />;
}
