import { Form, Link, redirect, useNavigation, useSearchParams } from "react-router";
import { z } from "zod";
import { getOptionalUser } from "~/auth/guards.server";
import { retryAfterHeaders, clientAddress, take, tooMany } from "~/auth/rate-limit.server";
import { signUpSchema } from "~/auth/schemas";
import { homeFor, startSession } from "~/auth/session.server";
import { confirmStudio, requestStudio } from "~/auth/signup.server";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/signup";

export const meta: Route.MetaFunction = () => [{ title: "Start a studio · Fretcall" }];

export const headers: Route.HeadersFunction = retryAfterHeaders;

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await getOptionalUser(request, context);
  if (user) throw redirect(homeFor(user.role));
  return null;
}

const confirmSchema = z.object({ intent: z.literal("confirm"), token: z.string().min(1).max(2000) });

export async function action({ request, context }: Route.ActionArgs) {
  const { db, sessions, env, limits, mailQueue } = services(context);
  const form = await request.formData();
  const confirm = confirmSchema.safeParse(Object.fromEntries(form));
  if (confirm.success) {
    const created = await confirmStudio(db, env.SESSION_SECRET, confirm.data.token);
    if (!created.ok) return { errors: { form: created.error }, sentTo: null };
    return startSession(sessions, request, created.userId, homeFor("admin"));
  }
  const parsed = parseForm(signUpSchema, form);
  if (!parsed.ok) return { errors: parsed.errors, sentTo: null };
  const refused = await take(limits.signUp, clientAddress(request));
  if (refused) return tooMany(refused, { errors: { form: refused.message }, sentTo: null });
  // The same answer (and work) whether or not the address has an account: see signup.server.ts.
  await requestStudio(db, mailQueue, { secret: env.SESSION_SECRET, publicUrl: env.PUBLIC_URL }, parsed.data);
  return { errors: {}, sentTo: parsed.data.email };
}

export default function SignUp({ actionData }: Route.ComponentProps) {
  const errors: Record<string, string | undefined> = actionData?.errors ?? {};
  const busy = useNavigation().state === "submitting";
  const [params] = useSearchParams();
  const token = params.get("studio");
  if (actionData?.sentTo) {
    return (
      <div className="mx-auto max-w-lg">
        <PageTitle>Check your e-mail</PageTitle>
        <Card>
          <Notice tone="success">
            We've sent a message to {actionData.sentTo}. Open the link in it within 24 hours to create your studio and sign in.
          </Notice>
        </Card>
      </div>
    );
  }
  if (token && !errors.form) {
    return (
      <div className="mx-auto max-w-lg">
        <PageTitle lead="One step left: create the studio and sign in as its admin.">Start a studio</PageTitle>
        <Card>
          <Form method="post" className="space-y-4">
            <input type="hidden" name="intent" value="confirm" />
            <input type="hidden" name="token" value={token} />
            <Button type="submit" disabled={busy} className="w-full">
              {busy ? "Creating…" : "Create my studio"}
            </Button>
          </Form>
        </Card>
      </div>
    );
  }
  return (
    <div className="mx-auto max-w-lg">
      <PageTitle lead="Create your school or studio. You'll be its admin and can add teachers and classes.">
        Start a studio
      </PageTitle>
      <Card>
        <Form method="post" action="/signup" className="space-y-4" noValidate>
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
