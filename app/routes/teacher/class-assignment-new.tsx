// Setting an assignment: what to practise, for whom, the goal and the due date. Bad input comes back
// with a message beside its field and everything typed kept.
import { useEffect, useRef, useState } from "react";
import { Form, Link, redirect, useNavigation, useSearchParams } from "react-router";
import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { Button, Card, Field, Notice, PageTitle, SelectField } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import {
  assignmentFormSchema,
  classAssignmentsPath,
  collectStudents,
  DEFAULT_GOAL,
  defaultDue,
  GOAL_ACCURACY_RANGE,
  GOAL_NOTES_RANGE,
  GOAL_SECONDS_RANGE,
} from "~/practice/assignmentForm";
import { classStudents, createAssignment, materialOptions } from "~/practice/assignments.server";
import { sendAssignmentNotices } from "~/practice/mail.server";
import type { Route } from "./+types/class-assignment-new";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Set an assignment${data ? ` · ${data.cls.name}` : ""} · Fretcall` }];

const GOAL_FIELDS: { name: string; label: string; range: readonly [number, number]; value: number; step?: string; hint?: string }[] = [
  { name: "goalNotes", label: "Notes in a row", range: GOAL_NOTES_RANGE, value: DEFAULT_GOAL.notes },
  { name: "goalAccuracy", label: "Percent correct", range: GOAL_ACCURACY_RANGE, value: DEFAULT_GOAL.accuracyPct },
  { name: "goalSeconds", label: "Median time under (s)", range: GOAL_SECONDS_RANGE, value: DEFAULT_GOAL.seconds, step: "0.1", hint: "Empty: no time goal." },
];

const GROUP_WORDS = { "Reading sets": "Reading set", "Ready-made reading sets": "Ready-made", Tunes: "Tune" } as const;

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const [options, students] = await Promise.all([materialOptions(db, user, cls.id), classStudents(db, cls.id)]);
  return {
    cls: { id: cls.id, name: cls.name },
    materials: options.map((o) => ({ value: o.value, label: `${GROUP_WORDS[o.group]}: ${o.label}` })),
    students: students.map((s) => ({ id: s.id, displayName: s.displayName, hasEmail: s.email !== null })),
    defaultDue: defaultDue(Date.now()),
  };
}

export async function action({ request, params, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db, mailer, env } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const form = collectStudents(await request.formData());
  const values = Object.fromEntries([...form].map(([k, v]) => [k, String(v)]));
  const now = Date.now();
  const parsed = parseForm(assignmentFormSchema(now), form);
  if (!parsed.ok) return { errors: parsed.errors, values };
  const created = await createAssignment(db, user, cls, parsed.data, now);
  if (!created.ok) return { errors: created.errors, values };
  // The assignment is stored; a mail that fails now is retried by the scheduled pass (mail.server.ts).
  const mailed = await sendAssignmentNotices(db, mailer, now, env.PUBLIC_URL, created.id);
  return redirect(`${classAssignmentsPath(cls.id)}?set=${created.id}&mailed=${mailed.sent}`);
}

export default function NewAssignment({ loaderData: { cls, materials, students, defaultDue }, actionData }: Route.ComponentProps) {
  const errors: Record<string, string | undefined> = actionData?.errors ?? {};
  // "Assign it for practice" on the class hub arrives with the material chosen.
  const chosen = useSearchParams()[0].get("material") ?? undefined;
  const v: Record<string, string | undefined> = actionData?.values ?? { material: chosen };
  const busy = useNavigation().state !== "idle";
  const chosenBefore = new Set((v.students ?? "").split(",").filter(Boolean));
  const [audience, setAudience] = useState(v.audience === "chosen" ? "chosen" : "class");
  // The due time is typed in the teacher's own time zone; the browser tells the server which one that is.
  const tz = useRef<HTMLInputElement>(null);
  useEffect(() => {
    if (tz.current) tz.current.value = String(new Date().getTimezoneOffset());
  }, []);
  const firstError = Object.values(errors).find(Boolean);

  return (
    <div className="mx-auto max-w-3xl space-y-6">
      <PageTitle lead="Students see it on their home page with a Practise link, and get a notice by e-mail if they have an address.">
        Set an assignment · {cls.name}
      </PageTitle>
      {firstError ? <Notice tone="error">Nothing was saved yet. Check the fields marked below.</Notice> : null}
      <Form method="post" noValidate className="space-y-6">
        <Card className="space-y-4">
          <h2 className="font-display text-xl font-semibold">What to practise</h2>
          <SelectField
            label="Reading set or tune"
            name="material"
            options={[{ value: "", label: "Choose…" }, ...materials]}
            defaultValue={v.material ?? ""}
            error={errors.material}
            required
          />
          <Field label="Title (optional)" name="title" defaultValue={v.title ?? ""} error={errors.title} hint="Leave it empty to use the name of the set or tune." maxLength={80} />
        </Card>

        <Card>
          <fieldset aria-describedby={errors.students ? "students-error" : undefined}>
            <legend className="font-display text-xl font-semibold">For whom</legend>
            <div className="mt-3 flex flex-wrap gap-4">
              {[
                { value: "class", label: `The whole class (${students.length})` },
                { value: "chosen", label: "Chosen students" },
              ].map((o) => (
                <label key={o.value} className="flex min-h-11 items-center gap-2 text-lg">
                  <input type="radio" name="audience" value={o.value} checked={audience === o.value} onChange={() => setAudience(o.value)} className="h-5 w-5" />
                  {o.label}
                </label>
              ))}
            </div>
            {/* Left enabled so the form works before scripts load; for the whole class the ticks are ignored.
                Shaded rather than faded, so the names keep their contrast. */}
            <div className={audience === "chosen" ? "mt-3" : "mt-3 rounded-xl bg-ink/5 p-2"}>
              <input type="hidden" name="students" value="" />
              <ul className="grid gap-1 sm:grid-cols-2">
                {students.map((s) => (
                  <li key={s.id}>
                    <label className="flex min-h-11 items-center gap-2">
                      <input type="checkbox" name="students" value={s.id} defaultChecked={chosenBefore.has(s.id)} className="h-5 w-5" />
                      {s.displayName}
                      {s.hasEmail ? null : <span className="text-sm text-ink-soft">(no e-mail)</span>}
                    </label>
                  </li>
                ))}
              </ul>
            </div>
            {errors.students ? (
              <p id="students-error" className="mt-1 text-sm font-medium text-brick">
                <span aria-hidden="true">✗ </span>
                {errors.students}
              </p>
            ) : null}
          </fieldset>
        </Card>

        <Card className="space-y-4">
          <h2 className="font-display text-xl font-semibold">Goal and due date</h2>
          <div className="grid gap-4 sm:grid-cols-3">
            {GOAL_FIELDS.map((f) => (
              <Field
                key={f.name}
                label={f.label}
                name={f.name}
                type="number"
                inputMode={f.step ? "decimal" : "numeric"}
                step={f.step}
                min={f.range[0]}
                max={f.range[1]}
                defaultValue={v[f.name] ?? f.value}
                error={errors[f.name]}
                hint={f.hint}
              />
            ))}
          </div>
          <p className="text-sm text-ink-soft">
            Done when the student's latest answers — that many in a row — reach the percent correct, with the median time of their right-pitch answers under the time.
          </p>
          <label className="flex min-h-11 items-start gap-2 text-lg">
            <input type="checkbox" name="playedOnly" defaultChecked={v.playedOnly === "on"} className="mt-1 h-5 w-5" aria-describedby="played-only-hint" />
            <span>
              Ask for played answers
              <span id="played-only-hint" className="block text-sm text-ink-soft">
                Only notes the student plays on their guitar, heard by the phone's microphone, count toward the goal; taps on the screen do not.
              </span>
            </span>
          </label>
          <Field label="Due" name="due" type="datetime-local" defaultValue={v.due ?? defaultDue} error={errors.due} required />
          <input ref={tz} type="hidden" name="tzOffset" defaultValue={v.tzOffset ?? ""} />
        </Card>

        <div className="flex flex-wrap items-center gap-3">
          <Button type="submit" tone="teal" disabled={busy}>
            Set the assignment
          </Button>
          <Link to={classAssignmentsPath(cls.id)} className="underline">
            Cancel
          </Link>
        </div>
      </Form>
    </div>
  );
}
