import { requireUserWithRole } from "~/auth/guards.server";
import { Card, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { classesFor } from "~/school/classes.server";
import type { Route } from "./+types/dashboard";

export const meta: Route.MetaFunction = () => [{ title: "Teach · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  return { name: user.displayName, classes: await classesFor(services(context).db, user) };
}

export default function TeacherDashboard({ loaderData }: Route.ComponentProps) {
  return (
    <div>
      <PageTitle lead="Your classes. Host a live round, plan what each class reads next, and look back at how they did.">
        Hello, {loaderData.name}
      </PageTitle>
      {loaderData.classes.length === 0 ? (
        <Card>No classes yet. Your school's admin can add you to a class.</Card>
      ) : (
        <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
          {loaderData.classes.map((c) => (
            <li key={c.id}>
              <Card>
                <h2 className="font-display text-2xl font-semibold">{c.name}</h2>
                <p className="mt-1 text-ink-soft">
                  {c.students} {c.students === 1 ? "student" : "students"}
                  {c.teachers ? ` · taught by ${c.teachers}` : ""}
                </p>
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
