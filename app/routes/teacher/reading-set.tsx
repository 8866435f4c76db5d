// Building a reading set: a form checked as it is typed (by the same schema the server uses) and a live preview of
// the note pool on the staff and the neck, computed in the browser by the isomorphic engine.
import { useMemo, useRef, useState } from "react";
import { data, Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import { mayFileUnderClass, readingSetAccess, requireReadingSet } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { PoolPreview } from "~/components/PoolPreview";
import { Button, Card, Field, Notice, PageTitle, SelectField } from "~/components/ui";
import { services } from "~/context";
import { parseForm, type FieldErrors } from "~/lib/forms";
import { KEYS, spellInKey } from "~/music/keys";
import { displayPitchClass } from "~/music/pitch";
import type { PoolNote } from "~/music/pools";
import { resolveTuning, TUNINGS } from "~/music/tuning";
import { readingPreset } from "~/reading/presets";
import { createSet, deleteSet, setFor, updateSet } from "~/reading/sets.server";
import { MODE_NAMES, parseReadingSet, readingSetFormSchema, readingSetSpecSchema, SET_MODES, setFilingSchema, type ReadingSetSpec } from "~/reading/spec";
import { classesFor } from "~/school/classes.server";
import type { Route } from "./+types/reading-set";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.name || "New reading set"} · Fretcall` }];

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const classList = (await classesFor(db, user)).map((c) => ({ id: c.id, name: c.name }));
  if (params.id === "new") {
    const url = new URL(request.url);
    const preset = readingPreset(url.searchParams.get("from") ?? "ready-naturals-5")!;
    const classId = url.searchParams.get("class");
    return { id: null, name: "", classId: classList.some((c) => c.id === classId) ? classId : null, spec: preset.spec, classes: classList, canDelete: false };
  }
  await requireReadingSet(db, user, params.id, "see");
  const set = await setFor(db, user, params.id);
  if (!set) throw data({ error: "No such reading set." }, { status: 404 });
  const canDelete = (await readingSetAccess(db, user, set.id, "edit")) === "ok";
  return { id: set.id, name: set.name, classId: set.classId, spec: set.spec ?? readingPreset("ready-naturals-5")!.spec, classes: classList, canDelete };
}

// The set's own fields are checked by readingSetFormSchema.
const intentSchema = z.enum(["delete", "save"]);

export async function action({ request, params, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  if (params.id !== "new") await requireReadingSet(db, user, params.id, "edit");
  const existing = params.id === "new" ? undefined : await setFor(db, user, params.id);
  if (params.id !== "new" && !existing) throw data({ error: "No such reading set." }, { status: 404 });
  const form = await request.formData();
  // The editor is the page's main form: a post without an intent saves.
  if (!form.has("intent")) form.set("intent", "save");
  const intent = intentSchema.safeParse(form.get("intent"));
  if (!intent.success) return { errors: { form: "Unknown action." } as FieldErrors };
  if (existing && intent.data === "delete") {
    await deleteSet(db, existing.id);
    return redirect(`/teach/sets?done=${encodeURIComponent(`Deleted “${existing.name}”.`)}`);
  }
  const parsed = parseReadingSet(readingSetFormSchema, form);
  if (!parsed.ok) return { errors: parsed.errors };
  const { name, classId, ...spec } = parsed.set;
  if (!(await mayFileUnderClass(db, user, classId))) return { errors: { classId: "You don't teach that class." } as FieldErrors };
  const input = { name, classId: classId ?? null, spec };
  if (existing) await updateSet(db, existing.id, input);
  const id = existing?.id ?? (await createSet(db, user, input));
  return redirect(`/teach/sets?done=${encodeURIComponent(`Saved “${name}”.`)}&set=${id}`);
}

type Values = Record<string, string | boolean | number[]>;

function valuesOf(spec: ReadingSetSpec, name: string, classId: string | null): Values {
  return {
    name,
    classId: classId ?? "",
    mode: spec.mode,
    position: String(spec.position),
    tuning: spec.tuning,
    frets: String(spec.frets),
    strings: spec.strings ?? resolveTuning(spec.tuning).strings.map((_, i) => i + 1),
    lowest: spec.lowest ?? "",
    highest: spec.highest ?? "",
    keyFifths: String(spec.keyFifths),
    accidentals: spec.accidentals,
    ledgerLines: spec.ledgerLines,
    homeOnly: spec.homeOnly,
    prompts: String(spec.prompts),
    seconds: String(spec.seconds),
  };
}

/** The form's values as the browser would post them, so the browser's check and the server's are the same check. */
function asForm(values: Values) {
  const form = new FormData();
  for (const [name, value] of Object.entries(values)) {
    if (Array.isArray(value)) form.set(name, value.join(","));
    else if (typeof value === "boolean") {
      if (value) form.set(name, "on");
    } else form.set(name, value);
  }
  return form;
}

/** Everything the page shows while typing, from one parse of the reading set (so one pool) and a check of its name. */
function check(values: Values) {
  const form = asForm(values);
  const filing = parseForm(setFilingSchema, form);
  const reading = parseReadingSet(readingSetSpecSchema, form);
  const errors: FieldErrors = { ...(filing.ok ? {} : filing.errors), ...(reading.ok ? {} : reading.errors) };
  const preview = reading.ok
    ? { error: null, pool: reading.pool, spec: reading.spec, tuning: resolveTuning(reading.spec.tuning) }
    : { error: errors.pool ?? "Fix the settings marked in red to see the notes.", pool: null };
  return { errors, preview };
}

export default function ReadingSetPage({ loaderData, actionData }: Route.ComponentProps) {
  const [values, setValues] = useState(() => valuesOf(loaderData.spec, loaderData.name, loaderData.classId));
  const [touched, setTouched] = useState<Set<string>>(new Set());
  const busy = useNavigation().state !== "idle";
  const { errors: live, preview: shown } = useMemo(() => check(values), [values]);
  // While a field is being fixed the last good preview stays, dimmed, rather than vanishing mid-edit.
  const lastGood = useRef<Extract<typeof shown, { pool: PoolNote[] }> | null>(null);
  if (shown.pool) lastGood.current = shown;
  const server: FieldErrors = actionData?.errors ?? {};
  // A field shows its live error once the teacher has changed it; after a post the server's word stands.
  const errorOf = (name: string) => (touched.has(name) ? live[name] : server[name]);
  const set = (name: string, value: string | boolean | number[]) => {
    setValues((v) => ({ ...v, [name]: value }));
    setTouched((t) => new Set(t).add(name));
  };
  const text = (name: string) => ({
    name,
    value: String(values[name]),
    onChange: (e: { target: { value: string } }) => set(name, e.target.value),
    error: errorOf(name),
  });
  // An unknown tuning is reported on its field; meanwhile the string checkboxes follow standard tuning.
  const tuning = (() => {
    try {
      return resolveTuning(String(values.tuning));
    } catch {
      return TUNINGS.standard;
    }
  })();
  const chosenStrings = values.strings as number[];

  return (
    <div className="space-y-6">
      <PageTitle lead="Choose what the class reads. The preview shows every note the round can draw, at its home spot.">
        {loaderData.id ? `Edit “${loaderData.name}”` : "New reading set"}
      </PageTitle>
      <div className="grid grid-cols-1 gap-6 lg:grid-cols-2">
        <Form method="post" noValidate className="space-y-4">
          {Object.keys(server).length > 0 ? <Notice tone="error">Nothing was saved: see the fields marked below.</Notice> : null}
          <Card className="grid gap-4 sm:grid-cols-2">
            <div className="sm:col-span-2">
              <Field label="Name" {...text("name")} autoComplete="off" hint="Such as “Week 3: G major”." />
            </div>
            <SelectField label="Class" {...text("classId")} options={[{ value: "", label: "Whole school" }, ...loaderData.classes.map((c) => ({ value: c.id, label: c.name }))]} />
            <SelectField label="Default mode" {...text("mode")} options={SET_MODES.map((m) => ({ value: m, label: MODE_NAMES[m] }))} />
            <SelectField
              label="Position"
              {...text("position")}
              hint="Fret under the index finger."
              options={Array.from({ length: 12 }, (_, i) => ({ value: String(i + 1), label: `Position ${i + 1}` }))}
            />
            <SelectField label="Tuning" {...text("tuning")} options={Object.values(TUNINGS).map((t) => ({ value: t.id, label: t.name }))} />
            <Field label="Frets on the neck" type="number" inputMode="numeric" {...text("frets")} />
            <SelectField
              label="Notes to read"
              {...text("accidentals")}
              options={[
                { value: "naturals", label: "Naturals only (no key signature)" },
                { value: "key", label: "Notes of the key signature" },
                { value: "chromatic", label: "Every note, with accidentals" },
              ]}
            />
            <SelectField
              label="Key signature"
              {...text("keyFifths")}
              hint={values.accidentals === "naturals" ? "Naturals read without a key signature." : undefined}
              disabled={values.accidentals === "naturals"}
              options={KEYS.filter((k) => k.mode === "major").map((k) => ({
                value: String(k.fifths),
                label: `${k.name} · ${k.fifths === 0 ? "no sharps or flats" : `${Math.abs(k.fifths)} ${k.fifths > 0 ? "♯" : "♭"}`}`,
              }))}
            />
            {values.accidentals === "naturals" ? <input type="hidden" name="keyFifths" value={String(values.keyFifths)} /> : null}
            <Field label="Lowest written note" {...text("lowest")} hint="Optional, such as E4." autoComplete="off" spellCheck={false} />
            <Field label="Highest written note" {...text("highest")} hint="Optional, such as G5." autoComplete="off" spellCheck={false} />
            <fieldset className="sm:col-span-2">
              <legend className="font-medium">Strings</legend>
              <input type="hidden" name="strings" value="" />
              <div className="mt-1 flex flex-wrap gap-3">
                {Array.from({ length: tuning.strings.length }, (_, i) => i + 1).map((n) => (
                  <label key={n} className="flex min-h-11 items-center gap-2">
                    <input
                      type="checkbox"
                      name="strings"
                      value={n}
                      checked={chosenStrings.includes(n)}
                      onChange={(e) => set("strings", e.target.checked ? [...chosenStrings, n].sort((a, b) => a - b) : chosenStrings.filter((s) => s !== n))}
                      className="h-5 w-5 accent-teal"
                    />
                    {n} ({displayPitchClass(spellInKey(tuning.strings[n - 1]!, 0))})
                  </label>
                ))}
              </div>
              {errorOf("strings") ? (
                <p className="mt-1 text-sm font-medium text-brick">
                  <span aria-hidden="true">✗ </span>
                  {errorOf("strings")}
                </p>
              ) : null}
            </fieldset>
            <label className="flex min-h-11 items-center gap-3">
              <input type="checkbox" name="ledgerLines" checked={values.ledgerLines as boolean} onChange={(e) => set("ledgerLines", e.target.checked)} className="h-6 w-6 accent-teal" />
              Include ledger-line notes
            </label>
            <label className="flex min-h-11 items-center gap-3">
              <input type="checkbox" name="homeOnly" checked={values.homeOnly as boolean} onChange={(e) => set("homeOnly", e.target.checked)} className="h-6 w-6 accent-teal" />
              Only the home spot earns full points
            </label>
            <Field label="Number of notes" type="number" inputMode="numeric" {...text("prompts")} />
            <Field label="Seconds per note" type="number" inputMode="numeric" {...text("seconds")} />
          </Card>
          {server.pool ? <Notice tone="error">{server.pool}</Notice> : null}
          <div className="flex flex-wrap gap-3">
            <Button type="submit" tone="teal" disabled={busy}>
              {busy ? "Saving…" : "Save reading set"}
            </Button>
            <Link to="/teach/sets" className="inline-flex min-h-11 items-center px-3 text-sky underline">
              Cancel
            </Link>
          </div>
        </Form>
        <Card className="space-y-3 self-start">
          <h2 className="font-display text-2xl font-semibold">Preview</h2>
          {shown.error ? <Notice tone="info">{shown.error}</Notice> : null}
          {lastGood.current ? (
            <div className={shown.pool ? "" : "opacity-50"}>
              <PoolPreview
                pool={lastGood.current.pool}
                keyFifths={lastGood.current.spec.keyFifths}
                tuning={lastGood.current.tuning}
                frets={lastGood.current.spec.frets}
                position={lastGood.current.spec.position}
              />
            </div>
          ) : null}
        </Card>
      </div>
      {loaderData.canDelete ? (
        <Form method="post" onSubmit={(e) => !confirm(`Delete “${loaderData.name}”?`) && e.preventDefault()}>
          <input type="hidden" name="intent" value="delete" />
          <Button type="submit" tone="ghost">
            <span aria-hidden="true">✗</span> Delete this set
          </Button>
        </Form>
      ) : null}
    </div>
  );
}
