import { Form, useNavigation } from "react-router";
import { z } from "zod";
import { requireUserWithRole } from "~/auth/guards.server";
import { createApiToken, listApiTokens, revokeApiToken } from "~/auth/tokens.server";
import { SettingsNav } from "~/components/SettingsNav";
import { Button, Card, Field, Notice, PageTitle, PostButton } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/settings";
import { day } from "~/review/format";

export const meta: Route.MetaFunction = () => [{ title: "API tokens · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const tokens = await listApiTokens(services(context).db, user.id);
  return { role: user.role, tokens: tokens.map((t) => ({ ...t, createdAt: t.createdAt.toISOString(), lastUsedAt: t.lastUsedAt?.toISOString() ?? null, revoked: t.revokedAt !== null })) };
}

const actionSchema = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("create"), name: z.string().trim().min(1, "Name the token, e.g. “gradebook sync”.").max(60, "Keep the name under 60 characters.") }),
  z.object({ intent: z.literal("revoke"), id: z.string().min(1).max(40) }),
]);

export async function action({ request, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const parsed = parseForm(actionSchema, await request.formData());
  if (!parsed.ok) return { errors: parsed.errors, created: null };
  if (parsed.data.intent === "create") {
    const { token } = await createApiToken(db, user.id, parsed.data.name);
    return { errors: {}, created: token };
  }
  const revoked = await revokeApiToken(db, user.id, parsed.data.id);
  return { errors: revoked ? {} : { form: "That token doesn't exist or is already revoked." }, created: null };
}

export default function Settings({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string | undefined> = actionData?.errors ?? {};
  const busy = useNavigation().state !== "idle";
  return (
    <div className="mx-auto max-w-2xl space-y-6">
      <SettingsNav role={loaderData.role} />
      <PageTitle lead="Personal API tokens let a script read your classes and results through the JSON API (/api/v1/…), with your permissions. Send one as “Authorization: Bearer …”.">
        API tokens
      </PageTitle>
      {actionData?.created ? (
        <Notice tone="success">
          New token — copy it now, it won't be shown again: <code className="break-all font-mono">{actionData.created}</code>
        </Notice>
      ) : null}
      {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
      <Card>
        <Form method="post" className="flex flex-wrap items-end gap-3" noValidate>
          <input type="hidden" name="intent" value="create" />
          <div className="min-w-60 flex-1">
            <Field label="Token name" name="name" error={errors.name} required />
          </div>
          <Button type="submit" disabled={busy}>
            Create token
          </Button>
        </Form>
      </Card>
      <Card>
        <h2 className="font-display text-2xl font-semibold">Your tokens</h2>
        {loaderData.tokens.length === 0 ? <p className="mt-2 text-ink-soft">None yet.</p> : null}
        <ul className="mt-3 divide-y divide-ink/10">
          {loaderData.tokens.map((t) => (
            <li key={t.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
              <span>
                <strong>{t.name}</strong> · created {day(t.createdAt)}
                {t.lastUsedAt ? ` · last used ${day(t.lastUsedAt)}` : " · never used"}
              </span>
              {t.revoked ? (
                <span className="text-ink-soft">✗ revoked</span>
              ) : (
                <PostButton fields={{ intent: "revoke", id: t.id }}>Revoke</PostButton>
              )}
            </li>
          ))}
        </ul>
      </Card>
    </div>
  );
}
