// /me/practice — solo practice. Without a choice in the query it lists what to practise; with one
// (?assignment=, ?set=, ?preset=, ?tune= or ?position=) it runs a short adaptive session.
import { useEffect } from "react";
import { data, Form, Link } from "react-router";
import { requireUserWithRole } from "~/auth/guards.server";
import { buttonClass, Card, NeedsJavaScript, Notice, PageTitle, SelectField } from "~/components/ui";
import { services } from "~/context";
import { DEFAULT_SESSION_NOTES, historyFor, practiceChoices, practicePlan } from "~/practice/practice.server";
import { PracticeSession } from "~/practice/PracticeSession";
import { rhythmState } from "~/practice/rhythmPass.server";
import { rememberTimeZone } from "~/practice/tz";
import type { Route } from "./+types/practice";
import { Icon } from "~/components/Icon";

export const meta: Route.MetaFunction = () => [{ title: "Practice · Fretcall" }];

const COUNT_RANGE = [5, 60] as const;

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["student"]);
  const { db } = services(context);
  const query = new URL(request.url).searchParams;
  const result = await practicePlan(db, user, query);
  if (result?.ok) {
    const asked = Number(query.get("count") ?? DEFAULT_SESSION_NOTES);
    const count = Number.isInteger(asked) ? Math.min(COUNT_RANGE[1], Math.max(COUNT_RANGE[0], asked)) : DEFAULT_SESSION_NOTES;
    const history = await historyFor(db, user.id, result.plan.position, result.plan.tuning);
    return { mode: "session" as const, userId: user.id, plan: result.plan, history, count };
  }
  const choices = await practiceChoices(db, user);
  const tunes = await Promise.all(
    choices.tunes.map(async (t) => ({ ...t, unlocked: (await rhythmState(db, user, t.id))?.unlocked ?? false })),
  );
  const page = { mode: "choose" as const, choices: { ...choices, tunes }, error: result ? result.message : null };
  return result ? data(page, { status: result.status }) : page;
}

export default function Practice({ loaderData }: Route.ComponentProps) {
  useEffect(rememberTimeZone, []);
  if (loaderData.mode === "session") {
    const { userId, plan, history, count } = loaderData;
    // A new choice (or a new round) starts a fresh session component.
    return (
      <>
        <NeedsJavaScript what="A practice session" />
        <PracticeSession key={`${plan.source} ${plan.assignmentId ?? ""}`} userId={userId} plan={plan} history={history} count={count} />
      </>
    );
  }
  const { choices, error } = loaderData;
  return (
    <div className="space-y-6">
      <PageTitle lead="Pick what to read. A session is 20 notes, a few minutes: the notes that need it most come back most.">Practise</PageTitle>
      {error ? <Notice tone="error">{error}</Notice> : null}
      {choices.sets.length > 0 ? (
        <Section title="From your classes">
          {choices.sets.map((s) => (
            <Choice key={s.id} to={`?set=${encodeURIComponent(s.id)}`} title={s.name} detail={[s.className, s.summary].filter(Boolean).join(" · ")} />
          ))}
        </Section>
      ) : null}
      <Section title="Step by step">
        {choices.presets.map((p) => (
          <Choice key={p.id} to={`?preset=${encodeURIComponent(p.id)}`} title={`${p.step}. ${p.name}`} detail={p.adds} />
        ))}
      </Section>
      <Section title="Tunes: pitch first, then rhythm">
        {choices.tunes.map((t) => (
          <li key={t.id}>
            <Card className="flex flex-wrap items-center justify-between gap-3 p-4">
              <span className="font-display text-xl font-semibold">{t.title}</span>
              <span className="flex flex-wrap gap-2">
                <Link to={`?tune=${encodeURIComponent(t.id)}`} className={buttonClass("teal")}>
                  Practise its notes
                </Link>
                <Link to={`/me/rhythm/${encodeURIComponent(t.id)}`} className={buttonClass("ghost")}>
                  {t.unlocked ? null : <Icon name="lock" className="h-5 w-5" />}
                  Rhythm pass
                </Link>
              </span>
            </Card>
          </li>
        ))}
      </Section>
      <Card>
        <Form method="get" className="flex flex-wrap items-end gap-3">
          <div className="min-w-40 flex-1">
            <SelectField
              label="Or choose a position (naturals)"
              name="position"
              defaultValue="5"
              options={Array.from({ length: 12 }, (_, i) => ({ value: String(i + 1), label: `Position ${i + 1}` }))}
            />
          </div>
          <button type="submit" className={buttonClass("ink")}>
            Practise this position
          </button>
        </Form>
      </Card>
    </div>
  );
}

function Section({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section>
      <h2 className="mb-3 font-display text-2xl font-semibold">{title}</h2>
      <ul className="grid gap-3 sm:grid-cols-2">{children}</ul>
    </section>
  );
}

function Choice({ to, title, detail }: { to: string; title: string; detail: string }) {
  return (
    <li>
      <Link to={to} className="block min-h-11 rounded-3xl border border-ink/10 bg-white/70 p-4 shadow-sm hover:border-brass">
        <span className="block font-display text-xl font-semibold">{title}</span>
        <span className="block text-ink-soft">{detail}</span>
      </Link>
    </li>
  );
}
