import { Form, redirect, useNavigation, useSearchParams } from "react-router";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { parseRoomCode } from "~/game/roomCode";
import { retryAfterHeaders, tooMany } from "~/auth/rate-limit.server";
import { lookUpRoom } from "~/rooms/rooms.server";
import type { Route } from "./+types/join";

export const meta: Route.MetaFunction = () => [{ title: "Join a round · Fretcall" }];

export const headers: Route.HeadersFunction = retryAfterHeaders;

/** /join?code=… (the QR code's link) goes straight to the pad when the room is open. */
export async function loader({ request, context }: Route.LoaderArgs) {
  const typed = new URL(request.url).searchParams.get("code");
  if (!typed) return { error: null };
  return checkCode(typed, request, context);
}

export async function action({ request, context }: Route.ActionArgs) {
  return checkCode(String((await request.formData()).get("code") ?? ""), request, context);
}

async function checkCode(typed: string, request: Request, context: Route.LoaderArgs["context"]) {
  const parsed = parseRoomCode(typed);
  if (!parsed.ok) return { error: parsed.message };
  const found = await lookUpRoom(services(context), request, parsed.code);
  if (!found.ok) return found.refused ? tooMany(found.refused, { error: found.refused.message }) : { error: found.error };
  throw redirect(`/play/${parsed.code}`);
}

export default function Join({ loaderData, actionData }: Route.ComponentProps) {
  const [params] = useSearchParams();
  const error = actionData?.error ?? loaderData.error;
  const busy = useNavigation().state !== "idle";
  return (
    <div className="mx-auto max-w-sm">
      <PageTitle lead="Type the room code shown on the class screen.">Join a round</PageTitle>
      <Card>
        <Form method="post" className="space-y-4" noValidate>
          {error ? <Notice tone="error">{error}</Notice> : null}
          <Field
            label="Room code"
            name="code"
            defaultValue={params.get("code") ?? ""}
            autoComplete="off"
            autoCapitalize="characters"
            spellCheck={false}
            className="mt-1 block min-h-14 w-full rounded-xl border-2 border-ink/20 bg-white px-3 py-2 text-center font-display text-3xl tracking-[0.3em] uppercase"
            required
          />
          <Button type="submit" tone="teal" disabled={busy} className="w-full text-xl">
            Join
          </Button>
        </Form>
      </Card>
    </div>
  );
}
