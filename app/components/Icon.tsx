// Line icons drawn as paths, so they look the same whatever fonts or emoji the device has: the shipped font
// (Fredoka) has no arrows, check marks, locks or emoji, and a phone's fallback for them varies.
const ICON_PATHS = {
  pause: "M8 5v14M16 5v14",
  skip: "M5 5l10 7-10 7zM19 5v14",
  lock: "M6 11h12v9H6zM8.5 11V8a3.5 3.5 0 0 1 7 0v3",
  unlock: "M6 11h12v9H6zM8.5 11V8a3.5 3.5 0 0 1 6.8-1.2",
  streak: "M12 3c.5 3.5 5 5.5 5 10.5a5 5 0 0 1-10 0c0-2.6 1.6-3.8 2-6 1.3 1 1.8 2.3 1.8 3.6C12 9.5 12.4 6.5 12 3z",
  fullscreen: "M4 9V4h5M20 9V4h-5M4 15v5h5M20 15v5h-5",
  mirror: "M12 3v18M8 7l-4 5 4 5M16 7l4 5-4 5",
  rest: "M7 11V6a1.5 1.5 0 0 1 3 0v4M10 10V4.5a1.5 1.5 0 0 1 3 0V10M13 10V5.5a1.5 1.5 0 0 1 3 0V11M16 11V8a1.5 1.5 0 0 1 3 0v5a7 7 0 0 1-7 7h-.5A6.5 6.5 0 0 1 6 16.5L4.3 13a1.5 1.5 0 0 1 2.7-1.4L7 11",
  menu: "M4 7h16M4 12h16M4 17h16",
  plus: "M12 5v14M5 12h14",
  play: "M7 5l12 7-12 7z",
  back: "M15 5l-7 7 7 7",
  stop: "M6 6h12v12H6z",
  dot: "M12 8.5a3.5 3.5 0 1 0 0 7 3.5 3.5 0 0 0 0-7z",
  check: "M5 12.5l4.5 4.5L19 7",
  cross: "M6 6l12 12M18 6L6 18",
  again: "M20 12a8 8 0 1 1-2.3-5.6M20 4v5h-5",
  download: "M12 4v11M7 10l5 5 5-5M5 20h14",
  warning: "M12 4L2.5 20h19zM12 10v4M12 17v.5",
  bolt: "M13 3L5 14h6l-1 7 8-11h-6z",
  flag: "M6 21V4M6 4h11l-2 4 2 4H6",
  grid: "M4 4h16v16H4zM4 9.3h16M4 14.7h16M9.3 4v16M14.7 4v16",
  notes: "M9 18V6l10-2v12M9 18a2.5 2.5 0 1 1-5 0 2.5 2.5 0 0 1 5 0zM19 16a2.5 2.5 0 1 1-5 0 2.5 2.5 0 0 1 5 0z",
  info: "M12 3a9 9 0 1 0 0 18 9 9 0 0 0 0-18zM12 11v6M12 7.5v.5",
  sortUp: "M7 14l5-6 5 6z",
  sortDown: "M7 10l5 6 5-6z",
  sortBoth: "M8 10l4-5 4 5zM8 14l4 5 4-5z",
  // The mistake kinds (MISTAKE_ICONS in app/music/mistakes.ts).
  otherSpot: "M12 4a8 8 0 1 0 0 16 8 8 0 0 0 0-16zM12 4v16",
  octave: "M8 20V4M4 8l4-4 4 4M16 4v16M12 16l4 4 4-4",
  sharp: "M10 4v16M15 3v16M6 10l13-3M5 17l13-3",
  natural: "M8 3v15l8-3M16 21V6l-8 3",
  halfStep: "M4 18h8v-8h8",
  stringOver: "M4 7h16M4 17h16M12 9v6M9.5 12.5L12 15l2.5-2.5",
  noAnswer: "M6 12h.01M12 12h.01M18 12h.01",
  // A microphone: an answer played on a guitar and heard by the phone.
  mic: "M12 3a3 3 0 0 0-3 3v6a3 3 0 0 0 6 0V6a3 3 0 0 0-3-3zM6 11a6 6 0 0 0 12 0M12 17v4M9 21h6",
  // A fingertip on glass: an answer tapped on the drawn neck.
  tap: "M10 13V5.5a1.5 1.5 0 0 1 3 0V11M13 11a1.5 1.5 0 0 1 3 0v1M16 12a1.5 1.5 0 0 1 3 0v3a6 6 0 0 1-6 6h-1a6 6 0 0 1-4.8-2.4L4.6 15a1.5 1.5 0 0 1 2.4-1.8L10 16",
} as const;

export type IconName = keyof typeof ICON_PATHS;

export function Icon({ name, className = "h-[1em] w-[1em]" }: { name: IconName; className?: string }) {
  return (
    <svg viewBox="0 0 24 24" aria-hidden="true" className={`inline-block shrink-0 ${className}`} fill="none" stroke="currentColor" strokeWidth={2.2} strokeLinecap="round" strokeLinejoin="round">
      <path d={ICON_PATHS[name]} />
    </svg>
  );
}
