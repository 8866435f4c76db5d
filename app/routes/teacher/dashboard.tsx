import { Link } from "react-router";
import { requireUserWithRole } from "~/auth/guards.server";
import { buttonClass, Card, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { roomsHostedBy } from "~/rooms/rooms.server";
import { classesFor } from "~/school/classes.server";
import type { Route } from "./+types/dashboard";
import { Icon } from "~/components/Icon";
import { FirstSteps } from "~/components/FirstSteps";
import { CREATE_CLASS_LINK } from "~/school/firstSteps";
import { schoolFirstSteps } from "~/school/firstSteps.server";
import { plural } from "~/lib/plural";

export const meta: Route.MetaFunction = () => [{ title: "Teach · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const isAdmin = user.role === "admin";
  const [classList, rounds, steps] = await Promise.all([classesFor(db, user), roomsHostedBy(db, user.id, 10), isAdmin ? schoolFirstSteps(db, user.orgId) : []]);
  return {
    name: user.displayName,
    isAdmin,
    steps,
    classes: classList,
    rounds: rounds.map((r) => ({ ...r, createdAt: r.createdAt.toISOString(), live: r.endedAt === null })),
  };
}

export default function TeacherDashboard({ loaderData }: Route.ComponentProps) {
  return (
    <div>
      <PageTitle lead="Your classes. Host a live round, plan what each class reads next, and look back at how they did.">
        Hello, {loaderData.name}
      </PageTitle>
      <FirstSteps steps={loaderData.steps} />
      {loaderData.classes.length === 0 ? (
        <Card>
          {loaderData.isAdmin ? (
            <>
              No classes yet.{" "}
              <Link to={CREATE_CLASS_LINK} className="underline decoration-brass">
                Create your first class
              </Link>{" "}
              on the School page; you can teach it yourself.
            </>
          ) : (
            "No classes yet. Your school's admin can add you to a class."
          )}
        </Card>
      ) : (
        <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
          {loaderData.classes.map((c) => (
            <li key={c.id}>
              <Card>
                <h2 className="font-display text-2xl font-semibold">
                  <Link to={`/teach/classes/${c.id}`} className="underline decoration-brass">
                    {c.name}
                  </Link>
                </h2>
                <p className="mt-1 text-ink-soft">
                  {plural(c.students, "student")}
                  {c.teachers ? ` · taught by ${c.teachers}` : ""}
                </p>
                <div className="mt-3 flex flex-wrap items-center gap-3">
                  <Link to={`/host?class=${c.id}`} className={buttonClass("teal")}>
                    <Icon name="play" className="h-4 w-4" />
                    Host a round
                  </Link>
                  <Link to={`/teach/classes/${c.id}/maps`} className="underline decoration-brass">
                    Home-spot maps
                  </Link>
                  <Link to={`/teach/classes/${c.id}/review`} className="underline decoration-brass">
                    Class review
                  </Link>
                </div>
              </Card>
            </li>
          ))}
        </ul>
      )}
      <section className="mt-8">
        <h2 className="font-display text-2xl font-semibold">Recent rounds</h2>
        {loaderData.rounds.length === 0 ? <p className="mt-2 text-ink-soft">No rounds yet.</p> : null}
        <ul className="mt-3 divide-y divide-ink/10">
          {loaderData.rounds.map((r) => (
            <li key={r.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
              <span>
                {r.title} · {new Date(r.createdAt).toLocaleString()}
              </span>
              {r.live ? (
                <Link to={`/stage/${r.id}`} className="underline">
                  <Icon name="dot" className="h-4 w-4" />
                  Live — open the stage
                </Link>
              ) : (
                <Link to={`/results/${r.id}`} className="underline">
                  Results
                </Link>
              )}
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}
