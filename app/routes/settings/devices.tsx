import { useNavigation } from "react-router";
import { z } from "zod";
import { requireUser } from "~/auth/guards.server";
import { currentSessionId, endSession, endSessionById, endSessionsOf, listSessions } from "~/auth/session.server";
import { SettingsNav } from "~/components/SettingsNav";
import { Badge, Card, Notice, PageTitle, PostButton } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/devices";

export const meta: Route.MetaFunction = () => [{ title: "Signed-in devices · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUser(request, context);
  const { db, sessions } = services(context);
  const current = await currentSessionId(db, sessions, request);
  const rows = await listSessions(db, user.id);
  return {
    role: user.role,
    sessions: rows.map((s) => ({
      id: s.id,
      device: s.device,
      createdAt: s.createdAt.toISOString(),
      lastSeenAt: s.lastSeenAt.toISOString(),
      current: s.id === current,
    })),
  };
}

const actionSchema = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("end"), id: z.string().min(1).max(40) }),
  z.object({ intent: z.literal("end-others") }),
]);

export async function action({ request, context }: Route.ActionArgs) {
  const user = await requireUser(request, context);
  const { db, sessions } = services(context);
  const parsed = parseForm(actionSchema, await request.formData());
  if (!parsed.ok) return { error: "Choose a device to sign out.", notice: null };
  const current = await currentSessionId(db, sessions, request);
  if (parsed.data.intent === "end-others") {
    const count = await endSessionsOf(db, user.id, current);
    return { error: null, notice: count === 1 ? "Signed out of 1 other device." : `Signed out of ${count} other devices.` };
  }
  // Ending this very session is signing out here.
  if (parsed.data.id === current) return endSession(sessions, request, "/signin");
  const ended = await endSessionById(db, user.id, parsed.data.id);
  return ended
    ? { error: null, notice: "That device is signed out." }
    : { error: "That device was already signed out.", notice: null };
}

export default function Devices({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const others = loaderData.sessions.filter((s) => !s.current).length;
  return (
    <div className="mx-auto max-w-2xl space-y-6">
      <SettingsNav role={loaderData.role} />
      <PageTitle lead="Every browser where you are signed in. Sign out of one you don't use or don't recognise; it has to sign in again with your password or sign-in card.">
        Signed-in devices
      </PageTitle>
      {actionData?.notice ? <Notice tone="success">{actionData.notice}</Notice> : null}
      {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}
      <Card>
        <ul className="divide-y divide-ink/10">
          {loaderData.sessions.map((s) => (
            <li key={s.id} className="flex flex-wrap items-center justify-between gap-2 py-3">
              <span>
                <strong>{s.device}</strong> {s.current ? <Badge tone="neutral">this device</Badge> : null}
                <br />
                <span className="text-ink-soft">
                  signed in {new Date(s.createdAt).toLocaleString()} · last active {new Date(s.lastSeenAt).toLocaleString()}
                </span>
              </span>
              <PostButton fields={{ intent: "end", id: s.id }} disabled={busy}>
                {s.current ? "Sign out here" : "Sign out there"}
              </PostButton>
            </li>
          ))}
        </ul>
      </Card>
      {others > 0 ? (
        <PostButton fields={{ intent: "end-others" }} tone="brick" disabled={busy}>
          Sign out of every other device
        </PostButton>
      ) : null}
    </div>
  );
}
