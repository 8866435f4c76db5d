// The teacher's view of practice between lessons: per student, answers tapped and answers played on a guitar;
// one student's recent answers with how each was given (icon and word, never colour alone).
import { Link } from "react-router";
import { DataTable, type Column } from "~/components/DataTable";
import { Icon } from "~/components/Icon";
import { useNoteNaming } from "~/components/NoteNaming";
import { defaultSpelling } from "~/music/keys";
import { MISTAKE_LABELS, type MistakeKind } from "~/music/mistakes";
import { noteName as nameIn } from "~/music/naming";
import { day, noteName, pct, secs } from "~/review/format";
import type { PracticeLine, PracticeMix } from "./answers";
import { InputBadge } from "./PlayMode";

const share = (right: number, of: number) =>
  of === 0 ? "—" : `${pct(right / of)} right`;

export function PracticeMixTable({
  rows,
  classId,
  days,
}: {
  rows: PracticeMix[];
  classId: string;
  days: number;
}) {
  const columns: Column<PracticeMix>[] = [
    {
      key: "displayName",
      header: "Student",
      cell: (r) => (
        <Link
          className="underline"
          to={`/teach/classes/${classId}/students/${r.userId}`}
        >
          {r.displayName}
        </Link>
      ),
    },
    {
      key: "tapped",
      header: <InputBadge input="tap" />,
      align: "right",
      cell: (r) => `${r.tapped} (${share(r.tappedRight, r.tapped)})`,
    },
    {
      key: "played",
      header: <InputBadge input="played" />,
      align: "right",
      cell: (r) => `${r.played} (${share(r.playedRight, r.played)})`,
    },
    {
      key: "lastAt",
      header: "Last practice",
      align: "right",
      sortValue: (r) => r.lastAt ?? 0,
      cell: (r) => (r.lastAt === null ? "—" : day(r.lastAt)),
    },
  ];
  return (
    <>
      <p className="text-sm text-ink-soft">
        Solo practice answers of the last {days} days. Tapped: the home spot
        tapped on the phone's neck (right = the home spot). Played: the note
        played on a guitar and heard by the phone (right = the right pitch; a
        microphone cannot tell the string).
      </p>
      <DataTable
        rows={rows}
        columns={columns}
        rowKey={(r) => r.userId}
        caption="Practice by student"
        filterPlaceholder="Filter students"
        initialSort={{ key: "displayName", direction: "asc" }}
        empty="No students in this class yet."
      />
    </>
  );
}

export function RecentPracticeTable({ rows }: { rows: PracticeLine[] }) {
  const naming = useNoteNaming();
  const columns: Column<PracticeLine>[] = [
    { key: "at", header: "Date", cell: (r) => day(r.at) },
    {
      key: "written",
      header: "Note",
      sortValue: (r) => r.written,
      cell: (r) => noteName(r.written, naming),
    },
    {
      key: "input",
      header: "Answer",
      cell: (r) => <InputBadge input={r.input} />,
    },
    {
      key: "given",
      header: "Where or what",
      sortable: false,
      cell: (r) =>
        r.spot
          ? `string ${r.spot.string}, fret ${r.spot.fret}`
          : r.heard
            ? `heard ${nameIn(defaultSpelling(r.heard.midi), naming, { octave: true })} (sounding, ${r.heard.cents > 0 ? "+" : ""}${r.heard.cents} cents)`
            : "—",
    },
    {
      key: "kind",
      header: "Result",
      cell: (r) => (
        <span className="inline-flex items-center gap-1">
          <Icon name={r.pitchRight ? "check" : "cross"} className="h-4 w-4" />
          {r.input === "played" && r.pitchRight
            ? "right note"
            : (MISTAKE_LABELS[r.kind as MistakeKind] ?? r.kind)}
        </span>
      ),
    },
    {
      key: "reactionMs",
      header: "Time",
      align: "right",
      cell: (r) => secs(r.reactionMs),
    },
  ];
  return (
    <DataTable
      rows={rows}
      columns={columns}
      rowKey={(r) => r.clientId}
      caption="Recent practice answers"
      initialSort={{ key: "at", direction: "desc" }}
      empty="No practice answers yet."
    />
  );
}
