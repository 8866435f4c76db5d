import { data, Form, Link, redirect } from "react-router";
import { z } from "zod";
import { requireTune, tuneAccess } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { TuneStaff } from "~/components/TuneStaff";
import { Button, buttonClass, Card, Notice, PageTitle, SelectField } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import { defaultSpotMap, homeSpotFor } from "~/music/positions";
import { parsePitch, pitchMidi } from "~/music/pitch";
import { resolveTuning } from "~/music/tuning";
import type { StoredScore } from "~/tunes/builtin";
import { barRange, choosePart, deleteTune, findTune } from "~/tunes/tunes.server";
import type { Route } from "./+types/tune";
import { noteName } from "~/review/format";
import { schoolNaming } from "~/school/naming.server";
import { Icon } from "~/components/Icon";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.tune.title ?? "Tune"} · Fretcall` }];

const whole = (v: string | null, fallback: number) => (v !== null && /^\d{1,4}$/.test(v) ? Number(v) : fallback);

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const tune = await findTune(db, user.orgId, params.tuneId);
  if (!tune) throw data({ error: "No such tune." }, { status: 404 });
  const q = new URL(request.url).searchParams;
  // A score's last bars may hold only rests or the end of a tied note; they are drawn too.
  const lastBar = tune.score?.measures.length ?? tune.notes.at(-1)?.bar ?? 1;
  const position = Math.min(12, Math.max(1, whole(q.get("position"), 5)));
  const from = Math.min(lastBar, Math.max(1, whole(q.get("from"), 1)));
  const to = Math.min(lastBar, Math.max(from, whole(q.get("to"), lastBar)));
  const map = defaultSpotMap(position, resolveTuning("standard"));
  const naming = await schoolNaming(db, user.orgId);
  const notes = barRange(tune, from, to);
  // A Tune walk in this position can only ask for notes the position reaches.
  const outside = notes.filter((n) => !homeSpotFor(map, pitchMidi(parsePitch(n.pitch)))).map((n) => `${noteName(n.pitch, naming)} (bar ${n.bar})`);
  const canDelete = (await tuneAccess(db, user, tune.id, "edit")) === "ok";
  return {
    tune: { id: tune.id, title: tune.title, builtin: tune.builtin, keyFifths: tune.keyFifths, lastBar },
    canDelete,
    score: tune.score ? { part: tune.score.part, partId: tune.score.partId, parts: tune.score.parts, leftOut: leftOutWords(tune.score) } : null,
    position,
    from,
    to,
    sheet: { notes: tune.notes, keyFifths: tune.keyFifths, beatsPerBar: tune.beatsPerBar, ...(tune.score ? { score: tune.score } : {}) },
    outside,
  };
}

const counted = (n: number, one: string, many: string) => (n === 0 ? [] : [`${n} ${n === 1 ? one : many}`]);

/** What the melody line leaves out of the score, in plain words (empty when nothing). */
function leftOutWords({ leftOut: l }: StoredScore): string[] {
  return [
    ...counted(l.graceNotes, "grace note", "grace notes"),
    ...counted(l.cueNotes, "cue note (its time is kept as a rest)", "cue notes (their time is kept as rests)"),
    ...counted(l.chordNotes, "lower note of a chord (the top note is kept)", "lower notes of chords (the top notes are kept)"),
    ...counted(l.lowerVoiceNotes, "note of a lower voice", "notes of lower voices"),
    ...(l.otherParts.length ? [`the other ${l.otherParts.length === 1 ? "part" : "parts"}: ${l.otherParts.join(", ")}`] : []),
  ];
}

const actionSchema = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("part"), partId: z.string().max(200).default("") }),
  z.object({ intent: z.literal("delete") }),
]);

export async function action({ request, params, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const parsed = parseForm(actionSchema, await request.formData());
  const { db, readScore } = services(context);
  await requireTune(db, user, params.tuneId, "edit");
  if (!parsed.ok) throw data({ error: "Unknown action." }, { status: 400 });
  const input = parsed.data;
  if (input.intent === "part") {
    const chosen = await choosePart(db, readScore, user.orgId, params.tuneId, input.partId);
    if (!chosen.ok) return { error: `${chosen.error} The tune was left as it was.` };
    return redirect(`/teach/tunes/${params.tuneId}`);
  }
  if (!(await deleteTune(db, user.orgId, params.tuneId))) return { error: "This tune was already deleted." };
  return redirect("/teach/tunes");
}

export default function TunePage({ loaderData: d, actionData }: Route.ComponentProps) {
  const barOptions = Array.from({ length: d.tune.lastBar }, (_, i) => ({ value: String(i + 1), label: `Bar ${i + 1}` }));
  return (
    <div className="space-y-6">
      <PageTitle lead={d.tune.builtin ? "A built-in Fretcall melody." : "Uploaded by your school."}>{d.tune.title}</PageTitle>
      {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}
      {!d.tune.builtin && !d.score ? (
        <Notice tone="error">
          This tune was uploaded before Fretcall kept a score's rests, meters and key changes, and its file was not kept: its rhythm pass counts every bar as four beats. Upload the file
          again to read it fully.
        </Notice>
      ) : null}
      {d.score ? (
        <Card className="space-y-3">
          <p>
            Read from the part <strong>{d.score.part}</strong>.{" "}
            {d.score.leftOut.length > 0 ? `Left out of the melody line: ${d.score.leftOut.join("; ")}.` : "Nothing was left out."}
          </p>
          {d.score.parts.length > 1 ? (
            <Form method="post" className="flex flex-wrap items-end gap-3">
              <input type="hidden" name="intent" value="part" />
              <SelectField
                label="Part to read"
                name="partId"
                defaultValue={d.score.partId}
                options={d.score.parts.map((p) => ({ value: p.id, label: `${p.name} (${p.notes} ${p.notes === 1 ? "note" : "notes"})` }))}
              />
              <Button type="submit" tone="ghost">
                Read this part
              </Button>
            </Form>
          ) : null}
        </Card>
      ) : null}
      <Card>
        <Form method="get" className="grid items-end gap-4 sm:grid-cols-4">
          <SelectField label="Position" name="position" defaultValue={String(d.position)} options={Array.from({ length: 12 }, (_, i) => ({ value: String(i + 1), label: `Position ${i + 1}` }))} />
          <SelectField label="From" name="from" defaultValue={String(d.from)} options={barOptions} />
          <SelectField label="To" name="to" defaultValue={String(d.to)} options={barOptions} />
          <Button type="submit" tone="ghost">
            Preview
          </Button>
        </Form>
      </Card>
      {d.outside.length > 0 ? (
        <Notice tone="error">
          {d.outside.length} {d.outside.length === 1 ? "note falls" : "notes fall"} outside position {d.position}: {d.outside.join(", ")}. Choose another position or fewer bars.
        </Notice>
      ) : (
        <Notice tone="success">Every note of bars {d.from}–{d.to} has a home spot in position {d.position}.</Notice>
      )}
      <Card className="p-2 sm:p-4">
        <h2 className="px-2 text-sm text-ink-soft">
          Bars {d.from}–{d.to}
        </h2>
        <TuneStaff tune={d.sheet} from={d.from} to={d.to} />
      </Card>
      <div className="flex flex-wrap gap-3">
        <Link to={`/host?mode=tune-walk&tune=${d.tune.id}&position=${d.position}&from=${d.from}&to=${d.to}`} className={buttonClass("teal")}>
          <Icon name="notes" className="h-5 w-5" />
          Host a Tune walk of these bars
        </Link>
        {d.canDelete ? (
          <Form method="post" onSubmit={(e) => !confirm("Delete this tune?") && e.preventDefault()}>
            <input type="hidden" name="intent" value="delete" />
            <Button type="submit" tone="ghost">
              Delete tune
            </Button>
          </Form>
        ) : null}
      </div>
    </div>
  );
}
