// The class review's pictures: the note heatmap on the staff and on the fretboard, mistake shares and
// progress charts. Every figure is written out in words too; colour only repeats what the words say.
import { Bar, BarChart, CartesianGrid, LabelList, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { Fretboard, type Highlight } from "~/components/Fretboard";
import { Staff } from "~/components/Staff";
import { resolveTuning } from "~/music/tuning";
import { pct, secs, noteName, day } from "./format";
import { RETEACH_ACCURACY_BAR, type MistakeShare, type NoteCell } from "./stats";
import { useNoteNaming } from "~/components/NoteNaming";
import { plural } from "~/lib/plural";

const verdict = (c: NoteCell) => (c.accuracy >= RETEACH_ACCURACY_BAR ? "✓" : "✗");

/** One small staff per written pitch, each with its accuracy, median time and sample under it. */
export function HeatmapStaves({ cells }: { cells: NoteCell[] }) {
  const naming = useNoteNaming();
  if (cells.length === 0) return <p className="text-ink-soft">No answers yet.</p>;
  return (
    <ul className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6">
      {cells.map((c) => (
        <li key={c.written} className={`rounded-2xl border-2 p-2 text-center ${c.accuracy >= RETEACH_ACCURACY_BAR ? "border-teal/40" : "border-brick/50 bg-brick/5"}`}>
          <Staff notes={[{ written: c.written }]} size="phone" />
          <p className="font-display text-lg font-semibold">
            <span aria-hidden="true">{verdict(c)} </span>
            {noteName(c.written, naming)} · {pct(c.accuracy)}
          </p>
          <p className="text-sm text-ink-soft">
            {secs(c.medianMs)} · {plural(c.answers, "answer")}
          </p>
        </li>
      ))}
    </ul>
  );
}

/** Each note's accuracy written on its home spot. Enharmonic spellings share a spot: the weaker one shows. */
export function HeatmapFretboard({ cells, tuning, frets, position }: { cells: NoteCell[]; tuning: string; frets: number; position: number }) {
  const naming = useNoteNaming();
  const bySpot = new Map<string, NoteCell[]>();
  for (const c of cells) if (c.home) bySpot.set(`${c.home.string}:${c.home.fret}`, [...(bySpot.get(`${c.home.string}:${c.home.fret}`) ?? []), c]);
  const highlights: Highlight[] = [...bySpot.values()].map((list) => {
    const weakest = list.reduce((a, b) => (b.accuracy < a.accuracy ? b : a));
    return { ...weakest.home!, kind: "home", label: `${Math.round(weakest.accuracy * 100)}%` };
  });
  const words = cells.filter((c) => c.home).map((c) => `${noteName(c.written, naming)} ${pct(c.accuracy)} on string ${c.home!.string}, fret ${c.home!.fret}`);
  return (
    <div>
      <Fretboard
        tuning={resolveTuning(tuning)}
        frets={frets}
        position={position}
        highlights={highlights}
        legend={false}
        label={`Note heatmap on the fretboard: accuracy at each home spot. ${words.join("; ")}`}
      />
      <p className="mt-2 text-sm text-ink-soft">Each home spot shows how often its note was answered right, in percent.</p>
    </div>
  );
}

/** Share of each mistake kind, as bars labelled with their percentage. */
export function MistakeChart({ shares }: { shares: MistakeShare[] }) {
  const data = shares.map((s) => ({ label: s.label, share: Math.round(s.share * 100), text: `${pct(s.share)} (${s.count})` }));
  return (
    <figure>
      <div className="h-72">
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={data} layout="vertical" margin={{ left: 8, right: 72 }}>
            <CartesianGrid horizontal={false} strokeDasharray="3 3" />
            <XAxis type="number" domain={[0, 100]} unit=" %" />
            <YAxis type="category" dataKey="label" width={130} />
            <Bar dataKey="share" fill="var(--color-sky)" isAnimationActive={false}>
              <LabelList dataKey="text" position="right" fill="var(--color-ink)" />
            </Bar>
          </BarChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="sr-only">{data.map((d) => `${d.label}: ${d.text}`).join("; ")}</figcaption>
    </figure>
  );
}

export interface ProgressDatum {
  startedAt: number;
  accuracy: number;
  medianMs: number | null;
}

/** Accuracy and median time per round, one line chart each, every point labelled. */
/** Approximate width of a character of the labels' 12 px type: generous, so a kept label never touches another. */
const LABEL_CHAR_PX = 8;
const LABEL_FONT_PX = 12;

/**
 * The value above each point, unless it would overlap one already drawn (rounds close together on a narrow
 * chart): then that point's value is left to the tooltip and the words under the chart. Recharts draws a line's
 * labels in order, once per pass; a pass starts again at a lower index.
 */
function spacedLabel(unit: string) {
  const drawn: { left: number; right: number; top: number; bottom: number }[] = [];
  let lastIndex = Infinity;
  return function SpacedLabel(props: { x?: number | string; y?: number | string; value?: unknown; index?: number }) {
    const index = props.index ?? 0;
    if (index <= lastIndex) drawn.length = 0;
    lastIndex = index;
    if (props.value === null || props.value === undefined) return null;
    const text = `${String(props.value)}${unit}`;
    const x = Number(props.x);
    const y = Number(props.y) - 8;
    const half = (text.length * LABEL_CHAR_PX) / 2 + 2;
    const box = { left: x - half, right: x + half, top: y - LABEL_FONT_PX, bottom: y + 2 };
    if (drawn.some((d) => d.left < box.right && box.left < d.right && d.top < box.bottom && box.top < d.bottom)) return null;
    drawn.push(box);
    return (
      <text data-chart-label x={x} y={y} textAnchor="middle" fontSize={LABEL_FONT_PX} className="fill-ink">
        {text}
      </text>
    );
  };
}

export function ProgressCharts({ points }: { points: ProgressDatum[] }) {
  const data = points.map((p) => ({
    when: day(p.startedAt),
    accuracy: Math.round(p.accuracy * 100),
    seconds: p.medianMs === null ? null : Number((p.medianMs / 1000).toFixed(1)),
  }));
  const chart = (key: "accuracy" | "seconds", unit: string, stroke: string, title: string) => (
    <figure>
      <figcaption className="font-display text-xl font-semibold">{title}</figcaption>
      <div className="h-56">
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={data} margin={{ top: 20, right: 24, left: 0, bottom: 0 }}>
            <CartesianGrid strokeDasharray="3 3" />
            <XAxis dataKey="when" />
            <YAxis unit={unit} domain={key === "accuracy" ? [0, 100] : [0, "auto"]} />
            <Tooltip />
            <Line type="monotone" dataKey={key} stroke={stroke} strokeWidth={3} isAnimationActive={false} connectNulls>
              <LabelList dataKey={key} content={spacedLabel(unit)} />
            </Line>
          </LineChart>
        </ResponsiveContainer>
      </div>
      <p className="sr-only">{data.map((d) => `${d.when}: ${d[key] === null ? "no time" : `${d[key]}${unit}`}`).join("; ")}</p>
    </figure>
  );
  return (
    <div className="grid gap-6 lg:grid-cols-2">
      {chart("accuracy", " %", "var(--color-teal)", "Accuracy per round")}
      {chart("seconds", " s", "var(--color-rosewood)", "Median time per round")}
    </div>
  );
}
