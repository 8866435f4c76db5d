import { Form, Link, useNavigation } from "react-router";
import { newPassword } from "~/auth/schemas";
import { consumePasswordReset, resetIsLive } from "~/auth/users.server";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/reset";

export const meta: Route.MetaFunction = () => [{ title: "Choose a new password · Fretcall" }];

const SPENT = "This reset link has expired or was already used. Ask for a new one.";

export async function loader({ params, context }: Route.LoaderArgs) {
  return { live: await resetIsLive(services(context).db, params.token) };
}

export async function action({ request, params, context }: Route.ActionArgs) {
  const parsed = parseForm(newPassword, await request.formData());
  if (!parsed.ok) return { errors: parsed.errors, done: false };
  const done = await consumePasswordReset(services(context).db, params.token, parsed.data.password);
  return done ? { errors: {}, done: true } : { errors: { form: SPENT }, done: false };
}

export default function Reset({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string | undefined> = actionData?.errors ?? {};
  const busy = useNavigation().state === "submitting";
  return (
    <div className="mx-auto max-w-md">
      <PageTitle>Choose a new password</PageTitle>
      <Card>
        {actionData?.done ? (
          <div className="space-y-4">
            <Notice tone="success">Your password is changed. Sign in with the new one.</Notice>
            <Link to="/signin" className="underline">Sign in</Link>
          </div>
        ) : !loaderData.live ? (
          <div className="space-y-4">
            <Notice tone="error">{SPENT}</Notice>
            <Link to="/forgot" className="underline">Ask for a new link</Link>
          </div>
        ) : (
          <Form method="post" className="space-y-4" noValidate>
            {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
            <Field label="New password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={errors.password} required />
            <Field label="New password again" name="confirm" type="password" autoComplete="new-password" error={errors.confirm} required />
            <Button type="submit" disabled={busy} className="w-full">
              Save new password
            </Button>
          </Form>
        )}
      </Card>
    </div>
  );
}
