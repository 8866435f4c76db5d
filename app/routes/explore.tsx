// The neck explorer: any written note on the staff and on the neck, a position's home-spot map, a printable chart.
// Public and stateless: every choice lives in the address, so a teacher can share or bookmark a view.
import { useState } from "react";
import { Form, Link } from "react-router";
import { Fretboard, type Highlight } from "~/components/Fretboard";
import { useLeftHanded } from "~/components/LeftHanded";
import { noteOnNeck, parseExplorerQuery, type ExplorerValues } from "~/components/neckQuery";
import { playSounding } from "~/components/sound";
import { SoundControl } from "~/components/SoundControl";
import { Staff } from "~/components/Staff";
import { chartFrets, SpotChart } from "~/components/SpotChart";
import { Badge, Button, Card, Field, Notice, PageTitle, SelectField } from "~/components/ui";
import { writtenMidiFor, type Spot } from "~/music/fretboard";
import { KEYS, spellInKey, type Key } from "~/music/keys";
import { noteName } from "~/music/naming";
import { parsePitch, pitchMidi, pitchToString, spokenPitch, type Pitch } from "~/music/pitch";
import { NoteNamingChoice, useNoteNaming } from "~/components/NoteNaming";
import { homeSpotFor, positionWindow } from "~/music/positions";
import { MAX_FRETS, MIN_FRETS, TUNINGS } from "~/music/tuning";
import type { Route } from "./+types/explore";
import { Icon } from "~/components/Icon";

export const meta: Route.MetaFunction = () => [
  { title: "Neck explorer · Fretcall" },
  {
    name: "description",
    content: "See where any written note lies on the guitar neck, and print a position's home-spot chart.",
  },
];

/** The note a half step away, spelt as a reader of this key expects it; null at the edge of MIDI. */
function neighbour(midi: number, step: 1 | -1, key: Key): string | null {
  const next = midi + step;
  return next < 0 || next > 127 ? null : pitchToString(spellInKey(next, key.fifths, key.mode));
}

export function loader({ request }: Route.LoaderArgs) {
  const parsed = parseExplorerQuery(new URL(request.url).searchParams);
  if (!parsed.ok) return { values: parsed.values, errors: parsed.errors, view: null };
  const { note, key, tuning, frets, reading, map } = parsed.data;
  const writtenMidi = pitchMidi(note);
  const w = positionWindow(map.position);
  const neck = noteOnNeck({ note, tuning, frets, reading });
  return {
    values: { ...parsed.values, key: key.id, tuning: tuning.id },
    errors: {},
    view: {
      ...neck,
      spoken: spokenPitch(note),
      key,
      tuningInfo: tuning,
      position: map.position,
      home: homeSpotFor(map, writtenMidi) ?? null,
      lower: neighbour(writtenMidi, -1, key),
      higher: neighbour(writtenMidi, 1, key),
      // The chart runs over the position's frets, widened for any two-fret stretch the tuning needs.
      chartFrets: chartFrets(w, map.spots),
      mapSpots: map.spots.map((s) => ({ string: s.string, fret: s.fret, writtenMidi: s.writtenMidi })),
    },
  };
}

type View = NonNullable<Route.ComponentProps["loaderData"]["view"]>;

const sameSpot = (a: Spot, b: Spot) => a.string === b.string && a.fret === b.fret;

export default function Explore({ loaderData }: Route.ComponentProps) {
  const { values, errors, view } = loaderData;
  const [leftHanded, chooseHand] = useLeftHanded();
  const [labels, setLabels] = useState(true);
  const problems = Object.entries(errors);

  return (
    <div className="space-y-6">
      <div className="print:hidden">
        <PageTitle lead="Pick a written note and see where it lies on the neck, which spot is home in a position, and how it sounds.">
          Neck explorer
        </PageTitle>
      </div>
      {problems.length > 0 ? (
        <Notice tone="error">
          These settings can't be shown yet:
          <ul className="mt-1 list-disc pl-5">
            {problems.map(([name, message]) => (
              <li key={name}>
                <strong>{name}</strong>: {message}
              </li>
            ))}
          </ul>
        </Notice>
      ) : null}
      <Card className="print:hidden">
        <ExplorerForm values={values} errors={errors} />
        <div className="mt-4 flex flex-wrap items-center gap-x-6 gap-y-2 border-t border-ink/10 pt-4">
          <label className="flex min-h-11 items-center gap-2">
            <input
              type="checkbox"
              checked={leftHanded}
              onChange={(e) => chooseHand(e.target.checked)}
              className="h-5 w-5 accent-teal"
            />
            Left-handed neck
          </label>
          <label className="flex min-h-11 items-center gap-2">
            <input
              type="checkbox"
              checked={labels}
              onChange={(e) => setLabels(e.target.checked)}
              className="h-5 w-5 accent-teal"
            />
            String and fret numbers
          </label>
          <SoundControl />
          <NoteNamingChoice />
        </div>
      </Card>
      {view ? <ExplorerView view={view} values={values} leftHanded={leftHanded} labels={labels} /> : null}
    </div>
  );
}

const READINGS = [
  { value: "guitar", label: "Guitar (sounds an octave lower)" },
  { value: "concert", label: "Concert pitch (as written)" },
];

function ExplorerForm({ values, errors }: { values: ExplorerValues; errors: Partial<Record<string, string>> }) {
  const tunings = Object.values(TUNINGS).map((t) => ({ value: t.id, label: t.name }));
  if (!tunings.some((t) => t.value === values.tuning))
    tunings.push({ value: values.tuning, label: `Custom (${values.tuning})` });
  return (
    <Form method="get" className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3" noValidate>
      <Field
        label="Written note"
        name="note"
        defaultValue={values.note}
        error={errors.note}
        hint="Such as F#4 or Bb3; middle C is C4."
        autoComplete="off"
        spellCheck={false}
      />
      <SelectField
        label="Key"
        name="key"
        defaultValue={values.key}
        error={errors.key}
        options={KEYS.map((k) => ({ value: k.id, label: k.name }))}
      />
      <SelectField label="Tuning" name="tuning" defaultValue={values.tuning} error={errors.tuning} options={tunings} />
      <Field
        label="Frets"
        name="frets"
        type="number"
        inputMode="numeric"
        min={MIN_FRETS}
        max={MAX_FRETS}
        defaultValue={values.frets}
        error={errors.frets}
      />
      <Field
        label="Position"
        name="position"
        type="number"
        inputMode="numeric"
        min={1}
        max={MAX_FRETS - 4}
        defaultValue={values.position}
        error={errors.position}
        hint="Fret under the index finger."
      />
      <SelectField
        label="Reading"
        name="reading"
        defaultValue={values.reading}
        error={errors.reading}
        options={READINGS}
      />
      <div className="sm:col-span-2 lg:col-span-3">
        <Button type="submit">Show</Button>
      </div>
    </Form>
  );
}

function ExplorerView({
  view,
  values,
  leftHanded,
  labels,
}: {
  view: View;
  values: ExplorerValues;
  leftHanded: boolean;
  labels: boolean;
}) {
  const [tapped, setTapped] = useState<Spot | null>(null);
  const tuning = view.tuningInfo;
  const withNote = (note: string) => `?${new URLSearchParams({ ...values, note })}`;
  const { spell, shown, soundingShown } = useNames(view);

  const highlights: Highlight[] = view.spots.map((s) => ({
    ...s,
    kind: view.home && sameSpot(s, view.home) ? "home" : "other",
  }));
  if (tapped && !view.spots.some((s) => sameSpot(s, tapped))) highlights.push({ ...tapped, kind: "tapped" });
  const tap = (spot: Spot) => {
    setTapped(spot);
    void playSounding(tuning.strings[spot.string - 1]! + spot.fret);
  };
  const tappedSounding = tapped ? tuning.strings[tapped.string - 1]! + tapped.fret : null;

  return (
    <>
      <section
        aria-labelledby="note-heading"
        className="grid grid-cols-1 gap-6 print:hidden lg:grid-cols-[minmax(0,1fr)_minmax(0,2fr)]"
      >
        <Card>
          <h2 id="note-heading" className="font-display text-2xl font-semibold">
            Written {shown}
          </h2>
          <Staff
            notes={[{ written: view.written }]}
            keyFifths={view.key.fifths}
            octaveClef={view.reading === "guitar"}
            size="card"
            className="my-2 rounded-2xl bg-white"
          />
          <p>
            {view.key.name}; sounds <strong>{soundingShown}</strong> ({view.frequency} Hz).
          </p>
          <div className="mt-3 flex flex-wrap gap-2">
            <Button tone="teal" type="button" onClick={() => void playSounding(view.midi)}>
              <Icon name="play" className="h-4 w-4" /> Hear {shown}
            </Button>
            {view.lower ? (
              <Link
                to={withNote(view.lower)}
                className="inline-flex min-h-11 items-center rounded-2xl border-2 border-ink/20 px-4 hover:bg-ink/5"
              >
                <span aria-hidden="true">←&nbsp;</span>Half step lower
              </Link>
            ) : null}
            {view.higher ? (
              <Link
                to={withNote(view.higher)}
                className="inline-flex min-h-11 items-center rounded-2xl border-2 border-ink/20 px-4 hover:bg-ink/5"
              >
                Half step higher<span aria-hidden="true">&nbsp;→</span>
              </Link>
            ) : null}
          </div>
        </Card>
        <Card>
          <h2 className="font-display text-2xl font-semibold">Every spot for {shown}</h2>
          <p className="mb-3 text-ink-soft">
            {view.spots.length === 0
              ? `No spot on a ${view.frets}-fret neck in ${tuning.name} tuning plays ${view.spoken}.`
              : view.home
                ? `${view.spots.length} ${view.spots.length === 1 ? "spot" : "spots"}; the home spot in position ${view.position} is string ${view.home.string}, ${view.home.fret === 0 ? "open" : `fret ${view.home.fret}`}.`
                : `${view.spots.length} ${view.spots.length === 1 ? "spot" : "spots"}; none is within position ${view.position}.`}
          </p>
          <Fretboard
            tuning={tuning}
            frets={view.frets}
            position={view.position}
            leftHanded={leftHanded}
            highlights={highlights}
            onTap={tap}
            stringLabels={labels}
            fretLabels={labels}
            label={`Spots for ${view.spoken}; tap any spot to hear it`}
          />
          <p aria-live="polite" className="mt-2 min-h-6">
            {tapped && tappedSounding !== null ? (
              <>
                String {tapped.string}, {tapped.fret === 0 ? "open" : `fret ${tapped.fret}`} plays written{" "}
                {spell(writtenMidiFor(tappedSounding, view.reading))}{" "}
                {tappedSounding === view.midi ? (
                  <Badge tone="right">same pitch as {shown}</Badge>
                ) : (
                  <Badge tone="info">another pitch</Badge>
                )}
              </>
            ) : null}
          </p>
        </Card>
      </section>
      <HomeSpotChart view={view} leftHanded={leftHanded} labels={labels} />
    </>
  );
}

/** The page's note names in the school's or the device's naming (the loader sends pitches, not names). */
function useNames(view: View) {
  const naming = useNoteNaming();
  const name = (p: Pitch) => noteName(p, naming, { octave: true });
  const spell = (midi: number) => name(spellInKey(midi, view.key.fifths, view.key.mode));
  return { spell, shown: name(parsePitch(view.written)), soundingShown: name(parsePitch(view.sounding)) };
}

function HomeSpotChart({ view, leftHanded, labels }: { view: View; leftHanded: boolean; labels: boolean }) {
  const tuning = view.tuningInfo;
  const { spell } = useNames(view);
  const mapSpots = view.mapSpots.map((s) => ({ string: s.string, fret: s.fret, label: spell(s.writtenMidi) }));
  const heading = `Home-spot map: position ${view.position}, ${tuning.name} tuning, ${view.reading === "guitar" ? "guitar reading" : "concert pitch"}`;
  return (
    <Card className="print:border-0 print:bg-white print:p-0 print:shadow-none">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h2 className="font-display text-2xl font-semibold">{heading}</h2>
        <Button tone="ghost" type="button" onClick={() => window.print()} className="print:hidden">
          Print chart
        </Button>
      </div>
      <p className="mt-1 text-ink-soft">
        One home spot for every written note from {mapSpots[0]?.label} to {mapSpots.at(-1)?.label}, spelt for{" "}
        {view.key.name}. Tap a spot to hear it.
      </p>
      <div className="mt-3 print:hidden">
        <Fretboard
          tuning={tuning}
          frets={view.frets}
          position={view.position}
          leftHanded={leftHanded}
          highlights={mapSpots.map((s) => ({ ...s, kind: "home" as const }))}
          onTap={(spot) => void playSounding(tuning.strings[spot.string - 1]! + spot.fret)}
          stringLabels={labels}
          fretLabels={labels}
          legend={false}
          label={heading}
        />
      </div>
      <div className="mt-4">
        <SpotChart tuning={tuning} first={view.chartFrets.first} last={view.chartFrets.last} spots={mapSpots} caption={heading} />
      </div>
    </Card>
  );
}
