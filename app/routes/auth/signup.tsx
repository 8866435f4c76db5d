import { Form, Link, redirect, useNavigation } from "react-router";
import { getOptionalUser } from "~/auth/guards.server";
import { signUpSchema } from "~/auth/schemas";
import { homeFor, startSession } from "~/auth/session.server";
import { createStudio, emailTaken } from "~/auth/users.server";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/signup";

export const meta: Route.MetaFunction = () => [{ title: "Start a studio · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await getOptionalUser(request, context);
  if (user) throw redirect(homeFor(user.role));
  return null;
}

export async function action({ request, context }: Route.ActionArgs) {
  const { db, sessions } = services(context);
  const parsed = parseForm(signUpSchema, await request.formData());
  if (!parsed.ok) return { errors: parsed.errors };
  if (await emailTaken(db, parsed.data.email)) {
    return { errors: { email: "An account with this e-mail already exists. Sign in instead." } };
  }
  const user = await createStudio(db, parsed.data);
  return startSession(sessions, request, user.id, homeFor(user.role));
}

export default function SignUp({ actionData }: Route.ComponentProps) {
  const errors = actionData?.errors ?? {};
  const busy = useNavigation().state === "submitting";
  return (
    <div className="mx-auto max-w-lg">
      <PageTitle lead="Create your school or studio. You'll be its admin and can add teachers and classes.">
        Start a studio
      </PageTitle>
      <Card>
        <Form method="post" className="space-y-4" noValidate>
          {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
          <Field label="Studio or school name" name="studioName" autoComplete="organization" error={errors.studioName} required />
          <Field label="Your name" name="displayName" autoComplete="name" error={errors.displayName} required />
          <Field label="E-mail" name="email" type="email" autoComplete="email" error={errors.email} required />
          <Field label="Password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={errors.password} required />
          <Field label="Password again" name="confirm" type="password" autoComplete="new-password" error={errors.confirm} required />
          <Button type="submit" disabled={busy} className="w-full">
            {busy ? "Creating…" : "Create studio"}
          </Button>
        </Form>
      </Card>
      <p className="mt-4 text-center">
        Already have an account? <Link to="/signin" className="underline">Sign in</Link>
      </p>
    </div>
  );
}
