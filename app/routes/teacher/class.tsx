import { useEffect, useRef } from "react";
import { Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { DataTable, type Column } from "~/components/DataTable";
import { Icon } from "~/components/Icon";
import { Badge, Button, Card, Field, Notice, PageTitle, WhyDisabled } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import { retryAfterHeaders, take, tooMany, type TooMany } from "~/auth/rate-limit.server";
import { addressInUseMail, mailInvitations } from "~/school/invitations.server";
import {
  addStudents,
  checkRowsForClass,
  removeFromClass,
  resendStudentInvite,
  rosterOf,
  type AddressInUse,
  type RosterEntry,
  type SignInStatus,
} from "~/school/people.server";
import { CSV_MAX_BYTES, parseRosterCsv, rosterRowSchema, type CheckedRow } from "~/school/roster";
import type { Route } from "./+types/class";
import { plural } from "~/lib/plural";
import { ClassHubCard } from "~/review/ClassHubCard";
import { classHub } from "~/review/hub.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.cls.name ?? "Class"} · Fretcall` }];

export const headers: Route.HeadersFunction = retryAfterHeaders;

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const roster = await rosterOf(db, cls.id);
  return { cls: { id: cls.id, name: cls.name, joinCode: cls.joinCode }, roster, hub: await classHub(db, cls, roster) };
}

type ActionResult = {
  notice?: string;
  error?: string;
  errors?: Partial<Record<string, string>>;
  /** Checked CSV rows awaiting the teacher's confirmation, or the confirmed rows that failed re-checking. */
  preview?: CheckedRow[];
};

const userIntent = z.object({ intent: z.enum(["remove", "resend"]), userId: z.string().min(1).max(40) });
const addSchema = z.object({
  intent: z.literal("add"),
  name: z.string().max(1000),
  email: z.string().max(1000).default(""),
});
// The file and the ticked rows are read from the form by their own checks below.
const actionSchema = z.discriminatedUnion("intent", [z.object({ intent: z.literal("preview") }), z.object({ intent: z.literal("import") }), addSchema, userIntent]);

export async function action({ request, params, context }: Route.ActionArgs): Promise<ActionResult | TooMany<ActionResult>> {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db, mailer, mailQueue, env, limits } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  // Refuse an oversized upload before reading it into memory.
  if (Number(request.headers.get("Content-Length") ?? 0) > CSV_MAX_BYTES * 2) {
    return { error: `The file is too large (at most ${CSV_MAX_BYTES / 1000} KB).` };
  }
  const form = await request.formData();
  const parsed = parseForm(actionSchema, form);
  if (!parsed.ok) return form.get("intent") === "add" ? { errors: parsed.errors } : { error: "Unknown action." };
  const input = parsed.data;
  // Invitations go out after the answer (app/mail/queue.server.ts); a failed one can be resent.
  const sent = (invites: Parameters<typeof mailInvitations>[2], what: string, inUse: AddressInUse[] = []) => {
    mailQueue.later(() => mailInvitations(mailer, env.PUBLIC_URL, invites, "student", cls.name, cls.orgId));
    for (const to of inUse) mailQueue.send(addressInUseMail(env.PUBLIC_URL, to, "student", cls.name));
    return { notice: what };
  };
  /** Counts the e-mails about to be sent against the sender's invitation limit. */
  const overInvitationLimit = async (emails: number) => {
    const refused = emails ? await take(limits.invitations, user.id, emails) : undefined;
    return refused ? tooMany(refused, { error: refused.message }) : undefined;
  };

  if (input.intent === "preview") {
    const file = form.get("file");
    if (!(file instanceof File) || file.size === 0) return { error: "Choose a CSV file to upload." };
    if (file.size > CSV_MAX_BYTES) return { error: `The file is too large (at most ${CSV_MAX_BYTES / 1000} KB).` };
    const parsed = parseRosterCsv(await file.text());
    if (!parsed.ok) return { error: parsed.error };
    return { preview: (await checkRowsForClass(db, cls, parsed.rows)).checked };
  }

  if (input.intent === "import") {
    const rows = [];
    for (const value of form.getAll("row")) {
      const row = rosterRowSchema.safeParse(safeJson(value));
      if (!row.success) return { error: "The confirmed rows were damaged on the way. Upload the file again." };
      rows.push(row.data);
    }
    if (rows.length === 0) return { error: "Tick at least one row to import." };
    const over = await overInvitationLimit(rows.filter((r) => r.email.trim()).length);
    if (over) return over;
    const result = await addStudents(db, cls, user.id, rows);
    if (!result.ok) {
      return { preview: result.rows, error: "Nothing was imported: some rows have problems (shown below). Untick or fix them and try again." };
    }
    return sent(result.invites, `Imported ${result.added} student${result.added === 1 ? "" : "s"}.`, result.inUse);
  }

  if (input.intent === "add") {
    const over = await overInvitationLimit(input.email.trim() ? 1 : 0);
    if (over) return over;
    const result = await addStudents(db, cls, user.id, [{ line: 0, name: input.name, email: input.email }]);
    if (!result.ok) {
      const problems = result.rows[0]?.errors ?? [];
      const on = (field: string) => problems.filter((p) => p.field === field).map((p) => p.message).join(" ") || undefined;
      return { errors: { name: on("name"), email: on("email") } };
    }
    return sent(result.invites, `Added ${input.name.trim()}.`, result.inUse);
  }

  if (input.intent === "remove") {
    const done = await removeFromClass(db, cls.id, input.userId);
    return done ? { notice: "Removed from the class. Their account and other classes are unchanged." } : { error: "That student isn't in this class." };
  }
  const over = await overInvitationLimit(1);
  if (over) return over;
  const invite = await resendStudentInvite(db, cls.id, input.userId, user.id);
  if (!invite) return { error: "Only students with an e-mail who haven't set a password yet can be sent an invitation." };
  return sent([invite], `A new invitation is on its way to ${invite.email}; the previous link no longer works.`);
}

function safeJson(value: FormDataEntryValue): unknown {
  try {
    return typeof value === "string" ? JSON.parse(value) : undefined;
  } catch {
    return undefined;
  }
}

const STATUS: Record<SignInStatus, { tone: "right" | "info" | "neutral" | "miss"; word: string }> = {
  active: { tone: "right", word: "Can sign in" },
  invited: { tone: "info", word: "Invited" },
  "invite-expired": { tone: "miss", word: "Invitation expired" },
  nickname: { tone: "neutral", word: "Nickname only" },
  card: { tone: "right", word: "Sign-in card" },
};

const day = (iso: string) => new Date(iso).toLocaleDateString(undefined, { day: "numeric", month: "short", year: "numeric" });

export default function ClassPage({ loaderData, actionData }: Route.ComponentProps) {
  const { cls, roster, hub } = loaderData;
  const busy = useNavigation().state !== "idle";
  const errors = actionData?.errors ?? {};
  const columns: Column<RosterEntry>[] = [
    { key: "displayName", header: "Name" },
    {
      key: "status",
      header: "Sign-in",
      sortValue: (r) => STATUS[r.status].word,
      cell: (r) => (
        <span title={r.inviteExpiresAt ? `Link valid until ${day(r.inviteExpiresAt)}` : undefined}>
          <Badge tone={STATUS[r.status].tone}>{STATUS[r.status].word}</Badge>
        </span>
      ),
    },
    { key: "email", header: "E-mail", cell: (r) => r.email ?? <span className="text-ink-soft">—</span> },
    { key: "joinedAt", header: "Joined", sortValue: (r) => r.joinedAt, cell: (r) => day(r.joinedAt) },
    {
      key: "actions",
      header: "Actions",
      sortable: false,
      cell: (r) => (
        <div className="flex flex-wrap items-center gap-2">
          {r.status === "invited" || r.status === "invite-expired" ? (
            <Form method="post">
              <input type="hidden" name="intent" value="resend" />
              <input type="hidden" name="userId" value={r.id} />
              <button type="submit" className="min-h-11 underline" disabled={busy}>
                Resend invitation
              </button>
            </Form>
          ) : null}
          <details>
            <summary className="min-h-11 cursor-pointer py-2 underline">Remove…</summary>
            <Form method="post" className="mt-1">
              <input type="hidden" name="intent" value="remove" />
              <input type="hidden" name="userId" value={r.id} />
              <Button tone="brick" type="submit" disabled={busy} className="text-base">
                ✗ Remove {r.displayName} from {cls.name}
              </Button>
            </Form>
          </details>
        </div>
      ),
    },
  ];

  return (
    <div className="space-y-6">
      <PageTitle
        lead={
          <>
            {plural(roster.length, "student")} · class join code{" "}
            <strong className="font-mono text-2xl tracking-widest text-ink" aria-label={`join code ${cls.joinCode.split("").join(" ")}`}>
              {cls.joinCode}
            </strong>{" "}
            — students who sign in can join this class with it on their page.
          </>
        }
      >
        {cls.name}
      </PageTitle>
      <p className="flex flex-wrap gap-4">
        <Link to={`/host?class=${cls.id}`} className="inline-flex items-center gap-1 underline"><Icon name="play" className="h-4 w-4" />Host a round</Link>
        <Link to={`/teach/classes/${cls.id}/review`} className="underline">Class review</Link>
        <Link to={`/teach/classes/${cls.id}/cards`} className="underline">Sign-in cards</Link>
      </p>

      {actionData?.notice ? <Notice tone="success">{actionData.notice}</Notice> : null}
      {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}

      <ClassHubCard classId={cls.id} hub={hub} />

      <Card>
        <h2 className="mb-3 font-display text-2xl font-semibold">Roster</h2>
        <DataTable
          caption={`Students in ${cls.name}`}
          rows={roster}
          columns={columns}
          rowKey={(r) => r.id}
          filterPlaceholder="Filter students"
          pageSize={25}
          empty="No students yet. Add them below, import a CSV file, or give out the join code."
          initialSort={{ key: "displayName", direction: "asc" }}
        />
      </Card>

      <div className="grid gap-6 lg:grid-cols-2">
        <Card>
          <h2 className="font-display text-2xl font-semibold">Add a student</h2>
          <Form method="post" className="mt-3 space-y-4" noValidate>
            <input type="hidden" name="intent" value="add" />
            <Field label="Name" name="name" hint="A first name and initial is enough, or a nickname." error={errors.name} required />
            <Field
              label="E-mail (optional)"
              name="email"
              type="email"
              hint="With an e-mail they get an invitation to set a password. Leave it empty for a nickname-only student: no e-mail is kept."
              error={errors.email}
            />
            <Button type="submit" disabled={busy}>Add student</Button>
          </Form>
        </Card>

        <Card>
          <h2 className="font-display text-2xl font-semibold">Import from a CSV file</h2>
          <Form method="post" encType="multipart/form-data" className="mt-3 space-y-4">
            <input type="hidden" name="intent" value="preview" />
            <Field
              label="CSV file"
              name="file"
              type="file"
              accept=".csv,text/csv"
              hint="First line: the column names, e.g. name,email (e-mail optional). One student a line, at most 200."
              required
            />
            <Button type="submit" tone="ghost" disabled={busy}>Preview</Button>
          </Form>
        </Card>
      </div>

      {actionData?.preview ? <ImportPreview rows={actionData.preview} busy={busy} /> : null}
    </div>
  );
}

/** The checked rows, each with its problems; only rows without problems can be ticked for import. */
function ImportPreview({ rows, busy }: { rows: CheckedRow[]; busy: boolean }) {
  const good = rows.filter((r) => r.errors.length === 0).length;
  const heading = useRef<HTMLHeadingElement>(null);
  // The preview appears below the roster, out of sight on a long page: bring it into view, and a screen reader to it.
  useEffect(() => {
    heading.current?.scrollIntoView({ block: "start" });
    heading.current?.focus({ preventScroll: true });
  }, [rows]);
  return (
    <Card>
      <h2 ref={heading} tabIndex={-1} className="scroll-mt-4 font-display text-2xl font-semibold outline-none">
        Check the import
      </h2>
      <p className="mt-1 text-ink-soft">
        {`${good} of ${plural(rows.length, "row")} can be imported.`} Rows with a problem are left out; fix them in the file and upload it
        again.
      </p>
      <Form method="post" className="mt-3 space-y-4">
        <input type="hidden" name="intent" value="import" />
        <div className="overflow-x-auto rounded-2xl border border-ink/10" tabIndex={0} role="region" aria-label="Rows of the uploaded file">
          <table className="w-full border-collapse text-left">
            <caption className="sr-only">Rows of the uploaded file</caption>
            <thead>
              <tr className="border-b-2 border-ink/10">
                <th scope="col" className="px-3 py-2">Import</th>
                <th scope="col" className="px-3 py-2">Line</th>
                <th scope="col" className="px-3 py-2">Name</th>
                <th scope="col" className="px-3 py-2">E-mail</th>
                <th scope="col" className="px-3 py-2">Check</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((r) => {
                const ok = r.errors.length === 0;
                return (
                  <tr key={`${r.line}-${r.name}`} className={`border-b border-ink/5 ${ok ? "" : "bg-brick/5"}`}>
                    <td className="px-3 py-2">
                      <input
                        type="checkbox"
                        name="row"
                        value={JSON.stringify({ line: r.line, name: r.name, email: r.email })}
                        defaultChecked={ok}
                        disabled={!ok}
                        aria-label={`Import line ${r.line}: ${r.name || "no name"}`}
                        className="h-6 w-6"
                      />
                    </td>
                    <td className="px-3 py-2">{r.line}</td>
                    <td className="px-3 py-2">{r.name || <span className="text-ink-soft">(empty)</span>}</td>
                    <td className="px-3 py-2">{r.email || <span className="text-ink-soft">—</span>}</td>
                    <td className="px-3 py-2">
                      {ok ? (
                        <Badge tone="right">Ready</Badge>
                      ) : (
                        <ul className="text-brick">
                          {r.errors.map((e) => (
                            <li key={e.message}>
                              <span aria-hidden="true">✗ </span>
                              {e.message}
                            </li>
                          ))}
                        </ul>
                      )}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <Button type="submit" tone="teal" disabled={busy || good === 0} aria-describedby={good === 0 ? "why-no-import" : undefined}>
          <Icon name="check" className="h-5 w-5" />
          Import the ticked students
        </Button>
        {good === 0 ? <WhyDisabled id="why-no-import">No row can be imported yet: fix the rows with a problem in the file and upload it again.</WhyDisabled> : null}
      </Form>
    </Card>
  );
}
