import { data } from "react-router";
import { requirePersonExport } from "~/auth/access.server";
import { requireUser } from "~/auth/guards.server";
import { services } from "~/context";
import { exportPersonalData } from "~/school/people.server";
import type { Route } from "./+types/people-export";

/** A student's own data as a JSON download: for the student themself or their school's admin. */
export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUser(request, context);
  const { db } = services(context);
  await requirePersonExport(db, user, params.userId);
  const body = await exportPersonalData(db, params.userId);
  if (!body) throw data({ error: "No such person." }, { status: 404 });
  return new Response(JSON.stringify(body, null, 2), {
    headers: {
      "Content-Type": "application/json; charset=utf-8",
      "Content-Disposition": `attachment; filename="fretcall-data-${params.userId}.json"`,
      "Cache-Control": "private, no-store",
    },
  });
}
