import { useState } from "react";
import { Form, Link, redirect, useNavigation, useSearchParams } from "react-router";
import { z } from "zod";
import { mayFileUnderClass, requireReadingSet, requireRound } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { Button, buttonClass, Card, Field, Notice, PageTitle, SelectField } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import { formErrors } from "~/lib/userError";
import { KEYS } from "~/music/keys";
import { TUNINGS } from "~/music/tuning";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { READING_PRESETS } from "~/reading/presets";
import { hostableSet, setsFor } from "~/reading/sets.server";
import { describeReadingSet, keyClash, NATURALS_KEY_CLASH, parseReadingSet } from "~/reading/spec";
import { createRoom, roomSetup, type RoomSource } from "~/rooms/rooms.server";
import { QUICK_DEFAULTS, quickSetupSchema, setupFromSet, type ParsedSetup } from "~/rooms/setup";
import { classesFor } from "~/school/classes.server";
import { tunesFor } from "~/tunes/tunes.server";
import type { Route } from "./+types/host";
import { Icon } from "~/components/Icon";

export const meta: Route.MetaFunction = () => [{ title: "Host a round · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const [classList, saved, tuneList] = await Promise.all([classesFor(db, user), setsFor(db, user), tunesFor(db, user.orgId)]);
  const params = new URL(request.url).searchParams;
  const classId = params.get("class");
  const presets = READING_PRESETS.map((p) => ({ id: p.id, name: p.name, note: `Ready-made · step ${p.step}`, summary: describeReadingSet(p.spec), classId: null }));
  const own = saved.filter((s) => s.spec).map((s) => ({ id: s.id, name: s.name, note: s.className ?? "Whole school", summary: s.summary, classId: s.classId }));
  return {
    classes: classList.map((c) => ({ id: c.id, name: c.name })),
    // An empty ?class= is "No class", chosen on purpose.
    classId: classId === "" || classList.some((c) => c.id === classId) ? classId : (classList[0]?.id ?? ""),
    sets: [...own, ...presets],
    chosen: params.get("set"),
    tunes: tuneList.map((t) => ({ id: t.id, title: t.title })),
    // From a tune's page: "Host a Tune walk of these bars".
    tuneWalk: params.get("mode") === "tune-walk" ? { tune: params.get("tune"), position: params.get("position"), from: params.get("from"), to: params.get("to") } : null,
  };
}

type Errors = Record<string, string | undefined>;

/** Opens the room, or says in plain words why the settings don't make one. */
async function open(db: Db, user: SessionUser, setup: ParsedSetup, source?: RoomSource) {
  if (setup.set.classId && !(await mayFileUnderClass(db, user, setup.set.classId))) return { errors: { classId: "You don't teach that class." } as Errors };
  try {
    const room = await createRoom(db, user, setup, source);
    return redirect(`/stage/${room.id}`);
  } catch (error) {
    return { errors: formErrors(error) as Errors };
  }
}

const actionSchema = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("set"), set: z.string().max(200).default("") }),
  z.object({ intent: z.literal("again"), roomId: z.string().max(64).default("") }),
  // The quick set-up's own fields are checked by quickSetupSchema below.
  z.object({ intent: z.literal("quick") }),
]);

export async function action({ request, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const form = await request.formData();
  // The quick set-up is the page's main form: a post without an intent is that one.
  if (!form.has("intent")) form.set("intent", "quick");
  const intent = parseForm(actionSchema, form);
  if (!intent.ok) return { errors: { form: "Unknown action." } as Errors };
  const input = intent.data;
  const classId = String(form.get("classId") ?? "") || undefined;
  if (input.intent === "set") {
    await requireReadingSet(db, user, input.set, "see");
    const chosen = await hostableSet(db, user, input.set);
    if (!chosen) return { errors: { set: "That reading set doesn't exist or needs an edit first." } as Errors };
    return open(db, user, setupFromSet(chosen.reading, classId), chosen.source);
  }
  if (input.intent === "again") {
    const room = await requireRound(db, user, input.roomId);
    const again = roomSetup(room);
    if (!again) return { errors: { form: "This round was hosted before its settings were kept; set it up again below." } as Errors };
    return open(db, user, again.setup, again.source);
  }
  const parsed = parseReadingSet(quickSetupSchema, form);
  if (!parsed.ok) return { errors: parsed.errors };
  const clash = keyClash(parsed.set);
  if (clash) return { errors: { keyFifths: clash } as Errors };
  return open(db, user, parsed);
}

const MODES = [
  { id: "sprint", icon: "bolt", name: "Sprint", text: "Notes drawn from the position. Fastest right tap scores most." },
  { id: "tune-walk", icon: "notes", name: "Tune walk", text: "The notes of a melody, in order, pitch only. The tune is named at the end." },
  { id: "full-neck", icon: "grid", name: "Full neck", text: "Together, find every place a pitch lives on the neck before time runs out." },
  { id: "teams", icon: "flag", name: "Teams", text: "Balanced teams; a team scores the mean of its members." },
] as const;

/** The modes that draw their notes from the position (all but Tune walk, which reads a tune). */
const DRAWN = "sprint full-neck teams";

const select = "mt-1 block min-h-11 w-full rounded-xl border-2 border-ink/20 bg-white px-3 py-2 text-lg";

export default function Host({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Errors = actionData?.errors ?? {};
  const busy = useNavigation().state !== "idle";
  const [classId, setClassId] = useState(loaderData.classId ?? "");
  const [params] = useSearchParams();
  const d = QUICK_DEFAULTS;
  // A set picked elsewhere (?set=…) comes first, so hosting it is one click away.
  const sets = [...loaderData.sets].sort((a, b) => Number(b.id === loaderData.chosen) - Number(a.id === loaderData.chosen));
  return (
    <div className="mx-auto max-w-3xl space-y-6">
      <PageTitle lead="Choose what the class reads. Students join with the room code on the class screen.">Host a round</PageTitle>
      {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
      {/* A form of its own, as both forms below need the class: with JavaScript the choice applies at
          once; without, "Use this class" reloads the page with it (the rest of the address kept). */}
      <Form method="get" className="flex flex-wrap items-end gap-2">
        {[...params].filter(([k]) => k !== "class").map(([k, v]) => (
          <input key={k} type="hidden" name={k} value={v} />
        ))}
        <div className="min-w-0 flex-1">
          <SelectField
            label="Class"
            name="class"
            value={classId}
            onChange={(e) => setClassId(e.target.value)}
            error={errors.classId}
            hint="Rounds for a class use the class's home-spot map and count towards its class review."
            options={[{ value: "", label: "No class (a one-off round)" }, ...loaderData.classes.map((c) => ({ value: c.id, label: c.name }))]}
          />
        </div>
        <noscript>
          <button className={buttonClass("ghost")}>Use this class</button>
        </noscript>
      </Form>
      <section aria-labelledby="sets-heading">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="sets-heading" className="font-display text-2xl font-semibold">
            From a reading set
          </h2>
          <Link to="/teach/sets" className="text-sky underline">
            Manage reading sets
          </Link>
        </div>
        {errors.set ? <Notice tone="error">{errors.set}</Notice> : null}
        <Form method="post" className="mt-3 grid gap-3 sm:grid-cols-2">
          <input type="hidden" name="intent" value="set" />
          <input type="hidden" name="classId" value={classId} />
          {sets.map((set) => (
            <Card key={set.id} className={set.id === loaderData.chosen ? "border-2 border-teal" : ""}>
              <p className="text-sm text-ink-soft">
                {set.note}
                {set.id === loaderData.chosen ? <span className="font-semibold text-ink"> · ✓ chosen</span> : null}
              </p>
              <h3 className="font-display text-xl font-semibold">{set.name}</h3>
              <p className="mt-1 text-sm">{set.summary}</p>
              <Button type="submit" name="set" value={set.id} tone="teal" disabled={busy} className="mt-3" aria-label={`Host this set: ${set.name}`}>
                <Icon name="play" className="h-4 w-4" /> Host this set
              </Button>
            </Card>
          ))}
        </Form>
      </section>
      <h2 className="font-display text-2xl font-semibold">Or a quick setup for a one-off</h2>
      {/* Each field names the modes it belongs to (data-modes); app.css hides the rest for the chosen mode. */}
      <Form method="post" className="mode-fields space-y-6" noValidate>
        <input type="hidden" name="intent" value="quick" />
        <input type="hidden" name="classId" value={classId} />
        {errors.pool ? <Notice tone="error">{errors.pool}</Notice> : null}
        <fieldset>
          <legend className="font-display text-xl font-semibold">Mode</legend>
          <div className="mt-2 grid gap-3 sm:grid-cols-2">
            {MODES.map((m) => (
              <label key={m.id} className="flex cursor-pointer gap-3 rounded-2xl border-2 border-ink/15 bg-white/70 p-4 has-[:checked]:border-teal has-[:checked]:bg-teal/10">
                <input type="radio" name="mode" value={m.id} defaultChecked={m.id === (loaderData.tuneWalk ? "tune-walk" : d.mode)} className="mt-1 h-5 w-5 accent-teal" />
                <span>
                  <span className="font-display text-lg font-semibold">
                    <Icon name={m.icon} className="h-5 w-5" /> {m.name}
                  </span>
                  <span className="block text-sm text-ink-soft">{m.text}</span>
                </span>
              </label>
            ))}
          </div>
        </fieldset>
        <Card className="grid gap-4 sm:grid-cols-2">
          <label className="block">
            <span className="font-medium">Position (index finger at fret)</span>
            <select name="position" defaultValue={loaderData.tuneWalk?.position ?? d.position} className={select}>
              {Array.from({ length: 12 }, (_, i) => i + 1).map((n) => (
                <option key={n} value={n}>
                  Position {n}
                </option>
              ))}
            </select>
          </label>
          <label className="block">
            <span className="font-medium">Tuning</span>
            <select name="tuning" defaultValue={d.tuning} className={select}>
              {Object.values(TUNINGS).map((t) => (
                <option key={t.id} value={t.id}>
                  {t.name}
                </option>
              ))}
            </select>
          </label>
          <label className="block" data-modes={DRAWN}>
            <span className="font-medium">Notes to read</span>
            <select name="accidentals" defaultValue={d.accidentals} className={select}>
              <option value="naturals">Naturals only (no key signature)</option>
              <option value="key">Notes of the key signature</option>
              <option value="chromatic">Every note, with accidentals</option>
            </select>
          </label>
          <label className="block" data-modes={DRAWN}>
            <span className="font-medium">Key signature</span>
            <select name="keyFifths" defaultValue={d.keyFifths} className={select} aria-describedby="key-clash">
              {KEYS.filter((k) => k.mode === "major").map((k) => (
                <option key={k.id} value={k.fifths}>
                  {k.name} · {k.fifths === 0 ? "no sharps or flats" : `${Math.abs(k.fifths)} ${k.fifths > 0 ? "♯" : "♭"}`}
                </option>
              ))}
            </select>
          </label>
          {/* The server's refusal once posted; before that, the same words as soon as the two fields disagree. */}
          <p id="key-clash" data-modes={DRAWN} className={`${errors.keyFifths ? "flex" : "key-clash"} gap-2 rounded-xl border-2 border-brick bg-brick/10 p-3 sm:col-span-2`}>
            <span aria-hidden="true">✗</span>
            {errors.keyFifths ?? NATURALS_KEY_CLASH}
          </p>
          <div data-modes={DRAWN}>
            <Field type="number" inputMode="numeric" name="prompts" label="Number of notes" defaultValue={d.prompts} error={errors.prompts} />
          </div>
          <Field type="number" inputMode="numeric" name="seconds" label="Seconds per note" defaultValue={d.seconds} error={errors.seconds} />
          <label className="flex items-center gap-3" data-modes="sprint tune-walk teams">
            <input type="checkbox" name="homeOnly" defaultChecked={d.homeOnly} className="h-6 w-6 accent-teal" />
            <span>Only the home spot earns full points</span>
          </label>
          <label className="flex items-center gap-3" data-modes={DRAWN}>
            <input type="checkbox" name="ledgerLines" defaultChecked={d.ledgerLines} className="h-6 w-6 accent-teal" />
            <span>Include ledger-line notes</span>
          </label>
          <label className="block" data-modes="tune-walk">
            <span className="font-medium">Tune</span>
            <select name="tuneId" className={select} defaultValue={loaderData.tuneWalk?.tune ?? loaderData.tunes[0]?.id}>
              {loaderData.tunes.map((t) => (
                <option key={t.id} value={t.id}>
                  {t.title}
                </option>
              ))}
            </select>
            {errors.tuneId ? <span className="text-sm text-brick">✗ {errors.tuneId}</span> : null}
          </label>
          <div className="grid grid-cols-2 gap-3" data-modes="tune-walk">
            <Field type="number" inputMode="numeric" name="fromBar" label="From bar" min={1} defaultValue={loaderData.tuneWalk?.from ?? ""} error={errors.fromBar} />
            <Field type="number" inputMode="numeric" name="toBar" label="To bar" min={1} defaultValue={loaderData.tuneWalk?.to ?? ""} error={errors.toBar} />
          </div>
          <p className="text-ink-soft sm:col-span-2" data-modes="tune-walk">
            A Tune walk plays every note of these bars in order (the whole tune when they are left empty), in the tune's own key.
          </p>
          <div data-modes="teams">
            <Field type="number" inputMode="numeric" name="teams" label="Number of teams" defaultValue={d.teams} error={errors.teams} />
          </div>
        </Card>
        <Button type="submit" tone="teal" disabled={busy} className="w-full text-xl">
          {busy ? "Opening the room…" : "Open the room"}
        </Button>
      </Form>
    </div>
  );
}

