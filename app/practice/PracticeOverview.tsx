// The student home's practice part: practise now, the day streak, recent sessions and passes, and progress per
// note on the staff and the fretboard (the class review's note heatmap, for this student alone).
import { useEffect } from "react";
import { Link } from "react-router";
import { buttonClass, Card } from "~/components/ui";
import { HeatmapFretboard, HeatmapStaves } from "~/review/ReviewParts";
import type { NoteCell } from "~/review/stats";
import type { Streak } from "./summary";
import { rememberTimeZone } from "./tz";
import { Icon } from "~/components/Icon";

export interface PracticeOverviewData {
  streak: Streak;
  sessions: { source: string; title: string; start: number; answers: number; homeSpots: number; medianMs: number | null }[];
  passes: { id: string; tuneId: string; title: string; tempo: number; score: number; at: number }[];
  notes: { position: number; tuning: string; cells: NoteCell[] } | null;
}

function When({ ms }: { ms: number }) {
  return (
    <time dateTime={new Date(ms).toISOString()} suppressHydrationWarning>
      {new Date(ms).toLocaleString(undefined, { weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" })}
    </time>
  );
}

function StreakLine({ streak }: { streak: Streak }) {
  if (streak.days === 0) return <p className="text-lg">No streak yet: practise today to start one.</p>;
  return (
    <p className="text-lg">
      <Icon name="streak" className="mr-1 inline h-7 w-7 align-[-0.2em] text-brass" />
      <strong className="font-display text-3xl">{streak.days}</strong> {streak.days === 1 ? "day" : "days"} in a row
      <span className="block text-base text-ink-soft">
        {streak.practisedToday ? (
          <>
            <Icon name="check" className="mr-1 inline h-4 w-4 align-[-0.15em]" />
            You've practised today.
          </>
        ) : (
          "Practise today to keep your streak going."
        )}
      </span>
    </p>
  );
}

export function PracticeOverview({ data }: { data: PracticeOverviewData }) {
  useEffect(rememberTimeZone, []);
  return (
    <section aria-labelledby="practice-heading" className="my-6 space-y-4">
      <Card className="flex flex-wrap items-center justify-between gap-4">
        <div>
          <h2 id="practice-heading" className="font-display text-2xl font-semibold">
            Practice
          </h2>
          <StreakLine streak={data.streak} />
        </div>
        <Link to="/me/practice" className={buttonClass("teal", "text-xl")}>
          Practise now
        </Link>
      </Card>

      {data.sessions.length > 0 || data.passes.length > 0 ? (
        <Card>
          <h3 className="font-display text-xl font-semibold">Recent practice</h3>
          <ul className="mt-2 divide-y divide-ink/10">
            {data.sessions.map((s) => (
              <li key={`${s.source}-${s.start}`} className="flex flex-wrap justify-between gap-2 py-2">
                <span>
                  <strong>{s.title}</strong> · <When ms={s.start} />
                </span>
                <span>
                  {s.homeSpots} of {s.answers} home spots{s.medianMs !== null ? ` · median ${(s.medianMs / 1000).toFixed(1)} s` : ""}
                </span>
              </li>
            ))}
            {data.passes.map((p) => (
              <li key={p.id} className="flex flex-wrap justify-between gap-2 py-2">
                <span>
                  <strong>Rhythm pass: {p.title}</strong> · <When ms={p.at} />
                </span>
                <Link to={`/me/rhythm/${encodeURIComponent(p.tuneId)}`} className="underline">
                  {p.score} % at {p.tempo} bpm
                </Link>
              </li>
            ))}
          </ul>
        </Card>
      ) : null}

      {data.notes ? (
        <Card className="space-y-4">
          <h3 className="font-display text-xl font-semibold">Your notes in position {data.notes.position}</h3>
          <p className="text-ink-soft">How often you found each note on its home spot in practice over the last weeks, and how fast.</p>
          <HeatmapStaves cells={data.notes.cells} />
          <HeatmapFretboard cells={data.notes.cells} tuning={data.notes.tuning} frets={15} position={data.notes.position} />
        </Card>
      ) : null}
    </section>
  );
}
