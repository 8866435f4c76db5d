// A home-spot map as a printable chart: strings down the side, frets across, the written note in each home spot.
import { spellInKey } from "~/music/keys";
import { noteName } from "~/music/naming";
import type { Tuning } from "~/music/tuning";
import { useNoteNaming } from "./NoteNaming";

export interface ChartSpot {
  string: number;
  fret: number;
  label: string;
}

/** The frets a chart must show: the position's stretches, widened for any spot outside them. */
export function chartFrets(stretch: { stretchLow: number; stretchHigh: number }, spots: readonly { fret: number }[]) {
  return { first: Math.min(stretch.stretchLow, ...spots.map((s) => s.fret)), last: Math.max(stretch.stretchHigh, ...spots.map((s) => s.fret)) };
}

export function SpotChart({ tuning, first, last, spots, caption }: { tuning: Tuning; first: number; last: number; spots: readonly ChartSpot[]; caption: string }) {
  const naming = useNoteNaming();
  const frets = Array.from({ length: last - first + 1 }, (_, i) => first + i);
  const strings = tuning.strings.map((_, i) => i + 1);
  const at = (string: number, fret: number) => spots.find((s) => s.string === string && s.fret === fret);
  return (
    // Focusable, so a keyboard can scroll a chart wider than the screen.
    <div className="overflow-x-auto" tabIndex={0} role="region" aria-label={caption}>
      <table className="w-full border-collapse text-center text-lg print:text-base">
        <caption className="sr-only">{caption}: written notes by string and fret</caption>
        <thead>
          <tr>
            <th scope="col" className="border border-ink/20 bg-paper-deep px-2 py-1 text-left">
              String
            </th>
            {frets.map((f) => (
              <th key={f} scope="col" className="border border-ink/20 bg-paper-deep px-2 py-1">
                {f === 0 ? "open" : `fret ${f}`}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {strings.map((string) => (
            <tr key={string}>
              <th scope="row" className="border border-ink/20 px-2 py-1 text-left font-medium">
                {string} ({noteName(spellInKey(tuning.strings[string - 1]!, 0), naming)})
              </th>
              {frets.map((fret) => (
                <td key={fret} className="border border-ink/20 px-2 py-1 font-display font-semibold">
                  {at(string, fret)?.label ?? ""}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
