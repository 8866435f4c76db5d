import { Form, Link, redirect, useNavigation, useSearchParams } from "react-router";
import { signInWithCodes } from "~/auth/cards.server";
import { getOptionalUser } from "~/auth/guards.server";
import { retryAfterHeaders, tooMany } from "~/auth/rate-limit.server";
import { homeFor, startSession } from "~/auth/session.server";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { safeRedirect } from "~/lib/forms";
import type { Route } from "./+types/signin";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Fretcall" }];

export const headers: Route.HeadersFunction = retryAfterHeaders;

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await getOptionalUser(request, context);
  if (user) throw redirect(homeFor(user.role));
  return null;
}

export async function action({ request, context }: Route.ActionArgs) {
  const { authenticator, sessions, db, env, limits } = services(context);
  const form = await request.clone().formData();
  if (form.get("intent") === "card") {
    const typed = { classCode: String(form.get("classCode") ?? ""), personalCode: String(form.get("personalCode") ?? "") };
    const card = await signInWithCodes(db, env.SESSION_SECRET, limits.cards, request, typed);
    if (!card.ok) {
      const body = { cardError: card.message, classCode: typed.classCode };
      return card.retryAfter ? tooMany({ retryAfter: card.retryAfter, message: card.message }, body) : body;
    }
    return startSession(sessions, request, card.holder.userId, "/me", { id: card.holder.cardId, maxDays: env.CARD_SESSION_DAYS });
  }
  const result = await authenticator.authenticate("form", request);
  if (!result.ok) {
    const body = { error: result.message, email: String(form.get("email") ?? "") };
    return result.retryAfter ? tooMany({ retryAfter: result.retryAfter, message: result.message }, body) : body;
  }
  return startSession(sessions, request, result.user.id, safeRedirect(form.get("redirectTo"), homeFor(result.user.role)));
}

export default function SignIn({ actionData }: Route.ComponentProps) {
  const [params] = useSearchParams();
  const busy = useNavigation().state === "submitting";
  return (
    <div className="mx-auto max-w-md">
      <PageTitle>Sign in</PageTitle>
      <Card>
        <Form method="post" className="space-y-4" noValidate>
          {actionData && "error" in actionData ? <Notice tone="error">{actionData.error}</Notice> : null}
          <input type="hidden" name="redirectTo" value={params.get("redirectTo") ?? ""} />
          <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={actionData && "email" in actionData ? actionData.email : undefined} required />
          <Field label="Password" name="password" type="password" autoComplete="current-password" required />
          <Button type="submit" disabled={busy} className="w-full">
            {busy ? "Signing in…" : "Sign in"}
          </Button>
        </Form>
      </Card>
      <p className="mt-4 text-center">
        <Link to="/forgot" className="underline">Forgot your password?</Link>
      </p>
      <Card className="mt-6">
        <h2 className="font-display text-2xl font-semibold">Have a sign-in card?</h2>
        <p className="mt-1 text-ink-soft">Scan its QR code, or type the two codes printed on it.</p>
        <Form method="post" className="mt-3 space-y-4" noValidate>
          {actionData && "cardError" in actionData ? <Notice tone="error">{actionData.cardError}</Notice> : null}
          <input type="hidden" name="intent" value="card" />
          <Field label="Class code" name="classCode" autoComplete="off" autoCapitalize="characters" spellCheck={false} defaultValue={actionData && "classCode" in actionData ? actionData.classCode : undefined} required />
          <Field label="Personal code" name="personalCode" autoComplete="off" autoCapitalize="characters" spellCheck={false} required />
          <Button type="submit" tone="ghost" disabled={busy} className="w-full">
            Use my card
          </Button>
        </Form>
      </Card>
    </div>
  );
}
