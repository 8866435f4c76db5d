import { Form, useNavigation } from "react-router";
import { z } from "zod";
import { requireUser } from "~/auth/guards.server";
import { newPassword } from "~/auth/schemas";
import { currentSessionId, endSessionsOf } from "~/auth/session.server";
import { listApiTokens, revokeApiToken } from "~/auth/tokens.server";
import { changePassword, hasPassword } from "~/auth/users.server";
import { SettingsNav } from "~/components/SettingsNav";
import { Button, Card, Field, Notice, PageTitle, PostButton } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/password";
import { day } from "~/review/format";

export const meta: Route.MetaFunction = () => [{ title: "Change your password · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUser(request, context);
  const { db } = services(context);
  const tokens = await listApiTokens(db, user.id);
  return {
    role: user.role,
    hasPassword: await hasPassword(db, user.id),
    tokens: tokens.filter((t) => t.revokedAt === null).map((t) => ({ id: t.id, name: t.name, createdAt: t.createdAt.toISOString() })),
  };
}

const changeSchema = z
  .object({ current: z.string().min(1, "Enter your current password.").max(200, "That isn't your current password.") })
  .and(newPassword);
const revokeSchema = z.object({ id: z.string().min(1).max(40) });

type Result = { errors: Record<string, string | undefined>; notice: string | null };

export async function action({ request, context }: Route.ActionArgs): Promise<Result> {
  const user = await requireUser(request, context);
  const { db, sessions } = services(context);
  const form = await request.formData();
  if (form.get("intent") === "revoke") {
    const parsed = parseForm(revokeSchema, form);
    const revoked = parsed.ok && (await revokeApiToken(db, user.id, parsed.data.id));
    return revoked ? { errors: {}, notice: "The token is revoked." } : { errors: { form: "That token doesn't exist or is already revoked." }, notice: null };
  }
  const parsed = parseForm(changeSchema, form);
  if (!parsed.ok) return { errors: parsed.errors, notice: null };
  if (!(await changePassword(db, user.id, parsed.data.current, parsed.data.password))) {
    return { errors: { current: "That isn't your current password." }, notice: null };
  }
  const ended = await endSessionsOf(db, user.id, await currentSessionId(db, sessions, request));
  const others = ended === 0 ? "" : ended === 1 ? " You were signed out on 1 other device." : ` You were signed out on ${ended} other devices.`;
  return { errors: {}, notice: `Your password is changed.${others}` };
}

export default function Password({ loaderData, actionData }: Route.ComponentProps) {
  const errors = actionData?.errors ?? {};
  const busy = useNavigation().state !== "idle";
  return (
    <div className="mx-auto max-w-2xl space-y-6">
      <SettingsNav role={loaderData.role} />
      <PageTitle lead="Changing your password signs you out on every other device; this one stays signed in.">Change your password</PageTitle>
      {actionData?.notice ? <Notice tone="success">{actionData.notice}</Notice> : null}
      {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
      {loaderData.hasPassword ? (
        <Card>
          {/* The form is keyed on success so the password fields empty themselves. */}
          <Form method="post" className="space-y-4" noValidate key={actionData?.notice ?? "form"}>
            <Field label="Current password" name="current" type="password" autoComplete="current-password" error={errors.current} required />
            <Field label="New password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={errors.password} required />
            <Field label="New password again" name="confirm" type="password" autoComplete="new-password" error={errors.confirm} required />
            <Button type="submit" disabled={busy}>
              Change password
            </Button>
          </Form>
        </Card>
      ) : (
        <Notice tone="info">You have no password: you sign in with a sign-in card. If the card is lost, your teacher can give you a new one.</Notice>
      )}
      {loaderData.tokens.length > 0 ? (
        <Card>
          <h2 className="font-display text-2xl font-semibold">Your API tokens</h2>
          <p className="mt-2 text-ink-soft">
            A new password does not stop these tokens: each keeps working until you revoke it. Revoke any you no longer use or that someone else may have seen.
          </p>
          <ul className="mt-3 divide-y divide-ink/10">
            {loaderData.tokens.map((t) => (
              <li key={t.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
                <span>
                  <strong>{t.name}</strong> · created {day(t.createdAt)}
                </span>
                <PostButton fields={{ intent: "revoke", id: t.id }} disabled={busy}>
                  Revoke
                </PostButton>
              </li>
            ))}
          </ul>
        </Card>
      ) : null}
    </div>
  );
}
