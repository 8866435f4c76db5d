// Assignment pieces shared by the teacher's list and the student's home: progress in a bar and in words.
import { Link } from "react-router";
import { Badge, buttonClass, Card } from "~/components/ui";
import { goalWords, progressWords, type Goal, type Progress, type Status } from "./progress";
import { Icon } from "~/components/Icon";

/** A due time in the reader's own time zone (the server renders UTC; the browser corrects it). */
export function DueTime({ ms }: { ms: number }) {
  return (
    <time dateTime={new Date(ms).toISOString()} suppressHydrationWarning>
      {new Date(ms).toLocaleString(undefined, { weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" })}
    </time>
  );
}

export function StatusBadge({ status, late }: { status: Status; late: boolean }) {
  if (status === "done") return <Badge tone="right">{late ? "Done, late" : "Done"}</Badge>;
  if (status === "overdue") return <Badge tone="miss">Overdue</Badge>;
  return <Badge tone="info">Open</Badge>;
}

/** Notes toward the goal as a bar, every part of the goal in words beneath it (the status badge says done or not). */
export function ProgressBar({ goal, progress, status, label }: { goal: Goal; progress: Progress; status: Status; label: string }) {
  const fraction = status === "done" ? 1 : progress.notes / goal.notes;
  const words = progressWords(goal, progress);
  return (
    <div className="min-w-48">
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={goal.notes}
        aria-valuenow={status === "done" ? goal.notes : progress.notes}
        aria-valuetext={status === "done" ? `Done · ${words}` : words}
        className="h-3 overflow-hidden rounded-full bg-ink/10"
      >
        <div className={`h-full rounded-full ${status === "done" ? "bg-teal" : "bg-brass"}`} style={{ width: `${Math.round(fraction * 100)}%` }} />
      </div>
      <p className="mt-1 text-sm text-ink-soft">
        {status === "done" ? <Icon name="check" className="mr-1 inline h-4 w-4 align-[-0.15em]" /> : null}
        {words}
      </p>
    </div>
  );
}

export interface OpenAssignment {
  id: string;
  title: string;
  className: string;
  goal: Goal;
  dueAt: number;
  progress: Progress;
  status: Status;
  late: boolean;
  practiceUrl: string;
}

/** The student's home: assignments still to do (and those done while still before their due time). */
export function OpenAssignments({ items }: { items: OpenAssignment[] }) {
  return (
    <section aria-labelledby="open-assignments" className="mb-8">
      <h2 id="open-assignments" className="font-display text-2xl font-semibold">
        Open assignments
      </h2>
      {items.length === 0 ? <p className="mt-2 text-ink-soft">Nothing set right now.</p> : null}
      <ul className="mt-3 grid gap-4 sm:grid-cols-2">
        {items.map((a) => (
          <li key={a.id}>
            <Card>
              <div className="flex flex-wrap items-start justify-between gap-2">
                <h3 className="font-display text-xl font-semibold">{a.title}</h3>
                <StatusBadge status={a.status} late={a.late} />
              </div>
              <p className="mt-1 text-ink-soft">
                {a.className} · due <DueTime ms={a.dueAt} />
              </p>
              <p className="mt-1">Goal: {goalWords(a.goal)}</p>
              <div className="mt-3">
                <ProgressBar goal={a.goal} progress={a.progress} status={a.status} label={`Progress on ${a.title}`} />
              </div>
              {a.status === "done" ? null : (
                <Link to={a.practiceUrl} className={buttonClass("teal", "mt-3")}>
                  <Icon name="play" className="h-4 w-4" />
                  Practise
                </Link>
              )}
            </Card>
          </li>
        ))}
      </ul>
    </section>
  );
}
