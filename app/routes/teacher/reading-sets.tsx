// The teacher's reading sets: their own and the school's, the ready-made progression, and copying a set into a class.
import { data, Form, Link, redirect } from "react-router";
import { z } from "zod";
import { mayFileUnderClass, readingSetAccess, requireReadingSet } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { DataTable, type Column } from "~/components/DataTable";
import { Badge, Button, buttonClass, Card, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import { READING_PRESETS } from "~/reading/presets";
import { createSet, deleteSet, hostableSet, setFor, setsFor, type SavedSet } from "~/reading/sets.server";
import { describeReadingSet } from "~/reading/spec";
import { classesFor } from "~/school/classes.server";
import type { Route } from "./+types/reading-sets";
import { Icon } from "~/components/Icon";
import { day } from "~/review/format";

export const meta: Route.MetaFunction = () => [{ title: "Reading sets · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const [sets, classList] = await Promise.all([setsFor(db, user), classesFor(db, user)]);
  return {
    // Delete is offered only where the access rules allow it (docs/decisions/0005-access-rules.md).
    sets: await Promise.all(sets.map(async (s) => ({ ...s, canEdit: (await readingSetAccess(db, user, s.id, "edit")) === "ok" }))),
    classes: classList.map((c) => ({ id: c.id, name: c.name })),
    presets: READING_PRESETS.map((p) => ({ ...p, summary: describeReadingSet(p.spec) })),
    done: new URL(request.url).searchParams.get("done"),
  };
}

const actionSchema = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("delete"), id: z.string().max(64).default("") }),
  z.object({ intent: z.literal("copy"), id: z.string().max(64).default(""), classId: z.string().max(64).default("") }),
]);

export async function action({ request, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const parsed = parseForm(actionSchema, await request.formData());
  if (!parsed.ok) return { error: "Choose delete or copy." };
  const input = parsed.data;
  const id = input.id;
  if (input.intent === "delete") {
    await requireReadingSet(db, user, id, "edit");
    const set = await setFor(db, user, id);
    if (!set) throw data({ error: "No such reading set." }, { status: 404 });
    await deleteSet(db, set.id);
    return redirect(`/teach/sets?done=${encodeURIComponent(`Deleted “${set.name}”.`)}`);
  }
  if (input.intent === "copy") {
    const classId = input.classId || null;
    await requireReadingSet(db, user, id, "see");
    const from = await hostableSet(db, user, id);
    if (!from) return { error: "That reading set doesn't exist or needs an edit first." };
    if (!(await mayFileUnderClass(db, user, classId))) return { error: "You don't teach that class." };
    const copy = await createSet(db, user, { name: from.source.name, classId, spec: from.reading.set });
    return redirect(`/teach/sets/${copy}`);
  }
}

export default function ReadingSets({ loaderData, actionData }: Route.ComponentProps) {
  const { sets, classes, presets, done } = loaderData;
  const columns: Column<SavedSet & { canEdit: boolean }>[] = [
    { key: "name", header: "Name", cell: (s) => <Link to={`/teach/sets/${s.id}`} className="font-semibold text-sky underline">{s.name}</Link> },
    { key: "className", header: "Class", cell: (s) => s.className ?? "Whole school", sortValue: (s) => s.className ?? "" },
    { key: "summary", header: "What it reads", cell: (s) => (s.spec ? s.summary : <Badge tone="miss">{s.summary}</Badge>) },
    { key: "updatedAt", header: "Changed", cell: (s) => day(s.updatedAt), sortValue: (s) => s.updatedAt },
    {
      key: "actions",
      header: <span className="sr-only">Actions</span>,
      sortable: false,
      cell: (s) => (
        <div className="flex flex-wrap gap-2">
          {s.spec ? (
            <Link to={`/host?set=${s.id}${s.classId ? `&class=${s.classId}` : ""}`} className={buttonClass("teal", "text-base")}>
              <Icon name="play" className="h-4 w-4" /> Host
            </Link>
          ) : null}
          <Form method="post" hidden={!s.canEdit} onSubmit={(e) => !confirm(`Delete “${s.name}”? Rounds already played keep their results.`) && e.preventDefault()}>
            <input type="hidden" name="intent" value="delete" />
            <input type="hidden" name="id" value={s.id} />
            <Button type="submit" tone="ghost" className="text-base" aria-label={`Delete ${s.name}`}>
              <Icon name="cross" className="h-4 w-4" /> Delete
            </Button>
          </Form>
        </div>
      ),
    },
  ];
  return (
    <div className="space-y-8">
      <PageTitle lead="What each class reads next. Pick one when you host a round; start from a ready-made step or build your own.">Reading sets</PageTitle>
      {done ? <Notice tone="success">{done}</Notice> : null}
      {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}
      <section aria-labelledby="own-heading" className="space-y-3">
        <div className="flex flex-wrap items-center justify-between gap-3">
          <h2 id="own-heading" className="font-display text-2xl font-semibold">
            Your school's sets
          </h2>
          <Link to="/teach/sets/new" className={buttonClass("teal")}>
            <Icon name="plus" className="h-5 w-5" /> New reading set
          </Link>
        </div>
        <DataTable rows={sets} columns={columns} rowKey={(s) => s.id} caption="Saved reading sets" filterPlaceholder="Filter sets" empty="No saved sets yet: copy a ready-made one below or build your own." />
      </section>
      <section aria-labelledby="ready-heading" className="space-y-3">
        <h2 id="ready-heading" className="font-display text-2xl font-semibold">
          Ready-made progression
        </h2>
        <p className="text-ink-soft">Each step adds one thing to the step before. Host one as it is, or copy it into a class to adjust it.</p>
        <ol className="grid gap-3 md:grid-cols-2">
          {presets.map((p) => (
            <li key={p.id}>
              <Card>
                <p className="text-sm text-ink-soft">Step {p.step}</p>
                <h3 className="font-display text-xl font-semibold">{p.name}</h3>
                <p className="mt-1">{p.adds}</p>
                <p className="mt-1 text-sm text-ink-soft">{p.summary}</p>
                <div className="mt-3 flex flex-wrap items-end gap-2">
                  <Link to={`/host?set=${p.id}`} className={buttonClass("teal", "text-base")}>
                    <Icon name="play" className="h-4 w-4" /> Host
                  </Link>
                  <Form method="post" className="flex flex-wrap items-end gap-2">
                    <input type="hidden" name="intent" value="copy" />
                    <input type="hidden" name="id" value={p.id} />
                    <label className="text-sm">
                      <span className="sr-only">Copy “{p.name}” into</span>
                      <select name="classId" className="min-h-11 rounded-xl border-2 border-ink/20 bg-white px-2 text-base" aria-label={`Class for ${p.name}`}>
                        {classes.map((c) => (
                          <option key={c.id} value={c.id}>
                            {c.name}
                          </option>
                        ))}
                        <option value="">Whole school</option>
                      </select>
                    </label>
                    <Button type="submit" tone="ghost" className="text-base" aria-label={`Copy into class: ${p.name}`}>
                      Copy into class
                    </Button>
                  </Form>
                </div>
              </Card>
            </li>
          ))}
        </ol>
      </section>
    </div>
  );
}
