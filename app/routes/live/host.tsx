import { Form, redirect, useNavigation } from "react-router";
import { requireUserWithRole } from "~/auth/guards.server";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { RoomConfigError } from "~/game/roomConfig";
import { parseForm } from "~/lib/forms";
import { KEYS } from "~/music/keys";
import { MusicError } from "~/music/pitch";
import { TUNINGS } from "~/music/tuning";
import { createRoom } from "~/rooms/rooms.server";
import { QUICK_DEFAULTS, quickSetupSchema } from "~/rooms/setup";
import { classesFor } from "~/school/classes.server";
import { BUILTIN_TUNES } from "~/tunes/builtin";
import type { Route } from "./+types/host";

export const meta: Route.MetaFunction = () => [{ title: "Host a round · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const classList = await classesFor(services(context).db, user);
  const classId = new URL(request.url).searchParams.get("class");
  return {
    classes: classList.map((c) => ({ id: c.id, name: c.name })),
    classId: classList.some((c) => c.id === classId) ? classId : (classList[0]?.id ?? ""),
  };
}

export async function action({ request, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const parsed = parseForm(quickSetupSchema, await request.formData());
  if (!parsed.ok) return { errors: parsed.errors };
  if (parsed.data.classId && !(await classesFor(db, user)).some((c) => c.id === parsed.data.classId)) {
    return { errors: { classId: "You don't teach that class." } };
  }
  try {
    const room = await createRoom(db, user, parsed.data);
    return redirect(`/stage/${room.id}`);
  } catch (error) {
    if (error instanceof RoomConfigError || error instanceof MusicError || error instanceof RangeError) {
      return { errors: { form: error.message } };
    }
    throw error;
  }
}

const MODES = [
  { id: "sprint", icon: "⚡", name: "Sprint", text: "Notes drawn from the position. Fastest right tap scores most." },
  { id: "tune-walk", icon: "♫", name: "Tune walk", text: "The notes of a melody, in order, pitch only. The tune is named at the end." },
  { id: "full-neck", icon: "▦", name: "Full neck", text: "Together, find every place a pitch lives on the neck before time runs out." },
  { id: "teams", icon: "⚑", name: "Teams", text: "Balanced teams; a team scores the mean of its members." },
] as const;

const select = "mt-1 block min-h-11 w-full rounded-xl border-2 border-ink/20 bg-white px-3 py-2 text-lg";

export default function Host({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string | undefined> = actionData?.errors ?? {};
  const busy = useNavigation().state !== "idle";
  const d = QUICK_DEFAULTS;
  return (
    <div className="mx-auto max-w-3xl">
      <PageTitle lead="Choose what the class reads. Students join with the room code on the class screen.">Host a round</PageTitle>
      <Form method="post" className="space-y-6" noValidate>
        {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
        <fieldset>
          <legend className="font-display text-xl font-semibold">Mode</legend>
          <div className="mt-2 grid gap-3 sm:grid-cols-2">
            {MODES.map((m) => (
              <label key={m.id} className="flex cursor-pointer gap-3 rounded-2xl border-2 border-ink/15 bg-white/70 p-4 has-[:checked]:border-teal has-[:checked]:bg-teal/10">
                <input type="radio" name="mode" value={m.id} defaultChecked={m.id === d.mode} className="mt-1 h-5 w-5 accent-teal" />
                <span>
                  <span className="font-display text-lg font-semibold">
                    <span aria-hidden="true">{m.icon}</span> {m.name}
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
            <select name="position" defaultValue={d.position} className={select}>
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
          <label className="block">
            <span className="font-medium">Notes to read</span>
            <select name="accidentals" defaultValue={d.accidentals} className={select}>
              <option value="naturals">Naturals only (no key signature)</option>
              <option value="key">Notes of the key signature</option>
              <option value="chromatic">Every note, with accidentals</option>
            </select>
          </label>
          <label className="block">
            <span className="font-medium">Key signature</span>
            <select name="keyFifths" defaultValue={d.keyFifths} className={select}>
              {KEYS.filter((k) => k.mode === "major").map((k) => (
                <option key={k.id} value={k.fifths}>
                  {k.name} · {k.fifths === 0 ? "no sharps or flats" : `${Math.abs(k.fifths)} ${k.fifths > 0 ? "♯" : "♭"}`}
                </option>
              ))}
            </select>
          </label>
          <Field type="number" inputMode="numeric" name="prompts" label="Number of notes" defaultValue={d.prompts} error={errors.prompts} />
          <Field type="number" inputMode="numeric" name="seconds" label="Seconds per note" defaultValue={d.seconds} error={errors.seconds} />
          <label className="flex items-center gap-3">
            <input type="checkbox" name="homeOnly" defaultChecked={d.homeOnly} className="h-6 w-6 accent-teal" />
            <span>Only the home spot earns full points</span>
          </label>
          <label className="flex items-center gap-3">
            <input type="checkbox" name="ledgerLines" defaultChecked={d.ledgerLines} className="h-6 w-6 accent-teal" />
            <span>Include ledger-line notes</span>
          </label>
          <label className="block">
            <span className="font-medium">Tune (Tune walk)</span>
            <select name="tuneId" className={select} defaultValue={BUILTIN_TUNES[0]!.id}>
              {BUILTIN_TUNES.map((t) => (
                <option key={t.id} value={t.id}>
                  {t.title}
                </option>
              ))}
            </select>
            {errors.tuneId ? <span className="text-sm text-brick">✗ {errors.tuneId}</span> : null}
          </label>
          <Field type="number" inputMode="numeric" name="teams" label="Teams (Teams mode)" defaultValue={d.teams} error={errors.teams} />
          <label className="block sm:col-span-2">
            <span className="font-medium">Class</span>
            <select name="classId" defaultValue={loaderData.classId ?? ""} className={select}>
              <option value="">No class (a one-off round)</option>
              {loaderData.classes.map((c) => (
                <option key={c.id} value={c.id}>
                  {c.name}
                </option>
              ))}
            </select>
            {errors.classId ? <span className="text-sm text-brick">✗ {errors.classId}</span> : null}
          </label>
        </Card>
        <Button type="submit" tone="teal" disabled={busy} className="w-full text-xl">
          {busy ? "Opening the room…" : "Open the room"}
        </Button>
      </Form>
    </div>
  );
}

