import { data, Form, Link, redirect } from "react-router";
import { requireTune, tuneAccess } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { Staff } from "~/components/Staff";
import { Button, buttonClass, Card, Notice, PageTitle, SelectField } from "~/components/ui";
import { services } from "~/context";
import { defaultSpotMap, homeSpotFor } from "~/music/positions";
import { displayPitch, parsePitch, pitchMidi } from "~/music/pitch";
import { resolveTuning } from "~/music/tuning";
import { barRange, deleteTune, findTune } from "~/tunes/tunes.server";
import type { Route } from "./+types/tune";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.tune.title ?? "Tune"} · Fretcall` }];

const whole = (v: string | null, fallback: number) => (v !== null && /^\d{1,4}$/.test(v) ? Number(v) : fallback);

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const tune = await findTune(db, user.orgId, params.tuneId);
  if (!tune) throw data({ error: "No such tune." }, { status: 404 });
  const q = new URL(request.url).searchParams;
  const lastBar = tune.notes.at(-1)?.bar ?? 1;
  const position = Math.min(12, Math.max(1, whole(q.get("position"), 5)));
  const from = Math.min(lastBar, Math.max(1, whole(q.get("from"), 1)));
  const to = Math.min(lastBar, Math.max(from, whole(q.get("to"), lastBar)));
  const map = defaultSpotMap(position, resolveTuning("standard"));
  const notes = barRange(tune, from, to);
  // A Tune walk in this position can only ask for notes the position reaches.
  const outside = notes.filter((n) => !homeSpotFor(map, pitchMidi(parsePitch(n.pitch)))).map((n) => `${displayPitch(parsePitch(n.pitch))} (bar ${n.bar})`);
  const bars = Array.from({ length: to - from + 1 }, (_, i) => from + i).map((bar) => ({ bar, notes: notes.filter((n) => n.bar === bar).map((n) => n.pitch) }));
  const canDelete = (await tuneAccess(db, user, tune.id, "edit")) === "ok";
  return { tune: { id: tune.id, title: tune.title, builtin: tune.builtin, keyFifths: tune.keyFifths, lastBar }, canDelete, position, from, to, bars, outside };
}

export async function action({ request, params, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  await requireTune(db, user, params.tuneId, "edit");
  if ((await request.formData()).get("intent") !== "delete") throw data({ error: "Unknown action." }, { status: 400 });
  if (!(await deleteTune(db, user.orgId, params.tuneId))) return { error: "This tune was already deleted." };
  return redirect("/teach/tunes");
}

export default function TunePage({ loaderData: d, actionData }: Route.ComponentProps) {
  const barOptions = Array.from({ length: d.tune.lastBar }, (_, i) => ({ value: String(i + 1), label: `Bar ${i + 1}` }));
  return (
    <div className="space-y-6">
      <PageTitle lead={d.tune.builtin ? "A built-in Fretcall melody." : "Uploaded by your school."}>{d.tune.title}</PageTitle>
      {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}
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
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        {d.bars.map((b) => (
          <Card key={b.bar} className="p-2">
            <p className="px-2 text-sm text-ink-soft">Bar {b.bar}</p>
            {b.notes.length > 0 ? <Staff notes={b.notes.map((written) => ({ written }))} keyFifths={d.tune.keyFifths} size="card" /> : <p className="p-4 text-ink-soft">rests only</p>}
          </Card>
        ))}
      </div>
      <div className="flex flex-wrap gap-3">
        <Link to={`/host?mode=tune-walk&tune=${d.tune.id}&position=${d.position}&from=${d.from}&to=${d.to}`} className={buttonClass("teal")}>
          ♫ Host a Tune walk of these bars
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
