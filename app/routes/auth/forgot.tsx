import { Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import { retryAfterHeaders, clientAddress, firstRefusal, take, tooMany } from "~/auth/rate-limit.server";
import { email } from "~/auth/schemas";
import { createPasswordReset, normaliseEmail } from "~/auth/users.server";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/forgot";

export const meta: Route.MetaFunction = () => [{ title: "Reset your password · Fretcall" }];

export const headers: Route.HeadersFunction = retryAfterHeaders;

export async function action({ request, context }: Route.ActionArgs) {
  const { db, mailQueue, limits, env } = services(context);
  const parsed = parseForm(z.object({ email }), await request.formData());
  if (!parsed.ok) return { errors: parsed.errors, sent: false };
  const address = normaliseEmail(parsed.data.email);
  const refused = await firstRefusal([take(limits.reset.account, address), take(limits.reset.address, clientAddress(request))]);
  if (refused) return tooMany(refused, { errors: { form: refused.message }, sent: false });
  const reset = await createPasswordReset(db, address);
  if (reset) {
    const link = `${env.PUBLIC_URL}/reset/${reset.token}`;
    mailQueue.send({
      orgId: null,
      to: address,
      subject: "Reset your Fretcall password",
      text: `Hello ${reset.displayName},\n\nSomeone asked to reset the password of your Fretcall account. To choose a new password, open this link within the next hour:\n\n${link}\n\nThe link works once. If you didn't ask for this, ignore this e-mail; your password stays as it is.\n`,
    });
  }
  // The same answer whether or not the account exists, and the mail goes out after it, so neither
  // the words nor the timing can be used to find accounts.
  return { errors: {}, sent: true };
}

export default function Forgot({ actionData }: Route.ComponentProps) {
  const errors: Record<string, string | undefined> = actionData?.errors ?? {};
  const busy = useNavigation().state === "submitting";
  return (
    <div className="mx-auto max-w-md">
      <PageTitle lead="We'll e-mail you a link that lets you choose a new password.">Forgot your password?</PageTitle>
      <Card>
        {actionData?.sent ? (
          <Notice tone="success">If an account uses that address, a reset link is on its way. It works once, for one hour.</Notice>
        ) : (
          <Form method="post" className="space-y-4" noValidate>
            {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
            <Field label="E-mail" name="email" type="email" autoComplete="email" error={errors.email} required />
            <Button type="submit" disabled={busy} className="w-full">
              Send reset link
            </Button>
          </Form>
        )}
      </Card>
      <p className="mt-4 text-center">
        <Link to="/signin" className="underline">Back to sign in</Link>
      </p>
    </div>
  );
}
