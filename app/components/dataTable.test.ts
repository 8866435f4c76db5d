import { createTable, type TableState } from "@tanstack/react-table";
import { describe, expect, it } from "vitest";
import { clientTableOptions, columnDefs, nextSort, pageWindow, readTableQuery, tableHref, toSorting, type Column, type SortState } from "./dataTable";

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
  { key: "actions", header: "", sortable: false, sortValue: () => null },
];

/** The table DataTable drives, outside React: the same options, with the state given. */
function tableOf<T>(data: readonly T[], cols: readonly Column<T>[], state: { sort?: SortState | null; query?: string; page?: number; size?: number } = {}) {
  const table = createTable({ ...clientTableOptions(data, columnDefs(cols)), state: {}, onStateChange: () => {}, renderFallbackValue: null });
  const full: TableState = {
    ...table.initialState,
    sorting: toSorting(state.sort ?? null),
    globalFilter: state.query ?? "",
    pagination: { pageIndex: (state.page ?? 1) - 1, pageSize: state.size ?? 100 },
  };
  table.setOptions((prev) => ({ ...prev, state: full }));
  return table;
}

const names = (state: Parameters<typeof tableOf>[2]) =>
  tableOf(rows, columns, state)
    .getRowModel()
    .rows.map((r) => r.original.name);

describe("sorting", () => {
  it("sorts text ignoring case and with numbers in natural order", () => {
    expect(names({ sort: { key: "name", direction: "asc" } })).toEqual(["ada B.", "Bo T.", "Cy 9", "Cy 10", "Zoë K."]);
  });

  it("sorts numbers numerically, keeps ties in their given order, and puts blanks last both ways", () => {
    expect(names({ sort: { key: "points", direction: "asc" } })).toEqual(["Bo T.", "Zoë K.", "Cy 10", "Cy 9", "ada B."]);
    expect(names({ sort: { key: "points", direction: "desc" } })).toEqual(["Cy 9", "Zoë K.", "Cy 10", "Bo T.", "ada B."]);
  });

  it("sorts dates by time and uses sortValue when given", () => {
    expect(names({ sort: { key: "joined", direction: "asc" } })[0]).toBe("Cy 10");
    expect(names({ sort: { key: "team", direction: "desc" } }).slice(0, 2)).toEqual(["ada B.", "Bo T."]);
  });

  it("leaves the order alone without a sort, and never mutates its input", () => {
    const copy = [...rows];
    expect(names({})).toEqual(rows.map((r) => r.name));
    names({ sort: { key: "name", direction: "desc" } });
    expect(rows).toEqual(copy);
  });

  it("starts a new column ascending, flips the same column and never falls back to unsorted", () => {
    const table = tableOf(rows, columns, { sort: { key: "name", direction: "asc" } });
    let sorting = table.getState().sorting;
    table.setOptions((prev) => ({ ...prev, onSortingChange: (u) => (sorting = typeof u === "function" ? u(sorting) : u) }));
    table.getColumn("name")!.toggleSorting();
    expect(sorting).toEqual([{ id: "name", desc: true }]);
    table.setOptions((prev) => ({ ...prev, state: { ...prev.state, sorting } }));
    table.getColumn("name")!.toggleSorting();
    expect(sorting).toEqual([{ id: "name", desc: false }]);
    // Numbers too start ascending (the library's own default starts them descending).
    expect(table.getColumn("points")!.getFirstSortDir()).toBe("asc");
    expect(table.getColumn("actions")!.getCanSort()).toBe(false);
  });

  it("treats booleans as 0/1 and empty strings as blanks", () => {
    const flags = [{ name: "a", on: true, note: "" }, { name: "b", on: false, note: "x" }];
    const cols: Column<(typeof flags)[number]>[] = [{ key: "name", header: "Name" }, { key: "on", header: "On" }, { key: "note", header: "Note" }];
    const order = (sort: SortState) => tableOf(flags, cols, { sort }).getRowModel().rows.map((r) => r.original.name);
    expect(order({ key: "on", direction: "asc" })).toEqual(["b", "a"]);
    expect(order({ key: "note", direction: "desc" })).toEqual(["b", "a"]);
    expect(order({ key: "note", direction: "asc" })).toEqual(["b", "a"]);
  });
});

describe("filtering", () => {
  it("matches every word, across columns, ignoring case and accents", () => {
    expect(names({ query: "zoe" })).toEqual(["Zoë K."]);
    expect(names({ query: "cy brass" })).toEqual(["Cy 10", "Cy 9"]);
    expect(names({ query: "2024-02" })).toEqual(["Bo T."]);
    expect(names({ query: "   " })).toHaveLength(5);
    expect(names({ query: "nobody" })).toEqual([]);
  });

  it("filters before sorting and paging", () => {
    const table = tableOf(rows, columns, { query: "cy", sort: { key: "points", direction: "desc" }, size: 1, page: 2 });
    expect(table.getPrePaginationRowModel().rows).toHaveLength(2);
    expect(table.getRowModel().rows.map((r) => r.original.name)).toEqual(["Cy 10"]);
  });
});

describe("paging", () => {
  const many = Array.from({ length: 23 }, (_, i) => ({ n: i }));
  const cols: Column<{ n: number }>[] = [{ key: "n", header: "N" }];

  it("slices pages", () => {
    expect(tableOf(many, cols, { page: 3, size: 10 }).getRowModel().rows.map((r) => r.original.n)).toEqual([20, 21, 22]);
    expect(tableOf(many, cols, { page: 3, size: 10 }).getPageCount()).toBe(3);
  });

  it("reports 1-based positions and clamps pages out of range and bad sizes", () => {
    expect(pageWindow(23, 3, 10)).toEqual({ page: 3, pageCount: 3, total: 23, first: 21, last: 23 });
    expect(pageWindow(23, 99, 10).page).toBe(3);
    expect(pageWindow(23, -1, 10).page).toBe(1);
    expect(pageWindow(23, 1, 0).last).toBe(1);
  });

  it("reports an empty table as one empty page", () => {
    expect(pageWindow(0, 1, 10)).toEqual({ page: 1, pageCount: 1, total: 0, first: 0, last: 0 });
  });
});

describe("tables paged on the server", () => {
  const keys = ["startedAt", "title", "answers"];
  const fallback: SortState = { key: "startedAt", direction: "desc" };
  const read = (search: string) => readTableQuery(new URLSearchParams(search), keys, fallback);

  it("reads sort, page, size and filter from the URL", () => {
    expect(read("sort=title&dir=asc&page=3&size=25&q=%20warm%20up%20")).toEqual({ sort: { key: "title", direction: "asc" }, page: 3, size: 25, q: "warm up" });
    expect(read("sort=answers&dir=desc")).toMatchObject({ sort: { key: "answers", direction: "desc" }, page: 1, size: 10 });
  });

  it("falls back to the defaults for anything unknown or malformed instead of failing", () => {
    expect(read("")).toEqual({ sort: fallback, page: 1, size: 10, q: "" });
    expect(read("sort=password&dir=up&page=-2&size=7")).toEqual({ sort: fallback, page: 1, size: 10, q: "" });
    expect(read("page=two&size=abc")).toMatchObject({ page: 1, size: 10 });
    expect(read("sort=title&dir=sideways").sort).toEqual({ key: "title", direction: "asc" });
  });

  it("links keep the page's other parameters and start a new sort on page 1", () => {
    expect(tableHref("?round=r1&page=4&sort=title&dir=asc", { sort: nextSort({ key: "title", direction: "asc" }, "title") })).toBe("?round=r1&sort=title&dir=desc");
    expect(tableHref("?round=r1", { page: 2 })).toBe("?round=r1&page=2");
    expect(tableHref("?page=2", { page: 1 })).toBe("?");
  });
});

describe("nextSort", () => {
  it("starts a new column ascending and flips the same column", () => {
    expect(nextSort(null, "name")).toEqual({ key: "name", direction: "asc" });
    expect(nextSort({ key: "name", direction: "asc" }, "name")).toEqual({ key: "name", direction: "desc" });
    expect(nextSort({ key: "name", direction: "desc" }, "points")).toEqual({ key: "points", direction: "asc" });
  });
});
