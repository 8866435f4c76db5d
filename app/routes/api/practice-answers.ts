// POST /api/v1/practice/answers — a student's finished practice answers, in batches (see app/practice/answers.ts).
// GET  /api/v1/practice/answers[?student=<id>][&since=<ms>][&limit=<n>] — stored answers, newest first: your own,
//      or (teachers of the student's class, admins of their school) a student's.
import { requireStudentReader } from "~/auth/access.server";
import { requireUser } from "~/auth/guards.server";
import { services } from "~/context";
import { practiceRows, recordPracticeAnswers } from "~/practice/answers.server";
import { noStore, readJsonBody } from "~/lib/json.server";
import type { Route } from "./+types/practice-answers";

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUser(request, context);
  const { db } = services(context);
  const params = new URL(request.url).searchParams;
  if (!params.has("student") && user.role !== "student") {
    return Response.json({ error: "Name the student whose practice you want: ?student=<id>." }, { status: 400, headers: noStore });
  }
  const studentId = params.get("student") ?? user.id;
  await requireStudentReader(db, user, studentId);
  const number = (name: string) => {
    const text = params.get(name);
    return text === null ? undefined : /^\d{1,15}$/.test(text) ? Number(text) : NaN;
  };
  const since = number("since");
  const limit = number("limit");
  if (Number.isNaN(since) || Number.isNaN(limit)) {
    return Response.json({ error: "since (ms since 1970) and limit must be whole numbers." }, { status: 400, headers: noStore });
  }
  return Response.json({ student: studentId, answers: await practiceRows(db, studentId, { since, limit }) }, { headers: noStore });
}

export async function action({ request, context }: Route.ActionArgs) {
  if (request.method !== "POST") return Response.json({ error: "Use POST to send answers." }, { status: 405, headers: { Allow: "GET, POST" } });
  const user = await requireUser(request, context);
  if (user.role !== "student") {
    return Response.json({ error: "Practice answers are sent by the student who practised, from their own account.", problems: [] }, { status: 403, headers: noStore });
  }
  const body = await readJsonBody(request);
  if (!body.ok) return body.response;
  const result = await recordPracticeAnswers(services(context).db, user, body.value);
  return Response.json(result.body, { status: result.status, headers: noStore });
}
