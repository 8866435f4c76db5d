import { Link } from "react-router";
import { requireUserWithRole } from "~/auth/guards.server";
import { JoinClassForm, type JoinClassResult } from "~/components/JoinClassForm";
import { Card, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { joinByCode } from "~/school/people.server";
import type { Route } from "./+types/join-class";

export const meta: Route.MetaFunction = () => [{ title: "Join a class · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  await requireUserWithRole(request, context, ["student"]);
  return null;
}

export async function action({ request, context }: Route.ActionArgs): Promise<JoinClassResult> {
  const user = await requireUserWithRole(request, context, ["student"]);
  const code = String((await request.formData()).get("code") ?? "").slice(0, 40);
  const result = await joinByCode(services(context).db, user, code);
  return result.ok ? { ok: true, message: `You've joined ${result.className}.` } : result;
}

// Shown only when the form was posted without JavaScript; /me shows the same form inline.
export default function JoinClass({ actionData }: Route.ComponentProps) {
  return (
    <div className="mx-auto max-w-md space-y-4">
      <PageTitle>Join a class</PageTitle>
      <Card>
        <JoinClassForm result={actionData} />
      </Card>
      <Link to="/me" className="underline">Back to my practice</Link>
    </div>
  );
}
