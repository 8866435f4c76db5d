import { describe, expect, it } from "vitest";
import { assignmentFormSchema, defaultDue, dueAtFrom } from "./assignmentForm";

const NOW = Date.UTC(2026, 11, 1, 12, 0);
const valid = { material: "preset:ready-naturals-5", audience: "class", students: "", goalNotes: "40", goalAccuracy: "90", goalSeconds: "2", due: "2026-12-08T18:00", tzOffset: "0" };
const parse = (over: Record<string, string> = {}) => assignmentFormSchema(NOW).safeParse({ ...valid, ...over });

describe("the assignment form", () => {
  it("reads a datetime-local value in the browser's time zone", () => {
    expect(dueAtFrom("2026-12-08T18:00", 0)).toBe(Date.UTC(2026, 11, 8, 18, 0));
    // Central European time is UTC+1, so getTimezoneOffset() = −60: 18:00 there is 17:00 UTC.
    expect(dueAtFrom("2026-12-08T18:00", -60)).toBe(Date.UTC(2026, 11, 8, 17, 0));
    // New York in December is UTC−5 (offset +300): 18:00 there is 23:00 UTC.
    expect(dueAtFrom("2026-12-08T18:00", 300)).toBe(Date.UTC(2026, 11, 8, 23, 0));
    expect(dueAtFrom("2026-04-31T18:00", 0)).toBeUndefined(); // April has 30 days
    expect(dueAtFrom("2026-12-08T24:00", 0)).toBeUndefined();
    expect(dueAtFrom("next tuesday", 0)).toBeUndefined();
  });

  it("turns a good form into a goal in milliseconds, a material and no targets for the whole class", () => {
    const r = parse({ students: "a,b" });
    expect(r.success && r.data).toEqual({
      title: "",
      material: { kind: "preset", id: "ready-naturals-5" },
      students: [],
      goal: { notes: 40, accuracyPct: 90, medianMs: 2000, playedOnly: false },
      dueAt: Date.UTC(2026, 11, 8, 18, 0),
    });
    // The "Ask for played answers" checkbox: sent as "on" only when ticked.
    expect(parse({ playedOnly: "on" }).data?.goal.playedOnly).toBe(true);
    // Chosen students, each once; an empty time goal is no time goal; 1.5 s = 1500 ms.
    const chosen = parse({ audience: "chosen", students: "a,b,a", goalSeconds: "" });
    expect(chosen.success && chosen.data).toMatchObject({ students: ["a", "b"], goal: { medianMs: null } });
    expect(parse({ goalSeconds: "1.5" }).data?.goal.medianMs).toBe(1500);
  });

  it.each([
    [{ due: "2026-12-01T11:59" }, "due", "The due date has to be in the future."],
    [{ due: "2026-12-01T12:00" }, "due", "The due date has to be in the future."], // now itself is not ahead
    [{ due: "2028-01-01T00:00" }, "due", "The due date is more than a year away. Check the year."],
    [{ material: "a reading set" }, "material", "Choose what to practise: a reading set, a ready-made set or a tune."],
    [{ goalAccuracy: "89.5" }, "goalAccuracy", "Percent correct: a whole number from 50 to 100."],
    [{ goalNotes: "501" }, "goalNotes", "Notes: a whole number from 5 to 500."],
    [{ goalSeconds: "31" }, "goalSeconds", "Median time: at most 30 s, or leave it empty."],
    [{ audience: "everyone" }, "audience", "Choose the whole class or chosen students."],
    [{ title: "x".repeat(81) }, "title", "Keep the title under 80 characters."],
  ])("refuses %o on %s", (over, field, message) => {
    const r = parse(over);
    expect(r.success).toBe(false);
    expect(r.error?.issues.find((i) => i.path[0] === field)?.message).toBe(message);
  });

  it("suggests a week ahead at 18:00", () => {
    expect(defaultDue(NOW)).toBe("2026-12-08T18:00");
  });
});
