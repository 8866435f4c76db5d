// /me/rhythm/:tuneId — the rhythm pass of a tune, open once its pitches are steady (see app/practice/adaptive.ts).
import { useEffect } from "react";
import { data, Link } from "react-router";
import { requireTune } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { TuneStaff } from "~/components/TuneStaff";
import { buttonClass, Card, NeedsJavaScript, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { noteName, STEADY_BOX, TOP_BOX } from "~/practice/adaptive";
import { TUNE_POSITION } from "~/practice/practice.server";
import { RhythmPass } from "~/practice/RhythmPass";
import { rhythmPasses, rhythmState } from "~/practice/rhythmPass.server";
import { rememberTimeZone } from "~/practice/tz";
import type { Route } from "./+types/rhythm";
import type { Tune } from "~/tunes/builtin";
import { useNoteNaming } from "~/components/NoteNaming";
import { Icon } from "~/components/Icon";
import { day } from "~/review/format";

/** The first full bar's time signature when the score gave one; the tempo counts its beat. */
function meterWords(tune: Tune) {
  const first = tune.score?.measures.find((m) => !m.pickup);
  return first ? `${first.beats}/${first.beatType} time` : `${tune.beatsPerBar} beats in a bar`;
}

export const meta: Route.MetaFunction = ({ data: d }) => [{ title: `${d && "state" in d ? `Rhythm pass: ${d.state.tune.title}` : "Rhythm pass"} · Fretcall` }];

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["student"]);
  const { db } = services(context);
  await requireTune(db, user, params.tuneId, "see");
  const text = new URL(request.url).searchParams.get("position");
  const position = text && /^(?:[1-9]|1[0-2])$/.test(text) ? Number(text) : TUNE_POSITION;
  const state = await rhythmState(db, user, params.tuneId, position);
  if (!state) throw data({ error: "No such tune." }, { status: 404 });
  return { state, passes: await rhythmPasses(db, user.id, state.tune.id, 5) };
}

export default function Rhythm({ loaderData }: Route.ComponentProps) {
  const naming = useNoteNaming();
  useEffect(rememberTimeZone, []);
  const { state, passes } = loaderData;
  const { tune } = state;
  return (
    <div className="space-y-4">
      <PageTitle lead={`${tune.composer} · ${meterWords(tune)} · position ${state.position}`}>Rhythm pass: {tune.title}</PageTitle>
      {state.unlocked ? (
        <>
          <NeedsJavaScript what="A rhythm pass" />
          <RhythmPass tune={tune} position={state.position} />
        </>
      ) : (
        <Card className="space-y-3">
          <TuneStaff tune={tune} />
          <Notice tone="info">
            <Icon name="lock" className="mr-1 inline h-5 w-5 align-[-0.2em]" />
            {state.why}
          </Notice>
          <ul className="flex flex-wrap gap-2">
            {state.notes.map((n) => (
              <li key={n.writtenMidi} className={`rounded-full px-3 py-1 ${n.box >= STEADY_BOX ? "bg-teal text-white" : "bg-ink/10"}`}>
                <span aria-hidden="true">{n.box >= STEADY_BOX ? "✓ " : "… "}</span>
                {noteName(n.written, naming)} · box {n.box} of {TOP_BOX}
              </li>
            ))}
          </ul>
          <Link to={`/me/practice?tune=${encodeURIComponent(tune.id)}&position=${state.position}`} className={buttonClass("teal")}>
            Practise the notes of {tune.title}
          </Link>
        </Card>
      )}
      {passes.length > 0 ? (
        <Card>
          <h2 className="font-display text-xl font-semibold">Your last passes</h2>
          <ul className="mt-2 space-y-1">
            {passes.map((p) => (
              <li key={p.id}>
                <time dateTime={new Date(p.at).toISOString()} suppressHydrationWarning>
                  {day(p.at)}
                </time>{" "}
                · {p.tempo} bpm · {p.input === "played" ? "played on the guitar" : "tapped"} · <strong>{p.score} %</strong>
              </li>
            ))}
          </ul>
        </Card>
      ) : null}
    </div>
  );
}
