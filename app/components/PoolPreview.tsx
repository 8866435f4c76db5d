// The notes a reading set draws from, on the staff and on the neck: what the class will be asked to read.
import type { PoolNote } from "~/music/pools";
import type { Tuning } from "~/music/tuning";
import { noteName } from "~/review/format";
import { Fretboard } from "./Fretboard";
import { useNoteNaming } from "./NoteNaming";
import { Staff } from "./Staff";
import { plural } from "~/lib/plural";

/** Notes per staff line: eight whole notes with a clef and key fit a phone at a readable size. */
const POOL_LINE = 8;

export function PoolPreview({ pool, keyFifths, tuning, frets, position }: { pool: PoolNote[]; keyFifths: number; tuning: Tuning; frets: number; position: number }) {
  const naming = useNoteNaming();
  const names = pool.map((n) => noteName(n.written, naming));
  return (
    <div className="space-y-3" data-testid="pool-preview">
      <p aria-live="polite">
        <strong>{plural(pool.length, "note")}</strong> from {names[0]} to {names.at(-1)}
        {pool.some((n) => n.ledger) ? `, ${pool.filter((n) => n.ledger).length} on ledger lines` : ""}
        {pool.some((n) => n.printedAccidental) ? `, ${pool.filter((n) => n.printedAccidental).length} with a written accidental` : ""}.
      </p>
      {/* A long pool wraps onto several staves, as a printed exercise would, rather than running off a phone. */}
      <div className="rounded-2xl bg-white">
        <Staff notes={pool.map((n) => ({ written: n.written, accidental: n.printedAccidental }))} keyFifths={keyFifths} size="card" wrapAt={POOL_LINE} className="px-2" />
      </div>
      <Fretboard
        tuning={tuning}
        frets={frets}
        position={position}
        highlights={pool.map((n, i) => ({ ...n.home, kind: "home" as const, label: names[i] }))}
        legend={false}
        label={`Home spots of the ${plural(pool.length, "note")} in position ${position}`}
      />
    </div>
  );
}
