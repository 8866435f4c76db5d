import { data, Form, Link, redirect, useNavigation } from "react-router";
import { requireUserWithRole } from "~/auth/guards.server";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { classesFor } from "~/school/classes.server";
import { deleteStudent, studentInSchool } from "~/school/people.server";
import type { Route } from "./+types/student";
import { day } from "~/review/format";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.student.displayName ?? "Student"} · Fretcall` }];

async function load(request: Request, context: Route.LoaderArgs["context"], userId: string) {
  const admin = await requireUserWithRole(request, context, ["admin"]);
  const student = await studentInSchool(services(context).db, admin.orgId, userId);
  if (!student) throw data({ error: "No such student." }, { status: 404 });
  return { admin, student };
}

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const { admin, student } = await load(request, context, params.userId);
  // Seen as the student sees them: the classes they belong to.
  const classList = await classesFor(services(context).db, { ...student, orgId: admin.orgId, role: "student" });
  return {
    student: { id: student.id, displayName: student.displayName, email: student.email, createdAt: student.createdAt.toISOString() },
    classes: classList.map((c) => c.name),
  };
}

export async function action({ request, params, context }: Route.ActionArgs) {
  const { admin, student } = await load(request, context, params.userId);
  const typed = String((await request.formData()).get("confirmName") ?? "").trim();
  if (typed !== student.displayName) {
    return { error: `To delete, type the student's name exactly as shown: ${student.displayName}` };
  }
  await deleteStudent(services(context).db, admin.orgId, student.id);
  throw redirect("/admin?deleted=1");
}

export default function AdminStudent({ loaderData, actionData }: Route.ComponentProps) {
  const { student, classes } = loaderData;
  const busy = useNavigation().state !== "idle";
  return (
    <div className="mx-auto max-w-2xl space-y-6">
      <PageTitle lead={`Student since ${day(student.createdAt)}`}>{student.displayName}</PageTitle>
      <Card>
        <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-2">
          <dt className="font-medium">E-mail</dt>
          <dd>{student.email ?? "None (nickname only)"}</dd>
          <dt className="font-medium">Classes</dt>
          <dd>{classes.length ? classes.join(", ") : "None"}</dd>
        </dl>
        <a href={`/people/${student.id}/export.json`} download className="mt-4 inline-block underline">
          Download their data (JSON)
        </a>
      </Card>
      <Card>
        <h2 className="font-display text-2xl font-semibold">Delete this student's data</h2>
        <p className="mt-2">
          Removes the account, class places, invitations, practice and rhythm results, tokens and mail records for good.
          Past live rounds keep their figures for the class under the name “Removed student”, no longer linked to this
          student. This can't be undone.
        </p>
        <Form method="post" className="mt-4 space-y-4" noValidate>
          {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}
          <Field
            label={`Type “${student.displayName}” to confirm`}
            name="confirmName"
            autoComplete="off"
            required
          />
          <Button tone="brick" type="submit" disabled={busy}>
            ✗ Delete {student.displayName} for good
          </Button>
        </Form>
      </Card>
      <Link to="/admin" className="underline">Back to the school</Link>
    </div>
  );
}
