import { Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import { requireClassTeacher } from "~/auth/access.server";
import { cardsOfClass, endCardDevice } from "~/auth/cards.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { Icon } from "~/components/Icon";
import { Badge, Button, Card, Notice, PageTitle, PostButton } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/class-cards";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Sign-in cards · ${data?.cls.name ?? "Class"} · Fretcall` }];

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const students = await cardsOfClass(db, cls.id);
  return {
    cls: { id: cls.id, name: cls.name },
    students: students.map((s) => ({
      ...s,
      issuedAt: s.issuedAt?.toISOString() ?? null,
      devices: s.devices.map((d) => ({ id: d.id, device: d.device, createdAt: d.createdAt.toISOString(), lastSeenAt: d.lastSeenAt.toISOString() })),
    })),
  };
}

const endSchema = z.object({ intent: z.literal("end"), id: z.string().min(1).max(40) });

export async function action({ request, params, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const parsed = parseForm(endSchema, await request.formData());
  if (!parsed.ok) return { error: "Choose a device to sign out.", notice: null };
  return (await endCardDevice(db, cls.id, parsed.data.id))
    ? { error: null, notice: "That device is signed out. The card still works: scanning it again signs the device back in." }
    : { error: "That device was already signed out.", notice: null };
}

const when = (iso: string) => new Date(iso).toLocaleString(undefined, { day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" });

export default function ClassCards({ loaderData, actionData }: Route.ComponentProps) {
  const { cls, students } = loaderData;
  const busy = useNavigation().state !== "idle";
  const formId = "issue-cards";
  return (
    <div className="space-y-6">
      <PageTitle lead="A printed card signs a student in on their own phone or tablet, by its QR code or by typing the class code and their personal code on the sign-in page. Only the name you entered is printed.">
        Sign-in cards for {cls.name}
      </PageTitle>
      <p>
        <Link to={`/teach/classes/${cls.id}`} className="underline">
          <Icon name="back" /> Back to {cls.name}
        </Link>
      </p>
      {actionData?.notice ? <Notice tone="success">{actionData.notice}</Notice> : null}
      {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}

      {students.length === 0 ? (
        <Notice tone="info">No students in this class yet: add them on the class page first.</Notice>
      ) : (
        <Card>
          <div className="overflow-x-auto" tabIndex={0} role="region" aria-label={`Sign-in cards of ${cls.name}`}>
            <table className="w-full border-collapse text-left">
              <caption className="sr-only">Students of {cls.name}, their sign-in cards and the devices each card signed in</caption>
              <thead>
                <tr className="border-b-2 border-ink/10">
                  <th scope="col" className="px-3 py-2">Print</th>
                  <th scope="col" className="px-3 py-2">Student</th>
                  <th scope="col" className="px-3 py-2">Card</th>
                  <th scope="col" className="px-3 py-2">Devices signed in with it</th>
                </tr>
              </thead>
              <tbody>
                {students.map((s) => (
                  <tr key={s.userId} className="border-b border-ink/5 align-top">
                    <td className="px-3 py-2">
                      <input
                        type="checkbox"
                        form={formId}
                        name="student"
                        value={s.userId}
                        defaultChecked={!s.issuedAt}
                        aria-label={`${s.issuedAt ? "New card" : "Card"} for ${s.displayName}`}
                        className="h-6 w-6"
                      />
                    </td>
                    <td className="px-3 py-2">
                      {s.displayName}
                      {s.hasEmail ? <span className="block text-sm text-ink-soft">also signs in with e-mail</span> : null}
                    </td>
                    <td className="px-3 py-2">
                      {s.issuedAt ? <Badge tone="right">Issued {when(s.issuedAt)}</Badge> : <Badge tone="neutral">No card</Badge>}
                    </td>
                    <td className="px-3 py-2">
                      {s.devices.length === 0 ? (
                        <span className="text-ink-soft">none</span>
                      ) : (
                        <ul className="space-y-2">
                          {s.devices.map((d) => (
                            <li key={d.id} className="flex flex-wrap items-center gap-2">
                              <span>
                                <strong>{d.device}</strong>
                                <span className="block text-sm text-ink-soft">last used {when(d.lastSeenAt)}</span>
                              </span>
                              <PostButton fields={{ intent: "end", id: d.id }} disabled={busy}>
                                Sign out<span className="sr-only"> {s.displayName}'s {d.device}</span>
                              </PostButton>
                            </li>
                          ))}
                        </ul>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <Form id={formId} method="post" action={`/teach/classes/${cls.id}/cards/print`} className="mt-4 space-y-3">
            <p className="text-ink-soft">
              Students without a card are ticked. Ticking a student who has one gives them a new card: the old card stops working and
              every device it signed in is signed out.
            </p>
            <Button type="submit" disabled={busy}>
              Issue and print the ticked cards
            </Button>
          </Form>
        </Card>
      )}
    </div>
  );
}
