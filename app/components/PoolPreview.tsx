// The notes a reading set draws from, on the staff and on the neck: what the class will be asked to read.
import { displayPitch, parsePitch } from "~/music/pitch";
import type { PoolNote } from "~/music/pools";
import type { Tuning } from "~/music/tuning";
import { Fretboard } from "./Fretboard";
import { Staff } from "./Staff";

export function PoolPreview({ pool, keyFifths, tuning, frets, position }: { pool: PoolNote[]; keyFifths: number; tuning: Tuning; frets: number; position: number }) {
  const names = pool.map((n) => displayPitch(parsePitch(n.written)));
  return (
    <div className="space-y-3" data-testid="pool-preview">
      <p aria-live="polite">
        <strong>{pool.length} notes</strong> from {names[0]} to {names.at(-1)}
        {pool.some((n) => n.ledger) ? `, ${pool.filter((n) => n.ledger).length} on ledger lines` : ""}
        {pool.some((n) => n.printedAccidental) ? `, ${pool.filter((n) => n.printedAccidental).length} with a written accidental` : ""}.
      </p>
      {/* A long pool makes a wide staff: it scrolls sideways rather than shrinking the notes. */}
      <div className="overflow-x-auto rounded-2xl bg-white">
        <Staff notes={pool.map((n) => ({ written: n.written, accidental: n.printedAccidental }))} keyFifths={keyFifths} size="card" className="min-w-max px-2" />
      </div>
      <Fretboard
        tuning={tuning}
        frets={frets}
        position={position}
        highlights={pool.map((n, i) => ({ ...n.home, kind: "home" as const, label: names[i] }))}
        legend={false}
        label={`Home spots of the ${pool.length} notes in position ${position}`}
      />
    </div>
  );
}
