// A class's home-spot map for one position and tuning: see the default, move spots by tapping, let the engine
// explain any problem, save it for the class (rounds for the class then use it), reset it, print it for students.
import { useMemo, useState } from "react";
import { data, Form, redirect, useNavigation } from "react-router";
import { z } from "zod";
import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { Fretboard, type Highlight } from "~/components/Fretboard";
import { parseSpotMapQuery } from "~/components/neckQuery";
import { chartFrets, SpotChart } from "~/components/SpotChart";
import { Badge, Button, Card, NeedsJavaScript, Notice, PageTitle, SelectField, WhyDisabled } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import type { Spot } from "~/music/fretboard";
import { spotsForSounding, soundingMidi } from "~/music/fretboard";
import { displayPitch, parsePitch } from "~/music/pitch";
import { positionWindow, validateSpotMap, type HomeSpot, type SpotMap, type SpotMapProblem } from "~/music/positions";
import { TUNINGS } from "~/music/tuning";
import { classSpotMap, resetClassSpotMap, saveClassSpotMap } from "~/reading/spotMaps.server";
import type { Route } from "./+types/spot-maps";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Home-spot map · ${data?.className ?? "class"} · Fretcall` }];

function mapQuery(request: Request) {
  const params = new URL(request.url).searchParams;
  const parsed = parseSpotMapQuery(new URLSearchParams({ position: params.get("position") ?? "5", tuning: params.get("tuning") ?? "standard" }));
  if (!parsed.ok) throw data({ error: Object.values(parsed.errors).join(" ") }, { status: 400 });
  return parsed.data;
}

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const klass = await requireClassTeacher(db, user, params.classId);
  const q = mapQuery(request);
  const saved = await classSpotMap(db, klass.id, q.map.position, q.tuning.id);
  return {
    classId: klass.id,
    className: klass.name,
    position: q.map.position,
    tuning: q.tuning,
    defaultMap: q.map,
    saved: saved ?? null,
    done: new URL(request.url).searchParams.get("done"),
  };
}

const spotsSchema = z.array(
  z.object({ writtenMidi: z.number().int(), written: z.string().max(8), string: z.number().int(), fret: z.number().int() }),
);

const actionSchema = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("reset") }),
  // The spots come as JSON text, read by spotsSchema below.
  z.object({ intent: z.literal("save"), spots: z.string().max(200_000).default("") }),
]);

export async function action({ request, params, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const klass = await requireClassTeacher(db, user, params.classId);
  const q = mapQuery(request);
  const intent = parseForm(actionSchema, await request.formData());
  if (!intent.ok) return { problems: [{ code: "not-a-map", message: "Choose save or reset." }] as SpotMapProblem[] };
  const input = intent.data;
  const back = (done: string) => redirect(`${new URL(request.url).pathname}?position=${q.map.position}&tuning=${q.tuning.id}&done=${encodeURIComponent(done)}`);
  if (input.intent === "reset") {
    await resetClassSpotMap(db, klass.id, q.map.position, q.tuning.id);
    return back("The class reads with the default map again.");
  }
  let spots: unknown;
  try {
    spots = JSON.parse(input.spots);
  } catch {
    spots = undefined;
  }
  const parsed = spotsSchema.safeParse(spots);
  if (!parsed.success) return { problems: [{ code: "not-a-map", message: "The map didn't arrive whole; reload the page and try again." }] as SpotMapProblem[] };
  const map: SpotMap = { position: q.map.position, tuning: q.tuning.id, reading: q.map.reading, spots: parsed.data };
  const problems = await saveClassSpotMap(db, klass.id, map, user.id);
  if (problems.length > 0) return { problems };
  return back(`Saved: rounds for ${klass.name} in position ${map.position} now use this map.`);
}

const same = (a: Spot, b: Spot) => a.string === b.string && a.fret === b.fret;
const label = (s: HomeSpot) => displayPitch(parsePitch(s.written));

export default function SpotMaps({ loaderData, actionData }: Route.ComponentProps) {
  const { tuning, position, defaultMap, saved, className } = loaderData;
  const [spots, setSpots] = useState<HomeSpot[]>(() => (saved ?? defaultMap).spots);
  const [picked, setPicked] = useState<number>(() => spots[Math.floor(spots.length / 2)]!.writtenMidi);
  const busy = useNavigation().state !== "idle";
  const map: SpotMap = { ...defaultMap, spots };
  const problems = useMemo(() => validateSpotMap(map, tuning), [spots]);
  const frets = Math.max(15, position + 6);
  const pickedSpot = spots.find((s) => s.writtenMidi === picked)!;
  const moved = spots.filter((s) => !defaultMap.spots.some((d) => d.writtenMidi === s.writtenMidi && same(d, s)));
  // The chart is what students will be asked for: the stored map, not unsaved edits.
  const stored = (saved ?? defaultMap).spots;
  const unsaved = stored.some((s, i) => !same(s, spots[i]!));
  const heading = `${className}: home-spot map, position ${position}, ${tuning.name} tuning`;

  const highlights: Highlight[] = [
    ...spotsForSounding(soundingMidi(picked, defaultMap.reading), tuning, frets)
      .filter((s) => !same(s, pickedSpot))
      .map((s) => ({ ...s, kind: "other" as const })),
    ...spots.map((s) => ({ string: s.string, fret: s.fret, kind: s.writtenMidi === picked ? ("tapped" as const) : ("home" as const), label: label(s) })),
  ];
  const tap = (spot: Spot) => setSpots((all) => all.map((s) => (s.writtenMidi === picked ? { ...s, string: spot.string, fret: spot.fret } : s)));
  const serverProblems = actionData?.problems ?? [];

  return (
    <div className="space-y-6">
      <div className="print:hidden">
        <PageTitle lead="Pick a written note, then tap the spot the class should play it at. Fretcall checks the map as you go.">Home-spot map · {className}</PageTitle>
        {loaderData.done ? <Notice tone="success">{loaderData.done}</Notice> : null}
        {serverProblems.length > 0 ? (
          <Notice tone="error">
            Not saved; nothing changed. Fix these first:
            <ul className="mt-1 list-disc pl-5">
              {serverProblems.map((p, i) => (
                <li key={i}>{p.message}</li>
              ))}
            </ul>
          </Notice>
        ) : null}
      </div>
      <Card className="print:hidden">
        <Form method="get" className="flex flex-wrap items-end gap-3">
          <SelectField
            label="Position"
            name="position"
            defaultValue={String(position)}
            options={Array.from({ length: 12 }, (_, i) => ({ value: String(i + 1), label: `Position ${i + 1}` }))}
          />
          <SelectField label="Tuning" name="tuning" defaultValue={tuning.id} options={Object.values(TUNINGS).map((t) => ({ value: t.id, label: t.name }))} />
          <Button type="submit" tone="ghost">
            Show
          </Button>
        </Form>
        <p className="mt-3">
          {saved ? <Badge tone="info">the class's own map</Badge> : <Badge tone="neutral">default map</Badge>}{" "}
          {moved.length === 0 ? "Every note is at its default spot." : `${moved.length} ${moved.length === 1 ? "note differs" : "notes differ"} from the default: ${moved.map(label).join(", ")}.`}
        </p>
      </Card>
      <Card className="space-y-4 print:hidden">
        <NeedsJavaScript what="Changing the map" />
        <fieldset>
          <legend className="font-display text-xl font-semibold">1. Pick a written note</legend>
          <div className="mt-2 flex flex-wrap gap-2">
            {spots.map((s) => (
              <button
                key={s.writtenMidi}
                type="button"
                aria-pressed={s.writtenMidi === picked}
                onClick={() => setPicked(s.writtenMidi)}
                className={`min-h-11 min-w-11 rounded-xl border-2 px-3 font-display text-lg ${s.writtenMidi === picked ? "border-ink bg-ink text-paper" : "border-ink/20 bg-white"}`}
              >
                {label(s)}
                {problems.some((p) => p.writtenMidi === s.writtenMidi) ? <span aria-label=" has a problem"> ✗</span> : null}
              </button>
            ))}
          </div>
        </fieldset>
        <div>
          <h2 className="font-display text-xl font-semibold">2. Tap its home spot</h2>
          <p className="text-ink-soft">
            {label(pickedSpot)} is at string {pickedSpot.string}, {pickedSpot.fret === 0 ? "open" : `fret ${pickedSpot.fret}`}. Other spots that play it are marked as such.
          </p>
          <Fretboard tuning={tuning} frets={frets} position={position} highlights={highlights} onTap={tap} label={`Choose the home spot for ${label(pickedSpot)}`} />
        </div>
        {problems.length > 0 ? (
          <Notice tone="error">
            <span className="font-semibold">This map can't be saved yet:</span>
            <ul className="mt-1 list-disc pl-5">
              {problems.map((p, i) => (
                <li key={i}>{p.message}</li>
              ))}
            </ul>
          </Notice>
        ) : (
          <Notice tone="success">The map checks out: one home spot per note, each in position {position}.</Notice>
        )}
        <div className="flex flex-wrap gap-3">
          <Form method="post">
            <input type="hidden" name="intent" value="save" />
            <input type="hidden" name="spots" value={JSON.stringify(spots)} />
            <Button type="submit" tone="teal" disabled={busy}>
              Save for {className}
            </Button>
          </Form>
          <Form method="post">
            <input type="hidden" name="intent" value="reset" />
            <Button type="submit" tone="ghost" disabled={busy || !saved} aria-describedby={saved ? undefined : "why-no-reset"}>
              Reset to the default map
            </Button>
            {saved ? null : <WhyDisabled id="why-no-reset">The class already reads the default map.</WhyDisabled>}
          </Form>
          <Button type="button" tone="ghost" onClick={() => window.print()}>
            Print chart for students
          </Button>
        </div>
      </Card>
      <Card className="print:border-0 print:bg-white print:p-0 print:shadow-none">
        <h2 className="font-display text-2xl font-semibold">{heading}</h2>
        <p className="mt-1 text-ink-soft">Play each written note at the spot shown. Guitar sounds an octave below written.</p>
        {unsaved ? <p className="mt-1 font-medium print:hidden">The chart shows the map as stored; save to print your changes.</p> : null}
        <div className="mt-3">
          <SpotChart tuning={tuning} {...chartFrets(positionWindow(position), stored)} spots={stored.map((s) => ({ string: s.string, fret: s.fret, label: label(s) }))} caption={heading} />
        </div>
      </Card>
    </div>
  );
}
