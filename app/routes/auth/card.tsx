import { data, Form, Link, useNavigation } from "react-router";
import { signInWithToken } from "~/auth/cards.server";
import { getOptionalUser } from "~/auth/guards.server";
import { retryAfterHeaders, tooMany } from "~/auth/rate-limit.server";
import { startSession } from "~/auth/session.server";
import { Button, Card, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import type { Route } from "./+types/card";

export const meta: Route.MetaFunction = () => [{ title: "Sign-in card · Fretcall" }, { name: "referrer", content: "no-referrer" }];

export const headers: Route.HeadersFunction = (args) => {
  const headers = new Headers(retryAfterHeaders(args));
  // The link is a key: it must not linger in a shared cache or leave in a Referer.
  headers.set("Cache-Control", "private, no-store");
  headers.set("Referrer-Policy", "no-referrer");
  return headers;
};

/** Opening the link only asks; the sign-in is a post, so a link previewer signs nobody in. */
export async function loader({ request, params, context }: Route.LoaderArgs) {
  const { db, limits } = services(context);
  const result = await signInWithToken(db, limits.cards, request, params.token);
  const signedInAs = (await getOptionalUser(request, context))?.displayName ?? null;
  if (result.ok) return { name: result.holder.displayName, error: null, signedInAs };
  const body = { name: null, error: result.message, signedInAs };
  return result.retryAfter ? tooMany({ retryAfter: result.retryAfter, message: result.message }, body) : data(body, { status: 404 });
}

export async function action({ request, params, context }: Route.ActionArgs) {
  const { db, limits, sessions, env } = services(context);
  const result = await signInWithToken(db, limits.cards, request, params.token);
  if (!result.ok) {
    const body = { error: result.message };
    return result.retryAfter ? tooMany({ retryAfter: result.retryAfter, message: result.message }, body) : body;
  }
  return startSession(sessions, request, result.holder.userId, "/me", { id: result.holder.cardId, maxDays: env.CARD_SESSION_DAYS });
}

export default function CardSignIn({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const error = actionData?.error ?? loaderData.error;
  return (
    <div className="mx-auto max-w-md">
      <PageTitle>Sign-in card</PageTitle>
      <Card>
        {error ? (
          <div className="space-y-4">
            <Notice tone="error">{error}</Notice>
            <p>
              <Link to="/signin" className="underline">Go to the sign-in page</Link>
            </p>
          </div>
        ) : (
          <Form method="post" className="space-y-4">
            <p className="text-xl">
              This card is for <strong>{loaderData.name}</strong>.
            </p>
            {loaderData.signedInAs ? <p>You are signed in here as {loaderData.signedInAs}; signing in with the card signs them out.</p> : null}
            <p className="text-ink-soft">This phone or tablet stays signed in, so next time you can start practising straight away.</p>
            <Button type="submit" tone="teal" disabled={busy} className="w-full">
              {`✓ Sign in as ${loaderData.name}`}
            </Button>
          </Form>
        )}
      </Card>
    </div>
  );
}
