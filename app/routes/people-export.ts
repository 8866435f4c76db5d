import { data } from "react-router";
import { requireUser } from "~/auth/guards.server";
import { services } from "~/context";
import { exportPersonalData, studentInSchool } from "~/school/people.server";
import type { Route } from "./+types/people-export";

/** A student's own data as a JSON download: for the student themself or their school's admin. */
export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUser(request, context);
  const { db } = services(context);
  const allowed =
    user.id === params.userId || (user.role === "admin" && (await studentInSchool(db, user.orgId, params.userId)));
  const body = allowed ? await exportPersonalData(db, params.userId) : undefined;
  if (!body) throw data({ error: "No such person." }, { status: 404 });
  return new Response(JSON.stringify(body, null, 2), {
    headers: {
      "Content-Type": "application/json; charset=utf-8",
      "Content-Disposition": `attachment; filename="fretcall-data-${params.userId}.json"`,
      "Cache-Control": "private, no-store",
    },
  });
}
