import { useFetcher } from "react-router";
import { Button, Field, Notice } from "./ui";

export type JoinClassResult = { ok: true; message: string } | { ok: false; error: string };

/** A student types a class join code; works inline with JavaScript and as a plain form post without it. */
export function JoinClassForm({ result }: { result?: JoinClassResult }) {
  const fetcher = useFetcher<JoinClassResult>();
  const shown = fetcher.data ?? result;
  return (
    <fetcher.Form method="post" action="/me/join-class" className="space-y-3" noValidate>
      <h2 className="font-display text-2xl font-semibold">Join a class</h2>
      {shown?.ok ? <Notice tone="success">{shown.message}</Notice> : null}
      <div className="flex flex-wrap items-end gap-3">
        <div className="min-w-48 flex-1">
          <Field
            label="Class join code"
            name="code"
            autoComplete="off"
            autoCapitalize="characters"
            hint="Your teacher gives it out. Not the room code of a live round."
            error={shown && !shown.ok ? shown.error : undefined}
            required
          />
        </div>
        <Button type="submit" disabled={fetcher.state !== "idle"}>
          Join class
        </Button>
      </div>
    </fetcher.Form>
  );
}
