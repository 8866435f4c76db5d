import { Form, Link } from "react-router";
import { DataTable, type Column } from "~/components/DataTable";
import { Icon } from "~/components/Icon";
import { useNoteNaming } from "~/components/NoteNaming";
import { Badge, Button, Card } from "~/components/ui";
import { plural } from "~/lib/plural";
import { day, noteName, pct, secs } from "./format";
import type { ClassHub, HubStudent } from "./hub.server";
import { READY_CLASS_SHARE, READY_HOME_SHARE, READY_MIN_ANSWERS, type StepReading } from "./ready";

const READING: Record<StepReading, { tone: "right" | "info" | "neutral"; word: string }> = {
  "reads it": { tone: "right", word: "Reads it" },
  "working on it": { tone: "info", word: "Working on it" },
  "too few answers": { tone: "neutral", word: "Too few answers" },
};
const READING_ORDER: StepReading[] = ["too few answers", "working on it", "reads it"];
const ASSIGNMENT = { done: "Done", open: "Open", overdue: "Overdue" } as const;

/** The class as a whole and each student at a glance: the current step, who reads it, who is stuck where. */
export function ClassHubCard({ classId, hub }: { classId: string; hub: ClassHub }) {
  const naming = useNoteNaming();
  const { current, readiness, next } = hub;
  const columns: Column<HubStudent>[] = [
    { key: "displayName", header: "Student", cell: (s) => <Link to={`/teach/classes/${classId}/students/${s.id}`} className="underline">{s.displayName}</Link> },
    {
      key: "reading",
      header: "Current step",
      // Too few answers, then working on it, then reads it; by home-spot share within each.
      sortValue: (s) => READING_ORDER.indexOf(s.reading) * 2 + (s.step ? s.step.homeSpots / s.step.answers : 0),
      cell: (s) => (
        <span className="flex flex-wrap items-center gap-2">
          <Badge tone={READING[s.reading].tone}>{READING[s.reading].word}</Badge>
          {s.step ? <span className="text-sm text-ink-soft">{`${pct(s.step.homeSpots / s.step.answers)} home spots · median ${secs(s.step.medianMs)}`}</span> : null}
        </span>
      ),
    },
    { key: "stuck", header: "Stuck notes", sortValue: (s) => s.stuck.length, cell: (s) => (s.stuck.length ? s.stuck.map((w) => noteName(w, naming)).join(", ") : <span className="text-ink-soft">None</span>) },
    { key: "lastActivity", header: "Last activity", sortValue: (s) => s.lastActivity ?? 0, cell: (s) => (s.lastActivity ? day(s.lastActivity) : <span className="text-ink-soft">Not yet</span>) },
    {
      key: "assignment",
      header: "Assignment",
      sortValue: (s) => s.assignment?.status ?? "",
      cell: (s) => (s.assignment ? `${s.assignment.title}: ${ASSIGNMENT[s.assignment.status]}` : <span className="text-ink-soft">None</span>),
    },
  ];
  return (
    <Card>
      <h2 className="mb-2 font-display text-2xl font-semibold">Class hub</h2>
      {current && readiness ? (
        <div className="mb-4 space-y-2" data-testid="class-ready">
          <p>
            {`Current step: ${current.step ? `step ${current.step.step}, ${current.step.name}` : current.title} · `}
            <strong>{`${readiness.readers} of ${plural(readiness.students, "student")} read it well`}</strong>
            {readiness.ready ? null : ` (${readiness.needed} needed).`}
          </p>
          {readiness.ready ? (
            <div className="flex flex-wrap items-center gap-3">
              <Badge tone="right">Ready for the next step</Badge>
              {next ? (
                <>
                  <Form method="post" action="/host">
                    <input type="hidden" name="intent" value="set" />
                    <input type="hidden" name="set" value={next.id} />
                    <input type="hidden" name="classId" value={classId} />
                    <Button type="submit" tone="teal">
                      <Icon name="play" className="h-4 w-4" />
                      {`Host step ${next.step}: ${next.name}`}
                    </Button>
                  </Form>
                  <Link to={`/teach/classes/${classId}/assignments/new?material=preset:${next.id}`} className="underline decoration-brass">
                    Assign it for practice
                  </Link>
                </>
              ) : (
                <Link to={`/host?class=${classId}`} className="underline decoration-brass">Choose what the class reads next</Link>
              )}
            </div>
          ) : (
            <p>
              <Badge tone="neutral">Not ready for the next step yet</Badge>
            </p>
          )}
          <p className="text-sm text-ink-soft">
            {`The rule: the class is ready when at least ${pct(READY_CLASS_SHARE)} of its students read the current step well — at least ${pct(READY_HOME_SHARE)} home spots over at least ${READY_MIN_ANSWERS} answers in its latest ${plural(current.rounds, "round")}, with a median time under ${secs(current.targetMs)} (half the time allowed per note).`}
          </p>
        </div>
      ) : (
        <p className="mb-4">
          No rounds yet.{" "}
          <Link to={`/host?class=${classId}`} className="underline decoration-brass">Host a first round</Link> to see who reads what.
        </p>
      )}
      <DataTable caption="Each student at the current step" rows={hub.students} columns={columns} rowKey={(s) => s.id} filterPlaceholder="Filter the class hub" pageSize={25} empty="No students yet." initialSort={{ key: "displayName", direction: "asc" }} />
    </Card>
  );
}
