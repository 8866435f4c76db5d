// No animation library here: the pad loads these parts on a phone's first load, so motion is CSS and the Web Animations API.
import { useEffect, useLayoutEffect, useRef, useState, useSyncExternalStore, type RefObject } from "react";
import type { ServerMessageOf } from "~/game/messages";
import { Icon } from "~/components/Icon";
import { TEAM_NAMES } from "~/game/standings";

// The stage and the pad take the icons from here with the rest of their parts.
export { MISTAKE_ICONS } from "~/music/mistakes";

// The stage and the pad take the shared icons from here too.
export { Icon } from "~/components/Icon";

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
      <Icon name="warning" className="mr-1 inline h-4 w-4 align-[-0.15em]" />
      offline
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

/** Whether the local clock has reached `at`, re-rendering the moment it does (not on the next poll). */
export function useReached(at: number | null) {
  const [wakes, wake] = useState(0);
  const reached = at !== null && Date.now() >= at;
  useEffect(() => {
    if (at === null || reached) return;
    // `wakes` in the deps: a timer that fires a little early sets the next one.
    const t = window.setTimeout(() => wake((n) => n + 1), at - Date.now());
    return () => window.clearTimeout(t);
  }, [at, reached, wakes]);
  return reached;
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

/** Whether the player asked for reduced motion, following a change of mind; false on the server. */
export function useReducedMotion() {
  return useMedia("(prefers-reduced-motion: reduce)");
}

/**
 * Rows (marked `data-glide="<key>"`) that change places glide to their new ones instead of jumping, so the class
 * sees who moved: each starts where it stood and slides home (the FLIP technique). None under reduced motion.
 */
function useGlide(list: RefObject<HTMLElement | null>, order: string, still: boolean) {
  const tops = useRef(new Map<string, number>());
  useLayoutEffect(() => {
    const rows = [...(list.current?.querySelectorAll<HTMLElement>("[data-glide]") ?? [])];
    const now = new Map(rows.map((row) => [row.dataset.glide!, row.offsetTop]));
    for (const row of still ? [] : rows) {
      const from = tops.current.get(row.dataset.glide!);
      const to = now.get(row.dataset.glide!)!;
      if (from !== undefined && from !== to) {
        row.animate([{ transform: `translateY(${from - to}px)` }, { transform: "none" }], { duration: 600, easing: "cubic-bezier(0.2, 0.8, 0.3, 1.05)" });
      }
    }
    tops.current = now;
  }, [list, order, still]);
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
  const pointsList = useRef<HTMLOListElement>(null);
  const streaksList = useRef<HTMLOListElement>(null);
  useGlide(pointsList, rows.map((r) => r.playerId).join(" "), reduce);
  useGlide(streaksList, standings.streaks.map((s) => s.playerId).join(" "), reduce);
  const heading = `font-display font-semibold ${big ? "text-5xl" : "text-2xl"}`;
  return (
    <section className={`grid gap-6 ${big ? "lg:grid-cols-[2fr_1fr]" : ""}`}>
      <div>
        <h2 className={heading}>{standings.final ? "Final standings" : "Standings"}</h2>
        <ol ref={pointsList} className="mt-3 space-y-2">
          {rows.map((r) => (
            <li
              key={r.playerId}
              data-glide={r.playerId}
              className={`flex items-center gap-4 rounded-2xl px-4 ${r.playerId === highlight ? "bg-brass/30 ring-2 ring-brass" : "bg-white"} ${big ? "py-1 text-4xl" : "py-2 text-lg"}`}
            >
              <span className={`font-display font-semibold text-ink-soft tabular-nums ${big ? "w-24 text-5xl" : "w-10"}`}>{r.rank}.</span>
              <span className="min-w-0 flex-1 truncate">
                {r.nickname}
                {r.playerId === highlight ? <span className="ml-2 text-base font-medium">(you)</span> : null}
                {offline?.has(r.playerId) ? <span className="ml-2"><Offline /></span> : null}
              </span>
              <span className={`font-display font-semibold tabular-nums ${big ? "text-6xl" : ""}`}>{r.points}</span>
            </li>
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
                    <Icon name="flag" className="mr-1 inline h-[0.9em] w-[0.9em] align-[-0.1em]" />
                    {t.name} ({t.members})
                  </span>
                  <strong className={`font-display tabular-nums ${big ? "text-5xl" : ""}`}>{t.points}</strong>
                </li>
              ))}
            </ol>
          </>
        ) : null}
        <h2 className={`${standings.teams.length > 0 ? "mt-4 " : ""}${heading}`}>Longest streaks</h2>
        <ol ref={streaksList} className="mt-3 space-y-2">
          {standings.streaks.slice(0, 5).map((s) => (
            <li key={s.playerId} data-glide={s.playerId} className={`flex items-center justify-between rounded-2xl bg-white px-4 py-2 ${big ? "text-3xl" : ""}`}>
              <span className="min-w-0 truncate">{s.nickname}</span>
              <span className={`flex items-center gap-1 font-display font-semibold tabular-nums ${big ? "text-5xl" : ""}`}>
                <Icon name="streak" className="h-[0.8em] w-[0.8em] text-brass" />
                {s.longestStreak}
                <span className="sr-only"> in a row</span>
              </span>
            </li>
          ))}
        </ol>
      </div>
    </section>
  );
}

/**
 * Full neck's own task, said the same way on stage and pad: every spot of the pitch, not its home spot.
 * Until the note shows its count is left out (`spots` null): it would narrow down the note.
 */
export function FindEvery({ spots }: { spots: number | null }) {
  if (spots === null) return <span>Find every spot of this note on this neck</span>;
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
