import { Form, Link, useNavigation, useSearchParams } from "react-router";
import { z } from "zod";
import { requireUserWithRole } from "~/auth/guards.server";
import { email, NAME_MAX } from "~/auth/schemas";
import { retryAfterHeaders, take, tooMany, type TooMany } from "~/auth/rate-limit.server";
import { normaliseEmail } from "~/auth/users.server";
import { DataTable, type Column } from "~/components/DataTable";
import { useSchoolNaming } from "~/components/NoteNaming";
import { Badge, Button, Card, Field, Notice, PageTitle, SelectField, WhyDisabled } from "~/components/ui";
import { services } from "~/context";
import { parseForm } from "~/lib/forms";
import { nameField } from "~/lib/names";
import { NOTE_NAMING_LABELS, NOTE_NAMINGS } from "~/music/naming";
import { classesFor } from "~/school/classes.server";
import { addressInUseMail, createInvitation, mailInvitations } from "~/school/invitations.server";
import {
  addTeacher,
  classInSchool,
  createClass,
  emailInSchool,
  lastInvitedClass,
  renameClass,
  schoolOverview,
  setTeacher,
  teacherInSchool,
} from "~/school/people.server";
import { setSchoolNaming } from "~/school/naming.server";
import type { Route } from "./+types/school";
import { plural } from "~/lib/plural";
import { FirstSteps } from "~/components/FirstSteps";
import { schoolFirstSteps } from "~/school/firstSteps.server";

export const meta: Route.MetaFunction = () => [{ title: "School · Fretcall" }];

export const headers: Route.HeadersFunction = retryAfterHeaders;

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["admin"]);
  const { db } = services(context);
  const [classList, overview, steps] = await Promise.all([classesFor(db, user), schoolOverview(db, user.orgId), schoolFirstSteps(db, user.orgId)]);
  return {
    adminId: user.id,
    steps,
    classes: classList.map((c) => ({ ...c, joinCode: overview.joinCodes[c.id] ?? "" })),
    teaching: overview.teaching,
    teachers: overview.people.filter((p) => p.role !== "student"),
    students: overview.people.filter((p) => p.role === "student"),
  };
}

const className = nameField("the class's name", NAME_MAX);
const id = z.string().min(1).max(40);

const actionSchema = z.discriminatedUnion("intent", [
  z.object({
    intent: z.literal("addTeacher"),
    displayName: nameField("the teacher's name", NAME_MAX),
    email,
    classId: z.string().min(1, "Choose their first class (create one first if there is none)."),
  }),
  z.object({ intent: z.literal("resendTeacher"), userId: id }),
  z.object({ intent: z.literal("createClass"), name: className, teacherId: z.string().max(40).default("") }),
  z.object({ intent: z.literal("renameClass"), classId: id, name: className }),
  z.object({ intent: z.enum(["assign", "unassign"]), classId: id, teacherId: z.string().min(1, "Choose a teacher.").max(40) }),
  z.object({ intent: z.literal("setNaming"), naming: z.enum(NOTE_NAMINGS, "Choose one of the three namings.") }),
]);

type ActionResult = { notice?: string; errors: Partial<Record<string, string>>; intent?: string };

export async function action({ request, context }: Route.ActionArgs): Promise<ActionResult | TooMany<ActionResult>> {
  const admin = await requireUserWithRole(request, context, ["admin"]);
  const { db, mailer, mailQueue, env, limits } = services(context);
  const form = await request.formData();
  const parsed = parseForm(actionSchema, form);
  const intent = String(form.get("intent") ?? "");
  if (!parsed.ok) return { errors: parsed.errors, intent };
  const input = parsed.data;
  // Invitations go out after the answer (app/mail/queue.server.ts); a failed one can be resent.
  const invite = (to: { email: string; displayName: string; token: string }, className: string) =>
    mailQueue.later(() => mailInvitations(mailer, env.PUBLIC_URL, [to], "teacher", className, admin.orgId));
  if (input.intent === "addTeacher" || input.intent === "resendTeacher") {
    const refused = await take(limits.invitations, admin.id);
    if (refused) return tooMany(refused, { errors: { form: refused.message }, intent });
  }

  switch (input.intent) {
    case "setNaming":
      await setSchoolNaming(db, admin.orgId, input.naming);
      return { notice: `Notes are now named ${NOTE_NAMING_LABELS[input.naming].replace(":", " —")}.`, errors: {}, intent };
    case "addTeacher": {
      const cls = await classInSchool(db, admin.orgId, input.classId);
      if (!cls) return { errors: { classId: "Choose one of the school's classes." }, intent };
      const address = normaliseEmail(input.email);
      // Only the school's own people are named; an account elsewhere gets the same answer as a new address.
      if (await emailInSchool(db, admin.orgId, address)) return { errors: { email: "Someone in your school already has this e-mail." }, intent };
      const { token } = await addTeacher(db, admin.orgId, { displayName: input.displayName, email: address, classId: cls.id }, admin.id);
      const to = { email: address, displayName: input.displayName };
      if (token) invite({ ...to, token }, cls.name);
      else mailQueue.send(addressInUseMail(env.PUBLIC_URL, to, "teacher", cls.name));
      return { notice: `Added ${input.displayName} to ${cls.name}; an invitation to set a password is on its way to ${address}.`, errors: {}, intent };
    }
    case "resendTeacher": {
      const teacher = await teacherInSchool(db, admin.orgId, input.userId);
      const last = teacher && !teacher.passwordHash && teacher.email ? await lastInvitedClass(db, teacher.id) : undefined;
      if (!teacher?.email || !last) return { errors: { form: "Only a teacher who hasn't set a password yet can be sent a new invitation." }, intent };
      const token = await createInvitation(db, { userId: teacher.id, classId: last.classId, invitedBy: admin.id });
      invite({ email: teacher.email, displayName: teacher.displayName, token }, last.className);
      return { notice: `A new invitation is on its way to ${teacher.email}; the previous link no longer works.`, errors: {}, intent };
    }
    case "createClass": {
      if (input.teacherId && !(await teacherInSchool(db, admin.orgId, input.teacherId))) {
        return { errors: { teacherId: "Choose one of the school's teachers." }, intent };
      }
      const { joinCode } = await createClass(db, admin.orgId, input.name, input.teacherId || undefined);
      return { notice: `Created ${input.name}. Its join code is ${joinCode}.`, errors: {}, intent };
    }
    case "renameClass": {
      if (!(await classInSchool(db, admin.orgId, input.classId))) return { errors: { form: "No such class." }, intent };
      await renameClass(db, input.classId, input.name);
      return { notice: `Renamed to ${input.name}.`, errors: {}, intent };
    }
    case "assign":
    case "unassign": {
      const [cls, teacher] = await Promise.all([
        classInSchool(db, admin.orgId, input.classId),
        teacherInSchool(db, admin.orgId, input.teacherId),
      ]);
      if (!cls || !teacher) return { errors: { teacherId: "Choose one of the school's teachers and classes." }, intent };
      await setTeacher(db, cls.id, teacher.id, input.intent === "assign");
      return {
        notice: input.intent === "assign" ? `${teacher.displayName} now teaches ${cls.name}.` : `${teacher.displayName} no longer teaches ${cls.name}.`,
        errors: {},
        intent,
      };
    }
  }
}

type LoaderData = Route.ComponentProps["loaderData"];
type ClassRow = LoaderData["classes"][number];
type Person = LoaderData["students"][number];

export default function School({ loaderData, actionData }: Route.ComponentProps) {
  const { classes, teachers, students, teaching, steps, adminId } = loaderData;
  const busy = useNavigation().state !== "idle";
  const [params] = useSearchParams();
  const errorsFor = (intent: string) => (actionData?.intent === intent ? actionData.errors : {});
  const teacherOptions = teachers.map((t) => ({ value: t.id, label: t.displayName }));
  const classOptions = classes.map((c) => ({ value: c.id, label: c.name }));
  const naming = useSchoolNaming();

  const classColumns: Column<ClassRow>[] = [
    { key: "name", header: "Class", cell: (c) => <Link to={`/teach/classes/${c.id}`} className="underline">{c.name}</Link>, sortValue: (c) => c.name },
    { key: "joinCode", header: "Join code", cell: (c) => <span className="font-mono tracking-widest">{c.joinCode}</span> },
    { key: "students", header: "Students", align: "right" },
    { key: "teachers", header: "Teachers", cell: (c) => c.teachers || <Badge tone="miss">No teacher yet</Badge> },
    {
      key: "manage",
      header: "Manage",
      sortable: false,
      cell: (c) => <ClassManager cls={c} teachers={teacherOptions} teaching={teaching} busy={busy} errors={errorsFor("renameClass")} />,
    },
  ];
  const studentColumns: Column<Person>[] = [
    { key: "displayName", header: "Student", cell: (s) => <Link to={`/admin/students/${s.id}`} className="underline">{s.displayName}</Link>, sortValue: (s) => s.displayName },
    { key: "classNames", header: "Classes" },
    { key: "email", header: "Sign-in", sortValue: (s) => (s.email ? (s.hasPassword ? "b" : "c") : "a"), cell: signInBadge },
  ];
  const teacherColumns: Column<Person>[] = [
    { key: "displayName", header: "Name" },
    { key: "role", header: "Role" },
    { key: "classNames", header: "Classes" },
    {
      key: "status",
      header: "Sign-in",
      sortable: false,
      cell: (t) =>
        t.hasPassword ? (
          <Badge tone="right">Can sign in</Badge>
        ) : (
          <Form method="post" className="flex flex-wrap items-center gap-2">
            <Badge tone="info">Invited</Badge>
            <input type="hidden" name="intent" value="resendTeacher" />
            <input type="hidden" name="userId" value={t.id} />
            <button type="submit" disabled={busy} className="min-h-11 underline">Resend invitation</button>
          </Form>
        ),
    },
  ];

  return (
    <div className="space-y-6">
      <PageTitle lead={`${plural(classes.length, "class", "classes")} · ${plural(teachers.length, "teacher or admin", "teachers and admins")} · ${plural(students.length, "student")}`}>Your school</PageTitle>
      <FirstSteps steps={steps} />
      {params.get("deleted") ? <Notice tone="success">The student and all their data were deleted.</Notice> : null}
      {actionData?.notice ? <Notice tone="success">{actionData.notice}</Notice> : null}
      {actionData?.errors.form ? <Notice tone="error">{actionData.errors.form}</Notice> : null}

      <Card>
        <h2 className="mb-3 font-display text-2xl font-semibold">Classes</h2>
        <DataTable caption="Classes" rows={classes} columns={classColumns} rowKey={(c) => c.id} filterPlaceholder="Filter classes" empty="No classes yet. Create the first one below." />
      </Card>

      <div className="grid gap-6 lg:grid-cols-2">
        <Card>
          <h2 id="create-class" className="font-display text-2xl font-semibold">Create a class</h2>
          <Form method="post" className="mt-3 space-y-4" noValidate>
            <input type="hidden" name="intent" value="createClass" />
            <Field label="Class name" name="name" id="create-class-name" error={errorsFor("createClass").name} required />
            <SelectField label="Teacher" name="teacherId" id="create-class-teacher" options={[{ value: "", label: "None yet" }, ...teacherOptions]} defaultValue={adminId} hint="You can teach it yourself." error={errorsFor("createClass").teacherId} />
            <Button type="submit" disabled={busy}>Create class</Button>
          </Form>
        </Card>
        <Card>
          <h2 className="font-display text-2xl font-semibold">Add a teacher</h2>
          <Form method="post" className="mt-3 space-y-4" noValidate>
            <input type="hidden" name="intent" value="addTeacher" />
            <Field label="Name" name="displayName" id="teacher-name" error={errorsFor("addTeacher").displayName} required />
            <Field label="E-mail" name="email" id="teacher-email" type="email" hint="They get an e-mailed link to set a password (valid 7 days)." error={errorsFor("addTeacher").email} required />
            <SelectField label="First class" name="classId" id="teacher-class" options={classOptions} error={errorsFor("addTeacher").classId} />
            <Button type="submit" disabled={busy || classes.length === 0} aria-describedby={classes.length === 0 ? "why-no-teacher" : undefined}>Add and invite</Button>
            {classes.length === 0 ? <WhyDisabled id="why-no-teacher">Create a class first: a new teacher joins with their first class.</WhyDisabled> : null}
          </Form>
        </Card>
      </div>

      <Card>
        <h2 className="font-display text-2xl font-semibold">Note names</h2>
        <Form method="post" className="mt-3 flex flex-wrap items-end gap-4" noValidate>
          <input type="hidden" name="intent" value="setNaming" />
          <SelectField
            label="How Fretcall names notes in words"
            name="naming"
            id="school-naming"
            key={naming}
            defaultValue={naming}
            options={NOTE_NAMINGS.map((n) => ({ value: n, label: NOTE_NAMING_LABELS[n] }))}
            hint="On reveals, feedback, reviews, the explorer and e-mails. Each student may pick another on their own device."
            error={errorsFor("setNaming").naming}
          />
          <Button type="submit" disabled={busy}>Save</Button>
        </Form>
      </Card>

      <Card>
        <h2 className="mb-3 font-display text-2xl font-semibold">Teachers and admins</h2>
        <DataTable caption="Teachers and admins" rows={teachers} columns={teacherColumns} rowKey={(t) => t.id} filterPlaceholder="Filter teachers" />
      </Card>

      <Card>
        <h2 className="mb-1 font-display text-2xl font-semibold">Students</h2>
        <p className="mb-3 text-ink-soft">Open a student to download or delete their data.</p>
        <DataTable caption="Students" rows={students} columns={studentColumns} rowKey={(s) => s.id} filterPlaceholder="Filter students" pageSize={25} empty="No students yet." />
      </Card>
    </div>
  );
}

function signInBadge(s: Person) {
  if (!s.email) return <Badge tone="neutral">Nickname only</Badge>;
  return s.hasPassword ? <Badge tone="right">Can sign in</Badge> : <Badge tone="info">Invited</Badge>;
}

/** Rename a class and choose who teaches it, folded away so the table stays readable. */
function ClassManager({
  cls,
  teachers,
  teaching,
  busy,
  errors,
}: {
  cls: ClassRow;
  teachers: { value: string; label: string }[];
  teaching: { classId: string; userId: string }[];
  busy: boolean;
  errors: Partial<Record<string, string>>;
}) {
  const current = new Set(teaching.filter((t) => t.classId === cls.id).map((t) => t.userId));
  return (
    <details>
      <summary className="min-h-11 cursor-pointer py-2 underline">Rename or assign…</summary>
      <div className="mt-2 w-72 space-y-3">
        <Form method="post" className="flex items-end gap-2" noValidate>
          <input type="hidden" name="intent" value="renameClass" />
          <input type="hidden" name="classId" value={cls.id} />
          <div className="flex-1">
            <Field label="New name" name="name" id={`rename-${cls.id}`} defaultValue={cls.name} error={errors.name} />
          </div>
          <Button type="submit" tone="ghost" disabled={busy}>Rename</Button>
        </Form>
        <ul className="space-y-1">
          {teachers.map((t) => (
            <li key={t.value}>
              <Form method="post" className="flex items-center justify-between gap-2">
                <input type="hidden" name="classId" value={cls.id} />
                <input type="hidden" name="teacherId" value={t.value} />
                <span>
                  {current.has(t.value) ? <span aria-hidden="true">✓ </span> : null}
                  {t.label}
                  {current.has(t.value) ? <span className="sr-only"> (teaches this class)</span> : null}
                </span>
                <button type="submit" name="intent" value={current.has(t.value) ? "unassign" : "assign"} disabled={busy} className="min-h-11 underline">
                  {current.has(t.value) ? "Unassign" : "Assign"}
                </button>
              </Form>
            </li>
          ))}
        </ul>
      </div>
    </details>
  );
}
