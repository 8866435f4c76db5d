import { requireUserWithRole } from "~/auth/guards.server";
import { Card, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { classesFor } from "~/school/classes.server";
import type { Route } from "./+types/home";

export const meta: Route.MetaFunction = () => [{ title: "My practice · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["student"]);
  return { name: user.displayName, classes: await classesFor(services(context).db, user) };
}

export default function StudentHome({ loaderData }: Route.ComponentProps) {
  return (
    <div>
      <PageTitle lead="Your classes and your practice between lessons.">Hi, {loaderData.name}</PageTitle>
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
    </div>
  );
}
