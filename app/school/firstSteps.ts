// A new studio's first steps, ticked from what the school already has (never from a "done" flag someone must remember to set).

export interface SchoolCounts {
  classes: number;
  students: number;
  readingSets: number;
  rounds: number;
  assignments: number;
}

export interface FirstStep {
  key: "class" | "students" | "set" | "round" | "assignment";
  label: string;
  done: boolean;
  /** Where the step is done. */
  to: string;
  /** A second way to do it, such as printing sign-in cards instead of adding e-mails. */
  also?: { to: string; label: string };
  /** Why it has to wait, when an earlier step is missing. */
  waitsFor?: string;
}

export const CREATE_CLASS_LINK = "/admin#create-class";

/** The five steps in order; `firstClassId` is where class steps point (the school's first class, if any). */
export function firstSteps(c: SchoolCounts, firstClassId: string | null): FirstStep[] {
  const cls = firstClassId ? `/teach/classes/${firstClassId}` : null;
  const needsClass = cls ? undefined : "Create a class first.";
  return [
    { key: "class", label: "Create a class", done: c.classes > 0, to: CREATE_CLASS_LINK },
    {
      key: "students",
      label: "Add students or print sign-in cards",
      done: c.students > 0,
      to: cls ?? CREATE_CLASS_LINK,
      also: cls ? { to: `${cls}/cards`, label: "Sign-in cards" } : undefined,
      waitsFor: needsClass,
    },
    { key: "set", label: "Choose a reading set", done: c.readingSets > 0, to: "/teach/sets" },
    { key: "round", label: "Host a first round", done: c.rounds > 0, to: firstClassId ? `/host?class=${firstClassId}` : "/host" },
    { key: "assignment", label: "Set an assignment", done: c.assignments > 0, to: cls ? `${cls}/assignments/new` : CREATE_CLASS_LINK, waitsFor: needsClass },
  ];
}
