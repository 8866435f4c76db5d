import { describe, expect, it } from "vitest";
import { compareValues, filterRows, nextSort, paginate, sortRows, type Column } from "./dataTable";

interface Row {
  name: string;
  points: number | null;
  joined: Date;
}

const rows: Row[] = [
  { name: "Zoë K.", points: 40, joined: new Date("2024-03-01") },
  { name: "ada B.", points: null, joined: new Date("2024-01-15") },
  { name: "Bo T.", points: 9, joined: new Date("2024-02-10") },
  { name: "Cy 10", points: 40, joined: new Date("2024-01-01") },
  { name: "Cy 9", points: 100, joined: new Date("2024-05-01") },
];

const columns: Column<Row>[] = [
  { key: "name", header: "Name" },
  { key: "points", header: "Points" },
  { key: "joined", header: "Joined" },
  { key: "team", header: "Team", sortValue: (r) => (r.points !== null && r.points >= 40 ? "Brass" : "Teal") },
];

const names = (rs: Row[]) => rs.map((r) => r.name);

describe("sortRows", () => {
  it("sorts text ignoring case and with numbers in natural order", () => {
    expect(names(sortRows(rows, columns, { key: "name", direction: "asc" }))).toEqual([
      "ada B.",
      "Bo T.",
      "Cy 9",
      "Cy 10",
      "Zoë K.",
    ]);
  });

  it("sorts numbers numerically, keeps ties in their given order, and puts blanks last both ways", () => {
    expect(names(sortRows(rows, columns, { key: "points", direction: "asc" }))).toEqual([
      "Bo T.",
      "Zoë K.",
      "Cy 10",
      "Cy 9",
      "ada B.",
    ]);
    expect(names(sortRows(rows, columns, { key: "points", direction: "desc" }))).toEqual([
      "Cy 9",
      "Zoë K.",
      "Cy 10",
      "Bo T.",
      "ada B.",
    ]);
  });

  it("sorts dates by time and uses sortValue when given", () => {
    expect(names(sortRows(rows, columns, { key: "joined", direction: "asc" }))[0]).toBe("Cy 10");
    expect(names(sortRows(rows, columns, { key: "team", direction: "desc" })).slice(0, 2)).toEqual(["ada B.", "Bo T."]);
  });

  it("leaves the order alone without a sort or for an unknown column, and never mutates its input", () => {
    const copy = [...rows];
    expect(sortRows(rows, columns, null)).toEqual(rows);
    expect(sortRows(rows, columns, { key: "nope", direction: "asc" })).toEqual(rows);
    sortRows(rows, columns, { key: "name", direction: "desc" });
    expect(rows).toEqual(copy);
  });
});

describe("compareValues", () => {
  it("treats booleans as 0/1 and empty strings as blanks", () => {
    expect(compareValues(true, false, "asc")).toBeGreaterThan(0);
    expect(compareValues("", "a", "desc")).toBeGreaterThan(0);
  });
});

describe("filterRows", () => {
  it("matches every word, across columns, ignoring case and accents", () => {
    expect(names(filterRows(rows, columns, "zoe"))).toEqual(["Zoë K."]);
    expect(names(filterRows(rows, columns, "cy brass"))).toEqual(["Cy 10", "Cy 9"]);
    expect(names(filterRows(rows, columns, "2024-02"))).toEqual(["Bo T."]);
    expect(filterRows(rows, columns, "   ")).toHaveLength(5);
    expect(filterRows(rows, columns, "nobody")).toEqual([]);
  });
});

describe("paginate", () => {
  const many = Array.from({ length: 23 }, (_, i) => i);

  it("slices pages and reports 1-based positions", () => {
    expect(paginate(many, 3, 10)).toEqual({ rows: [20, 21, 22], page: 3, pageCount: 3, total: 23, first: 21, last: 23 });
  });

  it("clamps pages out of range and bad sizes", () => {
    expect(paginate(many, 99, 10).page).toBe(3);
    expect(paginate(many, -1, 10).page).toBe(1);
    expect(paginate(many, 1, 0).rows).toEqual([0]);
  });

  it("reports an empty table as one empty page", () => {
    expect(paginate([], 1, 10)).toEqual({ rows: [], page: 1, pageCount: 1, total: 0, first: 0, last: 0 });
  });
});

describe("nextSort", () => {
  it("starts a new column ascending and flips the same column", () => {
    expect(nextSort(null, "name")).toEqual({ key: "name", direction: "asc" });
    expect(nextSort({ key: "name", direction: "asc" }, "name")).toEqual({ key: "name", direction: "desc" });
    expect(nextSort({ key: "name", direction: "desc" }, "name")).toEqual({ key: "name", direction: "asc" });
    expect(nextSort({ key: "name", direction: "desc" }, "points")).toEqual({ key: "points", direction: "asc" });
  });
});
