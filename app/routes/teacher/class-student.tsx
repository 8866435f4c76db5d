// One student of a class: progress over the class's rounds, personal bests, their own note heatmap and their
// rhythm passes (tapped or played on the guitar).
import { Link } from "react-router";
import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { DataTable, type Column } from "~/components/DataTable";
import { Card, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { passesForTeacher } from "~/practice/rhythmPass.server";
import { day, noteName, pct, secs } from "~/review/format";
import { HeatmapStaves, ProgressCharts } from "~/review/ReviewParts";
import { requireClassStudent, reviewInput } from "~/review/review.server";
import { MIN_RANKED, reteachList, studentProgress, type Best, type ProgressPoint } from "~/review/stats";
import type { Route } from "./+types/class-student";
import { useNoteNaming } from "~/components/NoteNaming";
import { recentPractice } from "~/practice/inputs.server";
import { RecentPracticeTable } from "~/practice/PracticeReview";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data ? `${data.student.displayName} · ` : ""}Progress · Fretcall` }];

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const student = await requireClassStudent(db, cls.id, params.userId);
  const progress = studentProgress(await reviewInput(db, { classId: cls.id }), student.id);
  return {
    cls,
    student,
    progress,
    reteach: reteachList(progress.heatmap),
    passes: await passesForTeacher(db, user.orgId, student.id),
    practice: await recentPractice(db, student.id),
  };
}

type Pass = Route.ComponentProps["loaderData"]["passes"][number];
const passColumns: Column<Pass>[] = [
  { key: "at", header: "Date", cell: (p) => day(p.at) },
  { key: "title", header: "Tune" },
  { key: "tempo", header: "Tempo", align: "right", cell: (p) => `${p.tempo} bpm` },
  { key: "input", header: "How", cell: (p) => (p.input === "played" ? "Played on the guitar" : "Tapped") },
  { key: "score", header: "Score", align: "right", cell: (p) => `${p.score} %` },
];

const columns: Column<ProgressPoint>[] = [
  { key: "startedAt", header: "Date", cell: (p) => day(p.startedAt) },
  { key: "title", header: "Round" },
  { key: "points", header: "Points", align: "right" },
  { key: "accuracy", header: "Accuracy", align: "right", cell: (p) => `${pct(p.accuracy)} (${p.correct}/${p.answered})` },
  { key: "medianMs", header: "Median time", align: "right", cell: (p) => secs(p.medianMs) },
  { key: "longestStreak", header: "Longest streak", align: "right" },
];

export default function StudentProgressPage({ loaderData: { cls, student, progress, reteach, passes, practice } }: Route.ComponentProps) {
  const naming = useNoteNaming();
  const when = (b: Best | null) => (b ? day(progress.rounds.find((s) => s.roundId === b.roundId)!.startedAt) : "");
  const bests = [
    { title: "Most points", best: progress.bests.points, show: (v: number) => `${v}` },
    { title: "Longest streak", best: progress.bests.streak, show: (v: number) => `${v} in a row` },
    { title: "Best accuracy", best: progress.bests.accuracy, show: pct },
    { title: "Fastest median time", best: progress.bests.speed, show: (v: number) => secs(v) },
  ];
  return (
    <div className="space-y-6">
      <PageTitle lead={<Link className="underline" to={`/teach/classes/${cls.id}/review`}>← Class review · {cls.name}</Link>}>{student.displayName}</PageTitle>
      {progress.rounds.length === 0 ? (
        <Notice tone="info">{student.displayName} has not played a round of this class signed in yet.</Notice>
      ) : (
        <>
          <section aria-labelledby="bests">
            <h2 id="bests" className="mb-3 font-display text-2xl font-semibold">Personal bests</h2>
            <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
              {bests.map((b) => (
                <li key={b.title}>
                  <Card>
                    <h3 className="text-ink-soft">{b.title}</h3>
                    <p className="font-display text-3xl font-semibold">{b.best ? b.show(b.best.value) : "—"}</p>
                    <p className="text-sm text-ink-soft">{b.best ? when(b.best) : `Needs ${MIN_RANKED} answers in a round.`}</p>
                  </Card>
                </li>
              ))}
            </ul>
          </section>
          <section aria-labelledby="progress">
            <Card>
              <h2 id="progress" className="mb-3 font-display text-2xl font-semibold">Progress over time</h2>
              <ProgressCharts points={progress.rounds} />
            </Card>
          </section>
          <DataTable rows={progress.rounds} columns={columns} rowKey={(p) => p.roundId} caption="Rounds played" initialSort={{ key: "startedAt", direction: "desc" }} />
          <section aria-labelledby="notes" className="space-y-3">
            <h2 id="notes" className="font-display text-2xl font-semibold">Their notes</h2>
            {reteach.length > 0 ? (
              <p>
                To practise: <strong>{reteach.map((n) => `${noteName(n.written, naming)} (${n.reason})`).join(", ")}</strong>
              </p>
            ) : null}
            <HeatmapStaves cells={progress.heatmap} />
          </section>
        </>
      )}
      {passes.length > 0 ? (
        <section aria-labelledby="passes" className="space-y-3">
          <h2 id="passes" className="font-display text-2xl font-semibold">Rhythm passes</h2>
          <DataTable rows={passes} columns={passColumns} rowKey={(p) => p.id} caption="Rhythm passes" initialSort={{ key: "at", direction: "desc" }} />
        </section>
      ) : null}
      <section aria-labelledby="practice" className="space-y-3">
        <h2 id="practice" className="font-display text-2xl font-semibold">Practice between lessons</h2>
        <p className="text-ink-soft">Their latest solo practice answers: tapped on the phone's neck, or played on a guitar and heard by the phone.</p>
        <RecentPracticeTable rows={practice} />
      </section>
    </div>
  );
}
