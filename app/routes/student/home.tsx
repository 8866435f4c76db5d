import { requireUserWithRole } from "~/auth/guards.server";
import { JoinClassForm } from "~/components/JoinClassForm";
import { Card, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { OpenAssignments } from "~/practice/AssignmentParts";
import { openAssignmentsFor } from "~/practice/assignments.server";
import { practiceHome } from "~/practice/home.server";
import { PracticeOverview } from "~/practice/PracticeOverview";
import { tzOffsetOf } from "~/practice/tz";
import { classesFor } from "~/school/classes.server";
import type { Route } from "./+types/home";

export const meta: Route.MetaFunction = () => [{ title: "My practice · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["student"]);
  const { db } = services(context);
  return {
    id: user.id,
    name: user.displayName,
    classes: await classesFor(db, user),
    // Open assignments (app/practice): listed in their own section below the title.
    assignments: await openAssignmentsFor(db, user.id),
    // Solo practice (app/practice/home.server.ts): streak, recent results, progress per note.
    practice: await practiceHome(db, user, tzOffsetOf(request)),
  };
}

export default function StudentHome({ loaderData }: Route.ComponentProps) {
  return (
    <div>
      <PageTitle lead="Your classes and your practice between lessons.">Hi, {loaderData.name}</PageTitle>
      {/* ---- Open assignments (app/practice/AssignmentParts.tsx) ---- */}
      <OpenAssignments items={loaderData.assignments} />
      {/* ---- Solo practice (app/practice/PracticeOverview.tsx) ---- */}
      <PracticeOverview data={loaderData.practice} />
      <ul className="grid gap-4 sm:grid-cols-2">
        {loaderData.classes.map((c) => (
          <li key={c.id}>
            <Card>
              <h2 className="font-display text-2xl font-semibold">{c.name}</h2>
              <p className="mt-1 text-ink-soft">{c.teachers ? `with ${c.teachers}` : ""}</p>
            </Card>
          </li>
        ))}
      </ul>
      <Card className="mt-6">
        <JoinClassForm />
      </Card>
      <p className="mt-6">
        <a href={`/people/${loaderData.id}/export.json`} download className="underline">
          Download my data (JSON)
        </a>
      </p>
    </div>
  );
}
