/**
 * Answering a practice note by playing it on a guitar: how the page says what listening means before the
 * microphone is asked for, the tune-up check, the listening indicator with its Stop button, and the words for
 * how an answer was given (shared with the teacher's pages). The microphone itself is app/listen/useListening.
 */
import { useEffect, useRef } from "react";
import { Icon } from "~/components/Icon";
import { Button, Card } from "~/components/ui";
import {
  ListeningHelp,
  ListeningMeter,
  PRIVACY_WORDS,
} from "~/listen/ListeningParts";
import { TuneUp } from "~/listen/TuneUp";
import type { Listening } from "~/listen/useListening";
import type { AnswerInput } from "./answers";

/** Where play mode is: off (tapping), explained, tuning up, or listening for answers. */
export type PlayStage = "off" | "intro" | "tune" | "on";

export const INPUT_WORDS: Record<AnswerInput, string> = {
  tap: "Tapped",
  played: "Played",
};

/** How an answer was given, as an icon and a word (never the icon alone). */
export function InputBadge({ input }: { input: AnswerInput }) {
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap">
      <Icon name={input === "played" ? "mic" : "tap"} className="h-4 w-4" />
      {INPUT_WORDS[input]}
    </span>
  );
}

const NO_STRING_WORDS =
  "A microphone cannot tell which string you play, so it judges the pitch only: play each note at its home spot.";

/** The switch into play mode, under the tap instruction. */
export function PlayOffer({ onPlay }: { onPlay: () => void }) {
  return (
    <Button tone="ghost" className="w-full" onClick={onPlay}>
      <Icon name="mic" className="h-5 w-5" />
      Play on my guitar
    </Button>
  );
}

/** Before the microphone is asked for: what listening means here, then the tune-up check (skippable). */
export function PlaySetup({
  stage,
  onTune,
  onReady,
  onCancel,
}: {
  stage: "intro" | "tune";
  onTune: () => void;
  onReady: () => void;
  onCancel: () => void;
}) {
  // It opens below the neck: bring it into view.
  const box = useRef<HTMLDivElement>(null);
  useEffect(() => {
    // A block body: newer browsers return a promise from scrollIntoView, which React would take for a cleanup.
    box.current?.scrollIntoView?.({ block: "start" });
  }, [stage]);
  return (
    <div ref={box}>
      {stage === "tune" ? (
        <Card>
          <TuneUp onDone={onReady} onSkip={onReady} />
        </Card>
      ) : (
        <PlayIntro onTune={onTune} onCancel={onCancel} />
      )}
    </div>
  );
}

function PlayIntro({
  onTune,
  onCancel,
}: {
  onTune: () => void;
  onCancel: () => void;
}) {
  return (
    <Card className="space-y-3">
      <h2 className="font-display text-2xl font-semibold">
        Play on your guitar
      </h2>
      <p>
        Read the note, then play it on your guitar. The phone listens and tells
        you whether you played the right note.
      </p>
      <p className="flex items-start gap-2">
        <Icon name="lock" className="mt-1 h-5 w-5" />
        <span>
          {PRIVACY_WORDS} Your browser will ask to use the microphone; a
          listening sign and a Stop button stay on screen while it is on.
        </span>
      </p>
      <p className="flex items-start gap-2">
        <Icon name="info" className="mt-1 h-5 w-5" />
        {NO_STRING_WORDS}
      </p>
      <p className="flex items-start gap-2">
        <Icon name="rest" className="mt-1 h-5 w-5" />
        The note is not played back while the phone listens. Rest your hands
        between sessions, as with tapping.
      </p>
      <div className="flex flex-wrap gap-3">
        <Button tone="teal" onClick={onTune}>
          <Icon name="mic" className="h-5 w-5" />
          Tune up and start
        </Button>
        <Button tone="ghost" onClick={onCancel}>
          <Icon name="tap" className="h-5 w-5" />
          Keep tapping
        </Button>
      </div>
    </Card>
  );
}

/** While play mode is on: the listening sign, level and Stop, and what to do if the microphone will not open. */
export function PlayPanel({
  listening,
  onTap,
}: {
  listening: Listening;
  onTap: () => void;
}) {
  return (
    <div className="space-y-2">
      <ListeningMeter listening={listening} startLabel="Listen again" />
      <ListeningHelp status={listening.status} />
      {listening.status === "listening" ? (
        <p className="text-sm text-ink-soft">{NO_STRING_WORDS}</p>
      ) : null}
      <Button
        tone="ghost"
        onClick={() => {
          listening.stop();
          onTap();
        }}
      >
        <Icon name="tap" className="h-5 w-5" />
        Answer by tapping instead
      </Button>
    </div>
  );
}
