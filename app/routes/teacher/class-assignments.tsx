// A class's assignments: who has done each one and who hasn't, and deleting one.
import { Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import { requireClassTeacher } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { Button, buttonClass, Card, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import { DueTime, ProgressBar, StatusBadge } from "~/practice/AssignmentParts";
import { classAssignmentsPath, MATERIAL_WORDS } from "~/practice/assignmentForm";
import { classAssignments, deleteAssignment } from "~/practice/assignments.server";
import { goalWords } from "~/practice/progress";
import type { Route } from "./+types/class-assignments";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Assignments${data ? ` · ${data.cls.name}` : ""} · Fretcall` }];

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const url = new URL(request.url);
  const mailed = url.searchParams.get("mailed");
  return {
    cls: { id: cls.id, name: cls.name },
    // E-mail addresses stay on the server: the page needs names only.
    assignments: (await classAssignments(db, cls.id)).map((a) => ({ ...a, students: a.students.map(({ email: _email, ...s }) => s) })),
    now: Date.now(),
    justSet: url.searchParams.has("set") ? { mailed: mailed === null ? 0 : Math.max(0, Number(mailed) || 0) } : null,
  };
}

const actionSchema = z.object({ intent: z.literal("delete"), id: z.string().min(1).max(64) });

export async function action({ request, params, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const parsed = parseForm(actionSchema, await request.formData());
  if (!parsed.ok) return { error: "That request wasn't understood. Reload the page and try again.", deleted: false };
  const deleted = await deleteAssignment(db, cls.id, parsed.data.id);
  return { error: deleted ? null : "That assignment doesn't exist any more.", deleted };
}

export default function ClassAssignments({ loaderData: { cls, assignments, now, justSet }, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  return (
    <div className="space-y-6">
      <PageTitle lead="Practice between lessons, with a goal and a due date. Progress counts the practice students do from the assignment's own link.">
        Assignments · {cls.name}
      </PageTitle>
      <div className="flex flex-wrap items-center gap-3">
        <Link to={`${classAssignmentsPath(cls.id)}/new`} className={buttonClass("teal")}>
          + Set an assignment
        </Link>
        <Link to="/teach" className="underline">
          Back to your classes
        </Link>
      </div>
      {justSet ? (
        <Notice tone="success">
          {justSet.mailed === 0
            ? "Assignment set. No notice was e-mailed (no targeted student has an e-mail address)."
            : `Assignment set. A notice was e-mailed to ${justSet.mailed} ${justSet.mailed === 1 ? "student" : "students"}.`}
        </Notice>
      ) : null}
      {actionData?.deleted ? <Notice tone="success">Assignment deleted. The practice students did for it is kept.</Notice> : null}
      {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}
      {assignments.length === 0 ? <Card>No assignments yet. Set one and every student you choose sees it on their home page.</Card> : null}
      {assignments.map((a) => (
        <Card key={a.id}>
          <article aria-labelledby={`assignment-${a.id}`}>
            <div className="flex flex-wrap items-start justify-between gap-3">
              <div>
                <h2 id={`assignment-${a.id}`} className="font-display text-2xl font-semibold">
                  {a.title}
                </h2>
                <p className="mt-1 text-ink-soft">
                  {a.material ? `${a.material.name} (${MATERIAL_WORDS[a.material.kind]})` : "The reading set was deleted"} · {goalWords(a.goal)}
                </p>
                <p className="mt-1">
                  {a.dueAt < now ? "Was due" : "Due"} <DueTime ms={a.dueAt} /> · {a.chosen ? "chosen students" : "whole class"} ·{" "}
                  <strong>{`${a.done} of ${a.students.length} done`}</strong>
                </p>
              </div>
              <Form
                method="post"
                onSubmit={(e) => {
                  if (!confirm(`Delete “${a.title}”? Students' practice is kept, but the assignment and its progress view go.`)) e.preventDefault();
                }}
              >
                <input type="hidden" name="intent" value="delete" />
                <input type="hidden" name="id" value={a.id} />
                <Button type="submit" tone="ghost" disabled={busy} aria-label={`Delete ${a.title}`}>
                  <span aria-hidden="true">✗</span> Delete
                </Button>
              </Form>
            </div>
            {a.students.length === 0 ? (
              <p className="mt-3 text-ink-soft">No students in this class are targeted.</p>
            ) : (
              <table className="mt-4 w-full text-left">
                <caption className="sr-only">Progress per student on {a.title}</caption>
                <thead>
                  <tr className="border-b border-ink/10 text-sm text-ink-soft">
                    <th scope="col" className="py-2 pr-3 font-medium">
                      Student
                    </th>
                    <th scope="col" className="py-2 pr-3 font-medium">
                      Status
                    </th>
                    <th scope="col" className="w-full py-2 font-medium">
                      Progress
                    </th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-ink/10">
                  {a.students.map((s) => (
                    <tr key={s.userId} data-student={s.displayName}>
                      <th scope="row" className="whitespace-nowrap py-2 pr-3 font-medium">
                        {s.displayName}
                      </th>
                      <td className="py-2 pr-3">
                        <StatusBadge status={s.status} late={s.late} />
                      </td>
                      <td className="py-2">
                        <ProgressBar goal={a.goal} progress={s.progress} status={s.status} label={`${s.displayName} on ${a.title}`} />
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </article>
        </Card>
      ))}
    </div>
  );
}
