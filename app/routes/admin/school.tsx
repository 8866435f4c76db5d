import { requireUserWithRole } from "~/auth/guards.server";
import { Card, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { classesFor, schoolPeople } from "~/school/classes.server";
import type { Route } from "./+types/school";

export const meta: Route.MetaFunction = () => [{ title: "School · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["admin"]);
  const { db } = services(context);
  const [classList, people] = await Promise.all([classesFor(db, user), schoolPeople(db, user.orgId)]);
  return {
    classes: classList,
    teachers: people.filter((p) => p.role !== "student"),
    studentCount: people.filter((p) => p.role === "student").length,
  };
}

export default function School({ loaderData }: Route.ComponentProps) {
  return (
    <div className="space-y-6">
      <PageTitle lead={`${loaderData.classes.length} classes · ${loaderData.studentCount} students`}>Your school</PageTitle>
      <div className="grid gap-6 md:grid-cols-2">
        <Card>
          <h2 className="font-display text-2xl font-semibold">Teachers and admins</h2>
          <ul className="mt-3 divide-y divide-ink/10">
            {loaderData.teachers.map((t) => (
              <li key={t.id} className="flex justify-between py-2">
                <span>{t.displayName}</span>
                <span className="text-ink-soft">{t.role}</span>
              </li>
            ))}
          </ul>
        </Card>
        <Card>
          <h2 className="font-display text-2xl font-semibold">Classes</h2>
          <ul className="mt-3 divide-y divide-ink/10">
            {loaderData.classes.map((c) => (
              <li key={c.id} className="flex justify-between py-2">
                <span>{c.name}</span>
                <span className="text-ink-soft">
                  {c.students} students · {c.teachers || "no teacher yet"}
                </span>
              </li>
            ))}
          </ul>
        </Card>
      </div>
    </div>
  );
}
