import { motion, useReducedMotion } from "framer-motion";
import { useEffect, useState, useSyncExternalStore } from "react";
import type { ServerMessageOf } from "~/game/protocol";
import { TEAM_NAMES } from "~/game/standings";

// The stage and the pad take the icons from here with the rest of their parts.
export { MISTAKE_ICONS } from "~/music/mistakes";

const ICON_PATHS = {
  pause: "M8 5v14M16 5v14",
  skip: "M5 5l10 7-10 7zM19 5v14",
  lock: "M6 11h12v9H6zM8.5 11V8a3.5 3.5 0 0 1 7 0v3",
  unlock: "M6 11h12v9H6zM8.5 11V8a3.5 3.5 0 0 1 6.8-1.2",
  streak: "M12 3c.5 3.5 5 5.5 5 10.5a5 5 0 0 1-10 0c0-2.6 1.6-3.8 2-6 1.3 1 1.8 2.3 1.8 3.6C12 9.5 12.4 6.5 12 3z",
  fullscreen: "M4 9V4h5M20 9V4h-5M4 15v5h5M20 15v5h-5",
  mirror: "M12 3v18M8 7l-4 5 4 5M16 7l4 5-4 5",
  rest: "M7 11V6a1.5 1.5 0 0 1 3 0v4M10 10V4.5a1.5 1.5 0 0 1 3 0V10M13 10V5.5a1.5 1.5 0 0 1 3 0V11M16 11V8a1.5 1.5 0 0 1 3 0v5a7 7 0 0 1-7 7h-.5A6.5 6.5 0 0 1 6 16.5L4.3 13a1.5 1.5 0 0 1 2.7-1.4L7 11",
} as const;

/** Line icons drawn as paths, so they look the same whatever fonts or emoji the projector or phone has. */
export function Icon({ name, className = "h-[1em] w-[1em]" }: { name: keyof typeof ICON_PATHS; className?: string }) {
  return (
    <svg viewBox="0 0 24 24" aria-hidden="true" className={`inline-block shrink-0 ${className}`} fill="none" stroke="currentColor" strokeWidth={2.2} strokeLinecap="round" strokeLinejoin="round">
      <path d={ICON_PATHS[name]} />
    </svg>
  );
}

/** A media query's answer, false on the server; for layouts that CSS alone can't switch (the neck's cell size). */
export function useMedia(query: string) {
  return useSyncExternalStore(
    (change) => {
      const list = window.matchMedia(query);
      list.addEventListener("change", change);
      return () => list.removeEventListener("change", change);
    },
    () => window.matchMedia(query).matches,
    () => false,
  );
}

export function Offline() {
  return (
    <span className="rounded-full bg-ink/10 px-2 text-base text-ink-soft" title="offline">
      <span aria-hidden="true">⚠ </span>offline
    </span>
  );
}

/** The time on the local clock: ticking every `everyMs`, or held at `frozenAt` (a paused round). */
function useClock(everyMs: number, frozenAt: number | null) {
  const now = useNow(frozenAt === null ? everyMs : 0);
  return frozenAt ?? now;
}

/** Whole seconds left to answer, counting from when the note shows (local clock). */
export function SecondsLeft({ showAt, deadline, frozenAt }: { showAt: number; deadline: number; frozenAt: number | null }) {
  const now = useClock(200, frozenAt);
  const left = Math.ceil(Math.max(0, deadline - Math.max(now, showAt)) / 1000);
  return (
    <p className="font-display leading-none">
      <span className="text-7xl font-semibold tabular-nums">{left}</span> <span className="text-3xl">s left</span>
    </p>
  );
}

/** A bar that empties from the moment the note shows until the deadline (local clock). */
export function Countdown({ showAt, deadline, frozenAt }: { showAt: number; deadline: number; frozenAt: number | null }) {
  const now = useClock(100, frozenAt);
  const total = deadline - showAt;
  const left = Math.max(0, Math.min(total, deadline - now));
  const waiting = now < showAt;
  return (
    <div aria-hidden="true" className="h-5 overflow-hidden rounded-full bg-ink/10">
      <div className={`h-full ${waiting ? "bg-sky" : left / total < 0.25 ? "bg-brick" : "bg-brass"}`} style={{ width: waiting ? "100%" : `${(100 * left) / total}%` }} />
    </div>
  );
}

export function useNow(everyMs: number) {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    if (everyMs === 0) return;
    const t = window.setInterval(() => setNow(Date.now()), everyMs);
    return () => window.clearInterval(t);
  }, [everyMs]);
  return now;
}

/** Playing order as it was at the last standings: kept by the stage so the next standings can glide from it. */
export function usePreviousOrder(standings: ServerMessageOf<"standings"> | null) {
  const [seen, setSeen] = useState<{ current: ServerMessageOf<"standings"> | null; previous?: string[] }>({ current: null });
  // Between standings the room shows prompts (standings is null then); only a new table moves the order on.
  if (standings && standings !== seen.current) setSeen({ current: standings, previous: seen.current?.points.map((r) => r.playerId) });
  return seen.previous;
}

/**
 * Standings by points with the longest streaks beside them. Given the order of the last standings, rows first
 * stand as they were, then glide to their new places, so the class sees who moved up.
 */
export function StandingsBoard({
  standings,
  big = false,
  highlight,
  previousOrder,
  offline,
}: {
  standings: ServerMessageOf<"standings">;
  big?: boolean;
  highlight?: string;
  previousOrder?: string[];
  /** Players now offline, marked in the rows. */
  offline?: Set<string>;
}) {
  const reduce = useReducedMotion();
  const [settled, setSettled] = useState(!previousOrder);
  useEffect(() => {
    if (settled) return;
    const t = window.setTimeout(() => setSettled(true), reduce ? 0 : 900);
    return () => window.clearTimeout(t);
  }, [settled, reduce]);
  const before = (id: string) => {
    const i = previousOrder?.indexOf(id) ?? -1;
    return i === -1 ? Infinity : i;
  };
  const ordered = settled ? standings.points : [...standings.points].sort((a, b) => before(a.playerId) - before(b.playerId));
  const rows = big ? ordered.slice(0, 10) : ordered;
  const heading = `font-display font-semibold ${big ? "text-5xl" : "text-2xl"}`;
  return (
    <section className={`grid gap-6 ${big ? "lg:grid-cols-[2fr_1fr]" : ""}`}>
      <div>
        <h2 className={heading}>{standings.final ? "Final standings" : "Standings"}</h2>
        <ol className="mt-3 space-y-2">
          {rows.map((r) => (
            <motion.li
              key={r.playerId}
              layout={!reduce}
              transition={{ type: "spring", stiffness: 260, damping: 30 }}
              className={`flex items-center gap-4 rounded-2xl px-4 ${r.playerId === highlight ? "bg-brass/30 ring-2 ring-brass" : "bg-white"} ${big ? "py-1 text-4xl" : "py-2 text-lg"}`}
            >
              <span className={`font-display font-semibold text-ink-soft tabular-nums ${big ? "w-24 text-5xl" : "w-10"}`}>{r.rank}.</span>
              <span className="min-w-0 flex-1 truncate">
                {r.nickname}
                {r.playerId === highlight ? <span className="ml-2 text-base font-medium">(you)</span> : null}
                {offline?.has(r.playerId) ? <span className="ml-2"><Offline /></span> : null}
              </span>
              <span className={`font-display font-semibold tabular-nums ${big ? "text-6xl" : ""}`}>{r.points}</span>
            </motion.li>
          ))}
        </ol>
      </div>
      <div>
        {standings.teams.length > 0 ? (
          <>
            <h2 className={heading}>Teams</h2>
            <ol className="mt-3 space-y-2">
              {standings.teams.map((t) => (
                <li key={t.team} className={`flex items-center justify-between rounded-2xl bg-white px-4 py-2 ${big ? "text-3xl" : ""}`}>
                  <span>
                    <span aria-hidden="true">⚑ </span>
                    {t.name} ({t.members})
                  </span>
                  <strong className={`font-display tabular-nums ${big ? "text-5xl" : ""}`}>{t.points}</strong>
                </li>
              ))}
            </ol>
          </>
        ) : null}
        <h2 className={`${standings.teams.length > 0 ? "mt-4 " : ""}${heading}`}>Longest streaks</h2>
        <ol className="mt-3 space-y-2">
          {standings.streaks.slice(0, 5).map((s) => (
            <motion.li key={s.playerId} layout={!reduce} className={`flex items-center justify-between rounded-2xl bg-white px-4 py-2 ${big ? "text-3xl" : ""}`}>
              <span className="min-w-0 truncate">{s.nickname}</span>
              <span className={`flex items-center gap-1 font-display font-semibold tabular-nums ${big ? "text-5xl" : ""}`}>
                <Icon name="streak" className="h-[0.8em] w-[0.8em] text-brass" />
                {s.longestStreak}
                <span className="sr-only"> in a row</span>
              </span>
            </motion.li>
          ))}
        </ol>
      </div>
    </section>
  );
}

/** Full neck's own task, said the same way on stage and pad: every spot of the pitch, not its home spot. */
export function FindEvery({ spots }: { spots: number }) {
  return (
    <span>
      Find every spot of this note: <strong className="tabular-nums">{spots}</strong> on this neck
    </span>
  );
}

/** One shape per team, in the order of TEAM_NAMES, so a team is told by its mark and name, never by a colour. */
const TEAM_MARKS = [
  "M4 12a8 8 0 1 0 16 0a8 8 0 1 0-16 0",
  "M12 4l8 15H4z",
  "M5 5h14v14H5z",
  "M12 3l9 9-9 9-9-9z",
  "M3 12a9 9 0 1 0 18 0a9 9 0 1 0-18 0M8.5 12a3.5 3.5 0 1 0 7 0a3.5 3.5 0 1 0-7 0",
  "M12 3l2.6 6 6.4.5-4.9 4.2 1.5 6.3L12 16.6 6.4 20l1.5-6.3L3 9.5l6.4-.5z",
  "M7.5 4h9l4.5 8-4.5 8h-9L3 12z",
  "M3 9h18v6H3z",
] as const;

export function TeamMark({ team, className = "h-[1em] w-[1em]" }: { team: number; className?: string }) {
  return (
    <svg viewBox="0 0 24 24" aria-hidden="true" className={`inline-block shrink-0 ${className}`} fill="currentColor" fillRule="evenodd">
      <path d={TEAM_MARKS[team % TEAM_MARKS.length]} />
    </svg>
  );
}

/** "Team Saddle" with its mark; the words are the label, the mark is there to be spotted across a room. */
export function TeamName({ team, className = "" }: { team: number; className?: string }) {
  return (
    <span className={`inline-flex items-center gap-2 ${className}`}>
      <TeamMark team={team} />
      Team {TEAM_NAMES[team] ?? team + 1}
    </span>
  );
}
