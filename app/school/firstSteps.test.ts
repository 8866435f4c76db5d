import { describe, expect, it } from "vitest";
import { firstSteps, type SchoolCounts } from "./firstSteps";

const none: SchoolCounts = { classes: 0, students: 0, readingSets: 0, rounds: 0, assignments: 0 };
const done = (c: SchoolCounts, id: string | null) => firstSteps(c, id).map((s) => (s.done ? s.key : `-${s.key}`));

describe("first steps", () => {
  it.each<[string, SchoolCounts, string[]]>([
    ["a new studio", none, ["-class", "-students", "-set", "-round", "-assignment"]],
    ["a class", { ...none, classes: 1 }, ["class", "-students", "-set", "-round", "-assignment"]],
    ["a round without a saved set", { ...none, classes: 1, rounds: 1 }, ["class", "-students", "-set", "round", "-assignment"]],
    ["everything", { classes: 2, students: 9, readingSets: 1, rounds: 3, assignments: 1 }, ["class", "students", "set", "round", "assignment"]],
  ])("%s", (_, counts, expected) => {
    expect(done(counts, counts.classes ? "c1" : null)).toEqual(expected);
  });

  it("sends class steps to the first class, or to creating one with the reason", () => {
    const withClass = firstSteps({ ...none, classes: 1 }, "c1");
    expect(withClass.find((s) => s.key === "students")).toMatchObject({ to: "/teach/classes/c1", also: { to: "/teach/classes/c1/cards" }, waitsFor: undefined });
    expect(withClass.find((s) => s.key === "assignment")?.to).toBe("/teach/classes/c1/assignments/new");
    expect(withClass.find((s) => s.key === "round")?.to).toBe("/host?class=c1");
    const without = firstSteps(none, null);
    expect(without.find((s) => s.key === "assignment")).toMatchObject({ to: "/admin#create-class", waitsFor: "Create a class first." });
  });
});
