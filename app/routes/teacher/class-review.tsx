// The class review: across every round of a class, or one round picked from the list.
import { useEffect } from "react";
import { data, Form, Link, useRevalidator, useSubmit } from "react-router";
import { useEventSource } from "remix-utils/sse/react";
import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { DataTable, type Column } from "~/components/DataTable";
import { readTableQuery } from "~/components/dataTable";
import { Badge, buttonClass, Card, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { MISTAKE_LABELS } from "~/music/mistakes";
import { change, day, noteName, pct, secs } from "~/review/format";
import { HeatmapFretboard, HeatmapStaves, MistakeChart } from "~/review/ReviewParts";
import { reviewInput } from "~/review/review.server";
import { ROUND_SORT_KEYS, roundsPage, type RoundRow } from "~/review/rounds.server";
import { classReview, MIN_RANKED, RETEACH_ACCURACY_BAR, RETEACH_MIN_SAMPLE, type PlayerFigures } from "~/review/stats";
import type { Route } from "./+types/class-review";
import { useNoteNaming } from "~/components/NoteNaming";
import { Icon } from "~/components/Icon";
import { plural } from "~/lib/plural";
import { PRACTICE_REVIEW_DAYS } from "~/practice/answers";
import { classPracticeMix } from "~/practice/inputs.server";
import { PracticeMixTable } from "~/practice/PracticeReview";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Class review${data ? ` · ${data.cls.name}` : ""} · Fretcall` }];

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const input = await reviewInput(db, { classId: cls.id });
  const search = new URL(request.url).searchParams;
  const roundId = search.get("round") || null;
  const chosen = roundId === null ? undefined : input.rounds.find((s) => s.id === roundId);
  if (roundId !== null && !chosen) throw data({ error: "That round is not one of this class's." }, { status: 404 });
  const latest = [...input.rounds].sort((a, b) => b.startedAt - a.startedAt)[0];
  const neck = chosen ?? latest;
  const live = (chosen ? [chosen] : input.rounds).find((s) => s.live)?.id ?? null;
  const review = classReview(input, roundId);
  const roundsQuery = readTableQuery(search, ROUND_SORT_KEYS, { key: "startedAt", direction: "desc" });
  const page = await roundsPage(db, cls.id, roundsQuery);
  const accuracy = new Map(review.rounds.map((r) => [r.id, r.accuracy]));
  const roundRows = page.rows.map((r) => ({ ...r, accuracy: r.answers > 0 ? (accuracy.get(r.id) ?? null) : null }));
  const practice = await classPracticeMix(db, cls.id);
  return { cls, review, neck: neck && { tuning: neck.tuning, frets: neck.frets, position: neck.position }, live, roundRows, roundsPaging: { query: roundsQuery, total: page.total }, practice };
}

type Row = PlayerFigures;
type RoundLine = RoundRow & { accuracy: number | null };

const roundColumns: Column<RoundLine>[] = [
  {
    key: "title",
    header: "Round",
    cell: (r) => (
      <span className="inline-flex flex-wrap items-center gap-2">
        <Link className="underline" to={`?round=${r.id}`}>{r.title}</Link>
        {r.live ? <Badge tone="info">live</Badge> : null}
      </span>
    ),
  },
  { key: "startedAt", header: "Date", cell: (r) => day(r.startedAt) },
  { key: "players", header: "Players", align: "right" },
  { key: "answers", header: "Answers", align: "right" },
  { key: "accuracy", header: "Accuracy", align: "right", sortable: false, cell: (r) => (r.accuracy === null ? "—" : pct(r.accuracy)) },
  { key: "results", header: "Results", sortable: false, cell: (r) => <Link className="underline" to={`/results/${r.id}`}>Results<span className="sr-only"> of {r.title}</span></Link> },
];

export default function ClassReview({ loaderData: { cls, review, neck, live, roundRows, roundsPaging, practice } }: Route.ComponentProps) {
  const naming = useNoteNaming();
  const submit = useSubmit();
  const one = review.roundId ? review.rounds.find((s) => s.id === review.roundId) : undefined;
  const columns: Column<Row>[] = [
    {
      key: "nickname",
      header: "Student",
      cell: (p) => (p.userId ? <Link className="underline" to={`/teach/classes/${cls.id}/students/${p.userId}`}>{p.nickname}</Link> : <span>{p.nickname} <span className="text-sm text-ink-soft">(nickname only)</span></span>),
    },
    { key: "points", header: "Points", align: "right" },
    { key: "longestStreak", header: "Longest streak", align: "right" },
    { key: "accuracy", header: "Accuracy", align: "right", cell: (p) => `${pct(p.accuracy)} (${p.correct}/${p.answered})` },
    { key: "medianMs", header: "Median time", align: "right", cell: (p) => secs(p.medianMs) },
  ];
  const exportHref = `/teach/classes/${cls.id}/export.csv${one ? `?round=${one.id}` : ""}`;

  return (
    <div className="space-y-6">
      <PageTitle lead={one ? `${one.title} · ${day(one.startedAt)}` : `Across ${review.rounds.length === 1 ? "its one round" : `all ${plural(review.rounds.length, "round")}`}. Students who played signed in are followed from round to round.`}>
        Class review · {cls.name}
      </PageTitle>
      {live ? <LiveUpdates classId={cls.id} roomId={live} /> : null}

      <div className="flex flex-wrap items-end gap-3">
        <Form method="get" className="flex flex-wrap items-end gap-2" onChange={(e) => submit(e.currentTarget, { preventScrollReset: true })}>
          <label className="font-medium">
            Round
            <select name="round" defaultValue={review.roundId ?? ""} className="mt-1 block min-h-11 rounded-xl border-2 border-ink/20 bg-white px-3 py-2 text-lg">
              <option value="">All rounds</option>
              {review.rounds.map((s) => (
                <option key={s.id} value={s.id}>
                  {day(s.startedAt)} · {s.title}
                  {s.live ? " · live" : ""}
                </option>
              ))}
            </select>
          </label>
          <noscript>
            <button className={buttonClass("ghost")}>Show</button>
          </noscript>
        </Form>
        <a href={exportHref} className={buttonClass("ghost")} download>
          <Icon name="download" className="h-5 w-5" /> Export CSV{one ? " (this round)" : " (all rounds)"}
        </a>
        {one ? (
          <Link to={`/results/${one.id}`} className="underline">
            Round results
          </Link>
        ) : null}
      </div>

      {review.rounds.length === 0 ? (
        <Notice tone="info">No rounds yet for this class. Host a round for it and its results will be reviewed here.</Notice>
      ) : (
        <>
          <section aria-labelledby="boards" className="space-y-3">
            <h2 id="boards" className="font-display text-2xl font-semibold">Leaderboards</h2>
            <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
              <Board title="Points" rows={review.leaderboards.points} value={(p) => String(p.points)} />
              <Board title="Longest streak" rows={review.leaderboards.streak} value={(p) => `${p.longestStreak} in a row`} />
              <Board title="Accuracy" rows={review.leaderboards.accuracy} value={(p) => pct(p.accuracy)} note={`At least ${MIN_RANKED} answers.`} />
              <Board title="Fastest median time" rows={review.leaderboards.speed} value={(p) => secs(p.medianMs)} note={`Right-pitch answers; at least ${MIN_RANKED}.`} />
            </div>
            <Card>
              <h3 className="mb-2 font-display text-xl font-semibold">Most improved since the previous round</h3>
              {review.mostImproved.length === 0 ? (
                <p className="text-ink-soft">Nobody to compare yet: a student needs {MIN_RANKED} answers in this round and in an earlier one.</p>
              ) : (
                <ol className="space-y-1">
                  {review.mostImproved.slice(0, 5).map((m) => (
                    <li key={m.userId} className="flex flex-wrap justify-between gap-2 border-t border-ink/10 py-1">
                      <span>{m.nickname}</span>
                      <span>
                        {pct(m.before)} → {pct(m.now)} <strong>{change(m.delta)}</strong>
                      </span>
                    </li>
                  ))}
                </ol>
              )}
            </Card>
            <DataTable
              rows={review.leaderboards.points}
              columns={columns}
              rowKey={(p) => p.key}
              caption="Every student"
              filterPlaceholder="Filter students"
              initialSort={{ key: "points", direction: "desc" }}
              empty="No students have answered yet."
            />
          </section>

          <section aria-labelledby="rounds" className="space-y-3">
            <h2 id="rounds" className="font-display text-2xl font-semibold">Rounds</h2>
            <DataTable rows={roundRows} columns={roundColumns} rowKey={(r) => r.id} caption="Rounds of this class" filterPlaceholder="Filter rounds by title" server={roundsPaging} />
          </section>

          <section aria-labelledby="reteach">
            <Card>
              <h2 id="reteach" className="font-display text-2xl font-semibold">Notes to reteach</h2>
              <p className="text-sm text-ink-soft">
                Notes with at least {RETEACH_MIN_SAMPLE} answers: first those under {pct(RETEACH_ACCURACY_BAR)} right, lowest first; then the slowest to find.
              </p>
              {review.reteach.length === 0 ? (
                <p className="mt-2 text-ink-soft">Not enough answers per note yet.</p>
              ) : (
                <ol className="mt-3 space-y-2">
                  {review.reteach.map((n) => (
                    <li key={n.written} className="flex flex-wrap items-center gap-3 border-t border-ink/10 pt-2">
                      <span className="font-display text-xl font-semibold">{noteName(n.written, naming)}</span>
                      <Badge tone={n.reason === "not read yet" ? "miss" : "info"}>{n.reason}</Badge>
                      <span>
                        {pct(n.accuracy)} right · median {secs(n.medianMs)} · {plural(n.answers, "answer")}
                        {n.commonMistake ? ` · most often: ${MISTAKE_LABELS[n.commonMistake]}` : ""}
                      </span>
                    </li>
                  ))}
                </ol>
              )}
            </Card>
          </section>

          <section aria-labelledby="heatmap" className="space-y-4">
            <h2 id="heatmap" className="font-display text-2xl font-semibold">Note heatmap</h2>
            <p className="text-ink-soft">
              Accuracy and median time per written note. <span aria-hidden="true">✓</span> at least {pct(RETEACH_ACCURACY_BAR)} right, <span aria-hidden="true">✗</span> below.
            </p>
            <HeatmapStaves cells={review.heatmap} />
            {neck ? (
              <Card>
                <h3 className="mb-2 font-display text-xl font-semibold">On the fretboard (position {neck.position})</h3>
                <HeatmapFretboard cells={review.heatmap} {...neck} />
              </Card>
            ) : null}
          </section>

          <section aria-labelledby="mistakes">
            <Card>
              <h2 id="mistakes" className="font-display text-2xl font-semibold">What the answers were</h2>
              <p className="text-sm text-ink-soft">Share of every answer given, by kind (home spot = right).</p>
              <MistakeChart shares={review.mistakes} />
            </Card>
          </section>
        </>
      )}

      <section aria-labelledby="practice" className="space-y-3">
        <h2 id="practice" className="font-display text-2xl font-semibold">Practice between lessons: tapped and played</h2>
        <PracticeMixTable rows={practice} classId={cls.id} days={PRACTICE_REVIEW_DAYS} />
      </section>
    </div>
  );
}

function Board({ title, rows, value, note }: { title: string; rows: PlayerFigures[]; value: (p: PlayerFigures) => string; note?: string }) {
  return (
    <Card>
      <h3 className="font-display text-xl font-semibold">{title}</h3>
      {note ? <p className="text-sm text-ink-soft">{note}</p> : null}
      {rows.length === 0 ? <p className="mt-2 text-ink-soft">No one yet.</p> : null}
      <ol className="mt-2 space-y-1">
        {rows.slice(0, 5).map((p, i) => (
          <li key={p.key} className="flex justify-between gap-2 border-t border-ink/10 py-1">
            <span>
              {i + 1}. {p.nickname}
            </span>
            <span className="font-semibold">{value(p)}</span>
          </li>
        ))}
      </ol>
    </Card>
  );
}

/** A running round: reload the figures whenever the server says answers were added. */
function LiveUpdates({ classId, roomId }: { classId: string; roomId: string }) {
  const revalidator = useRevalidator();
  const url = `/teach/classes/${classId}/review/live?round=${roomId}`;
  const count = useEventSource(url, { event: "answers" });
  const ended = useEventSource(url, { event: "ended" });
  useEffect(() => {
    if (count !== null || ended !== null) void revalidator.revalidate();
    // revalidator changes on every render; only new server news should reload.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [count, ended]);
  return (
    <Notice tone="info">
      <Icon name="dot" className="mr-1 inline h-4 w-4 align-[-0.15em]" />A round is still running: these figures update as answers come in{count !== null ? ` (${count} so far)` : ""}.
    </Notice>
  );
}
