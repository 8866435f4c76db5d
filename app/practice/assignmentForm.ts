// The teacher's "set an assignment" form, checked with zod, and the words and paths shared by pages and mails. Whether the chosen material and students
// exist in the class is the server's check (assignments.server.ts); this is everything the form alone can tell.
import { z } from "zod";

export const GOAL_NOTES_RANGE = [5, 500] as const;
export const GOAL_ACCURACY_RANGE = [50, 100] as const;
export const GOAL_SECONDS_RANGE = [0.5, 30] as const;
/** A due date further off than this is almost certainly a typo in the year. */
export const MAX_DUE_DAYS = 366;
export const DEFAULT_GOAL = { notes: 40, accuracyPct: 90, seconds: 2 } as const;

export type MaterialKind = "set" | "preset" | "tune";
export interface MaterialRef {
  kind: MaterialKind;
  id: string;
}

/** Material choices travel as "set:<id>", "preset:<id>" or "tune:<id>". */
export const materialValue = (m: MaterialRef) => `${m.kind}:${m.id}`;
export const MATERIAL_WORDS: Record<MaterialKind, string> = { set: "reading set", preset: "ready-made reading set", tune: "tune" };

/** The practice page for an assignment: the contract with /me/practice, which reads `assignment`. */
export const practicePath = (assignmentId: string) => `/me/practice?assignment=${encodeURIComponent(assignmentId)}`;
export const classAssignmentsPath = (classId: string) => `/teach/classes/${encodeURIComponent(classId)}/assignments`;

const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

const wholeNumber = (what: string, [min, max]: readonly [number, number]) => {
  const message = `${what}: a whole number from ${min} to ${max}.`;
  return z.coerce.number(message).int(message).min(min, message).max(max, message);
};

/** "2026-12-08T18:00" from a datetime-local field, read in the browser's time zone (offset as getTimezoneOffset gives it). */
export function dueAtFrom(local: string, tzOffsetMinutes: number): number | undefined {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(local);
  if (!m) return undefined;
  const [y, mo, d, h, mi] = m.slice(1).map(Number) as [number, number, number, number, number];
  const utc = Date.UTC(y, mo - 1, d, h, mi);
  const back = new Date(utc);
  // Date.UTC rolls 31 April over into May; a date that doesn't survive the round trip doesn't exist.
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d || h > 23 || mi > 59) return undefined;
  return utc + tzOffsetMinutes * 60_000;
}

/** Checks the form against `now`: the due time must lie ahead. Students arrive joined as "id,id" (see collectStudents). */
export function assignmentFormSchema(now: number) {
  return z
    .object({
      title: z.string().trim().max(80, "Keep the title under 80 characters.").default(""),
      material: z
        .string("Choose what to practise: a reading set, a ready-made set or a tune.")
        .regex(/^(set|preset|tune):[\w-]{1,64}$/, "Choose what to practise: a reading set, a ready-made set or a tune."),
      audience: z.enum(["class", "chosen"], "Choose the whole class or chosen students."),
      students: z.preprocess(
        (v) => (typeof v === "string" && v !== "" ? v.split(",") : []),
        z.array(z.string().min(1).max(64)).max(200, "At most 200 students."),
      ),
      goalNotes: wholeNumber("Notes", GOAL_NOTES_RANGE),
      goalAccuracy: wholeNumber("Percent correct", GOAL_ACCURACY_RANGE),
      goalSeconds: z.preprocess(
        blankToUndefined,
        z.coerce
          .number("Median time: seconds, such as 2 or 1.5, or leave it empty for no time goal.")
          .min(GOAL_SECONDS_RANGE[0], `Median time: at least ${GOAL_SECONDS_RANGE[0]} s, or leave it empty.`)
          .max(GOAL_SECONDS_RANGE[1], `Median time: at most ${GOAL_SECONDS_RANGE[1]} s, or leave it empty.`)
          .optional(),
      ),
      // A checkbox: sent as "on" when ticked, absent otherwise.
      playedOnly: z.preprocess((v) => v === "on" || v === "true", z.boolean()),
      due: z.string("Choose a due date and time.").regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/, "Choose a due date and time."),
      tzOffset: z.preprocess((v) => blankToUndefined(v) ?? 0, z.coerce.number().int().min(-840).max(840)),
    })
    .superRefine((f, ctx) => {
      if (f.audience === "chosen" && f.students.length === 0) {
        ctx.addIssue({ code: "custom", path: ["students"], message: "Choose at least one student, or set it for the whole class." });
      }
      const dueAt = dueAtFrom(f.due, f.tzOffset);
      if (dueAt === undefined) ctx.addIssue({ code: "custom", path: ["due"], message: "That date doesn't exist. Choose a due date and time." });
      else if (dueAt <= now) ctx.addIssue({ code: "custom", path: ["due"], message: "The due date has to be in the future." });
      else if (dueAt > now + MAX_DUE_DAYS * 86_400_000) ctx.addIssue({ code: "custom", path: ["due"], message: "The due date is more than a year away. Check the year." });
    })
    .transform((f) => {
      const [kind, id] = f.material.split(":") as [MaterialKind, string];
      return {
        title: f.title,
        material: { kind, id } satisfies MaterialRef,
        students: f.audience === "chosen" ? [...new Set(f.students)] : [],
        goal: {
          notes: f.goalNotes,
          accuracyPct: f.goalAccuracy,
          medianMs: f.goalSeconds === undefined ? null : Math.round(f.goalSeconds * 1000),
          playedOnly: f.playedOnly,
        },
        dueAt: dueAtFrom(f.due, f.tzOffset)!,
      };
    });
}

/** Checkboxes named "students" come as several values; parseForm keeps one per name, so join them first. */
export function collectStudents(form: FormData): FormData {
  form.set("students", form.getAll("students").join(","));
  return form;
}

/** A datetime-local value for a week from now at 18:00, the teacher's sensible default. */
export function defaultDue(now: number): string {
  const day = new Date(now + 7 * 86_400_000).toISOString().slice(0, 10);
  return `${day}T18:00`;
}
