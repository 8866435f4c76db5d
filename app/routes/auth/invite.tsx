import { Form, Link, useNavigation } from "react-router";
import { newPassword } from "~/auth/schemas";
import { homeFor, startSession } from "~/auth/session.server";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import { acceptInvitation, INVITE_PROBLEMS, invitationState } from "~/school/invitations.server";
import type { Route } from "./+types/invite";

export const meta: Route.MetaFunction = () => [{ title: "Your invitation · Fretcall" }];

export async function loader({ params, context }: Route.LoaderArgs) {
  const invite = await invitationState(services(context).db, params.token);
  return invite.state === "live"
    ? { problem: null, displayName: invite.displayName, email: invite.email, className: invite.className, role: invite.role }
    : { problem: INVITE_PROBLEMS[invite.state] };
}

export async function action({ request, params, context }: Route.ActionArgs) {
  const { db, sessions } = services(context);
  const parsed = parseForm(newPassword, await request.formData());
  if (!parsed.ok) return { errors: parsed.errors };
  const result = await acceptInvitation(db, params.token, parsed.data.password);
  if (result.state !== "live") return { errors: { form: INVITE_PROBLEMS[result.state] } };
  // The link proved the e-mail address, so the new account is signed in straight away.
  return startSession(sessions, request, result.userId, homeFor(result.role));
}

export default function Invite({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string | undefined> = actionData?.errors ?? {};
  const busy = useNavigation().state === "submitting";
  if (loaderData.problem !== null) {
    return (
      <div className="mx-auto max-w-md">
        <PageTitle>Your invitation</PageTitle>
        <Card className="space-y-4">
          <Notice tone="error">{loaderData.problem}</Notice>
          <Link to="/signin" className="underline">Sign in</Link>
        </Card>
      </div>
    );
  }
  return (
    <div className="mx-auto max-w-md">
      <PageTitle
        lead={
          loaderData.role === "student"
            ? `Choose a password to join ${loaderData.className} on Fretcall.`
            : `Choose a password to start teaching ${loaderData.className} on Fretcall.`
        }
      >
        Welcome, {loaderData.displayName}
      </PageTitle>
      <Card>
        <Form method="post" className="space-y-4" noValidate>
          {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
          <p>
            You'll sign in with <strong>{loaderData.email}</strong>.
          </p>
          <Field label="Password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={errors.password} required />
          <Field label="Password again" name="confirm" type="password" autoComplete="new-password" error={errors.confirm} required />
          <Button type="submit" disabled={busy} className="w-full">
            Set password and sign in
          </Button>
        </Form>
      </Card>
    </div>
  );
}
