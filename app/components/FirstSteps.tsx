import { Link } from "react-router";
import type { FirstStep } from "~/school/firstSteps";
import { plural } from "~/lib/plural";
import { Icon } from "./Icon";
import { Card } from "./ui";

/** The first-run checklist; gone once every step is done. */
export function FirstSteps({ steps }: { steps: FirstStep[] }) {
  const left = steps.filter((s) => !s.done).length;
  if (left === 0) return null;
  return (
    <Card className="mb-6">
      <h2 className="font-display text-2xl font-semibold">First steps</h2>
      <p className="text-ink-soft">{`${plural(left, "step")} to go. Each ticks itself once it's done.`}</p>
      <ol className="mt-3 space-y-2" aria-label="First steps">
        {steps.map((s) => (
          <li key={s.key} data-step={s.key} data-done={s.done} className="flex flex-wrap items-center gap-x-3 gap-y-1">
            <span className={`inline-flex h-7 w-7 items-center justify-center rounded-full border-2 ${s.done ? "border-teal bg-teal text-white" : "border-ink/30"}`}>
              {s.done ? <Icon name="check" className="h-4 w-4" /> : null}
            </span>
            <span className="sr-only">{s.done ? "Done:" : "To do:"}</span>
            {s.done ? (
              <span className="text-ink-soft">{s.label}</span>
            ) : (
              <Link to={s.to} className="font-medium underline decoration-brass">
                {s.label}
              </Link>
            )}
            {!s.done && s.also ? (
              <Link to={s.also.to} className="underline decoration-brass">
                {s.also.label}
              </Link>
            ) : null}
            {!s.done && s.waitsFor ? <span className="text-sm text-ink-soft">{s.waitsFor}</span> : null}
          </li>
        ))}
      </ol>
    </Card>
  );
}
