// The tune-up check before playing: the six open strings, each with its cents sharp or flat in words and on a needle.
import { useState } from "react";
import { Icon, type IconName } from "~/components/Icon";
import { Button, Notice } from "~/components/ui";
import { A4_HZ } from "./pitch";
import { IN_TUNE_CENTS, openStringName, readString, wholeGuitarOffset, type StringReading } from "./tuning";
import { useListening } from "./useListening";
import { ListeningHelp, ListeningMeter } from "./ListeningParts";

// The needle's scale: a quarter tone either side, where a player still tunes by turning the peg a little.
const NEEDLE_RANGE_CENTS = 50;
const NEEDLE_SWING_DEGREES = 60;

function readingIcon(cents: number): { icon: IconName; word: string } {
  if (Math.abs(cents) <= IN_TUNE_CENTS) return { icon: "check", word: "in tune" };
  return cents < 0 ? { icon: "sortDown", word: "flat" } : { icon: "sortUp", word: "sharp" };
}

export function Needle({ reading }: { reading: StringReading | null }) {
  const cents = reading ? Math.max(-NEEDLE_RANGE_CENTS, Math.min(NEEDLE_RANGE_CENTS, reading.cents)) : 0;
  const angle = (cents / NEEDLE_RANGE_CENTS) * NEEDLE_SWING_DEGREES;
  const label = reading ? `String ${reading.string}, ${reading.target}: ${reading.words}` : "No string heard yet";
  return (
    <svg viewBox="0 0 200 120" role="img" aria-label={label} className="mx-auto block w-full max-w-xs">
      <path d="M 20 100 A 80 80 0 0 1 180 100" fill="none" stroke="currentColor" strokeOpacity={0.25} strokeWidth={10} strokeLinecap="round" />
      {/* The in-tune zone, marked by a tick and a word, not by colour alone. */}
      <line x1="100" y1="14" x2="100" y2="30" stroke="var(--color-teal)" strokeWidth={4} />
      <text x="100" y="10" textAnchor="middle" fontSize="11" fill="var(--color-ink)">in tune</text>
      <text x="18" y="116" fontSize="12" fill="var(--color-ink)">flat</text>
      <text x="182" y="116" textAnchor="end" fontSize="12" fill="var(--color-ink)">sharp</text>
      <g transform={`rotate(${angle} 100 100)`} className="transition-transform duration-100">
        <line x1="100" y1="100" x2="100" y2="26" stroke={reading ? "var(--color-rosewood)" : "currentColor"} strokeOpacity={reading ? 1 : 0.3} strokeWidth={4} strokeLinecap="round" />
      </g>
      <circle cx="100" cy="100" r="7" fill="var(--color-brass)" stroke="var(--color-rosewood)" strokeWidth={2} />
    </svg>
  );
}

function StringRow({ string, reading }: { string: number; reading: StringReading | undefined }) {
  const target = openStringName(string);
  const state = reading ? readingIcon(reading.cents) : null;
  return (
    <li className="flex items-center gap-3 rounded-2xl border border-ink/10 bg-white/70 px-3 py-2">
      <span className="w-20 font-display text-lg">
        <span className="sr-only">String </span>
        <span aria-hidden="true">{string} · </span>
        {target}
      </span>
      {state && reading ? (
        <span className={`flex items-center gap-2 ${state.icon === "check" ? "text-teal" : "text-ink"}`}>
          <Icon name={state.icon} className="h-5 w-5" />
          <span>{reading.words}</span>
        </span>
      ) : (
        <span className="text-ink-soft">not played yet</span>
      )}
    </li>
  );
}

export interface TuneUpProps {
  onDone: () => void;
  onSkip?: () => void;
}

export function TuneUp({ onDone, onSkip }: TuneUpProps) {
  const [readings, setReadings] = useState<Map<number, StringReading>>(new Map());
  const [announce, setAnnounce] = useState("");
  const ear = useListening({
    onNote: (note) => {
      const reading = readString(note.hz);
      setReadings((was) => new Map(was).set(reading.string, reading));
      setAnnounce(`String ${reading.string}, ${reading.target}: ${reading.words}.`);
    },
  });
  // The needle and the string's row follow the string while it rings, as the peg turns between plucks.
  const live = ear.current ? readString(ear.current.hz) : null;
  const offset = wholeGuitarOffset([...readings.values()]);
  const finish = (then: () => void) => {
    ear.stop();
    then();
  };

  return (
    <section aria-labelledby="tune-up-title" className="space-y-4">
      <h2 id="tune-up-title" className="font-display text-2xl font-semibold">
        Tune up first
      </h2>
      <p>
        Play each open string, low to high. Reference: A4 = {A4_HZ} Hz (ISO 16), standard tuning E2 A2 D3 G3 B3 E4.
      </p>
      <ListeningMeter listening={ear} />
      {ear.status === "listening" && <Needle reading={live} />}
      <p aria-live="polite" className="sr-only">
        {announce}
      </p>
      <ol className="space-y-2" aria-label="Open strings, low to high">
        {[6, 5, 4, 3, 2, 1].map((s) => (
          <StringRow key={s} string={s} reading={live?.string === s ? live : readings.get(s)} />
        ))}
      </ol>
      {offset && <Notice tone="info">{offset.hint}</Notice>}
      <ListeningHelp status={ear.status} />
      <div className="flex flex-wrap gap-3">
        <Button tone="teal" onClick={() => finish(onDone)}>
          <Icon name="check" /> Done
        </Button>
        <Button tone="ghost" onClick={() => finish(onSkip ?? onDone)}>
          <Icon name="skip" /> Skip the tune-up
        </Button>
      </div>
    </section>
  );
}
