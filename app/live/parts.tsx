import { motion, useReducedMotion } from "framer-motion";
import { useEffect, useState } from "react";
import type { ServerMessageOf } from "~/game/protocol";
import type { MistakeKind } from "~/music/mistakes";

/** An icon per mistake kind, so a colour-blind player reads the same as everyone else. */
export const MISTAKE_ICONS: Record<MistakeKind | "no-answer", string> = {
  "home-spot": "✓",
  "other-spot": "◐",
  "octave-off": "⇅",
  "key-signature-miss": "♯?",
  "accidental-miss": "♮?",
  "half-step-off": "½",
  "string-over": "⇵",
  "wide-miss": "✗",
  "no-answer": "…",
};

export function Offline() {
  return (
    <span className="rounded-full bg-ink/10 px-2 text-base text-ink-soft" title="offline">
      <span aria-hidden="true">⚠ </span>offline
    </span>
  );
}

/** A bar that empties from the moment the note shows until the deadline (local clock). */
export function Countdown({ showAt, deadline, paused }: { showAt: number; deadline: number; paused: boolean }) {
  const now = useNow(paused ? 0 : 100);
  const total = deadline - showAt;
  const left = Math.max(0, Math.min(total, deadline - now));
  const waiting = now < showAt;
  return (
    <div aria-hidden="true" className="h-5 overflow-hidden rounded-full bg-ink/10">
      <div
        className={`h-full ${waiting ? "bg-sky" : left / total < 0.25 ? "bg-brick" : "bg-brass"}`}
        style={{ width: waiting ? "100%" : `${(100 * left) / total}%` }}
      />
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

/** Standings by points with the longest streaks beside them; rows glide to their new places. */
export function StandingsBoard({ standings, big = false, highlight }: { standings: ServerMessageOf<"standings">; big?: boolean; highlight?: string }) {
  const reduce = useReducedMotion();
  const rows = big ? standings.points.slice(0, 10) : standings.points;
  return (
    <section className={`grid gap-6 ${big ? "lg:grid-cols-[2fr_1fr]" : ""}`}>
      <div>
        <h2 className={`font-display font-semibold ${big ? "text-4xl" : "text-2xl"}`}>{standings.final ? "Final standings" : "Standings"}</h2>
        <ol className="mt-3 space-y-2">
          {rows.map((r) => (
            <motion.li
              key={r.playerId}
              layout={!reduce}
              className={`flex items-center gap-4 rounded-2xl px-4 py-2 ${r.playerId === highlight ? "bg-brass/30 ring-2 ring-brass" : "bg-white"} ${big ? "text-3xl" : "text-lg"}`}
            >
              <span className="w-12 font-display font-semibold text-ink-soft">{r.rank}.</span>
              <span className="flex-1">{r.nickname}</span>
              <span className={`font-display font-semibold ${big ? "text-5xl" : ""}`}>{r.points}</span>
            </motion.li>
          ))}
        </ol>
      </div>
      <div>
        {standings.teams.length > 0 ? (
          <>
            <h2 className={`font-display font-semibold ${big ? "text-4xl" : "text-2xl"}`}>Teams</h2>
            <ol className="mt-3 space-y-2">
              {standings.teams.map((t) => (
                <li key={t.team} className={`flex justify-between rounded-2xl bg-white px-4 py-2 ${big ? "text-3xl" : ""}`}>
                  <span>
                    <span aria-hidden="true">⚑ </span>
                    {t.name} ({t.members})
                  </span>
                  <strong>{t.points}</strong>
                </li>
              ))}
            </ol>
          </>
        ) : null}
        <h2 className={`mt-4 font-display font-semibold ${big ? "text-4xl" : "text-2xl"}`}>Longest streaks</h2>
        <ol className="mt-3 space-y-2">
          {standings.streaks.slice(0, 5).map((s) => (
            <li key={s.playerId} className={`flex justify-between rounded-2xl bg-white px-4 py-2 ${big ? "text-2xl" : ""}`}>
              <span>{s.nickname}</span>
              <span>
                <span aria-hidden="true">🔥 </span>
                {s.longestStreak}
              </span>
            </li>
          ))}
        </ol>
      </div>
    </section>
  );
}
