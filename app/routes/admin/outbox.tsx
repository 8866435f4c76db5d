import { data } from "react-router";
import { requireUserWithRole } from "~/auth/guards.server";
import { Card, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { schoolOutbox } from "~/mail/outbox.server";
import type { Route } from "./+types/outbox";

export const meta: Route.MetaFunction = () => [{ title: "Outbox · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const admin = await requireUserWithRole(request, context, ["admin"]);
  const { env } = services(context);
  // Captured mail exists only where the local catcher runs; otherwise mail went to the provider.
  if (!env.mailCapture) throw data({ error: "The outbox exists only while mail is captured locally." }, { status: 404 });
  return { mails: (await schoolOutbox(env.MAIL_DIR, admin.orgId)).slice(0, 100) };
}

export default function Outbox({ loaderData }: Route.ComponentProps) {
  return (
    <div>
      <PageTitle lead="Every e-mail the app sent for your school, caught before it left this machine (development and demo only).">Outbox</PageTitle>
      {loaderData.mails.length === 0 ? <Card>No e-mail sent yet.</Card> : null}
      <ul className="space-y-3">
        {loaderData.mails.map((m) => (
          <li key={m.id}>
            <Card>
              <p className="text-sm text-ink-soft">
                {new Date(m.receivedAt).toLocaleString()} · to {m.to.join(", ")}
              </p>
              <h2 className="font-display text-xl font-semibold">{m.subject}</h2>
              <pre className="mt-2 whitespace-pre-wrap break-words font-sans text-sm">{m.text}</pre>
            </Card>
          </li>
        ))}
      </ul>
    </div>
  );
}
