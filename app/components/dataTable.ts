// The pure side of DataTable: our column description turned into @tanstack/react-table options
// (sorting, filtering, paging in the browser), and the URL side of tables paged on the server.
// Kept apart from the markup so it is unit-tested without React.
import {
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  type ColumnDef,
  type FilterFn,
  type Row,
  type SortingFn,
  type SortingState,
  type TableOptions,
} from "@tanstack/react-table";
import type { ReactNode } from "react";
import { z } from "zod";

export type SortValue = string | number | boolean | Date | null | undefined;
export type SortDirection = "asc" | "desc";

export interface Column<T> {
  key: string;
  header: ReactNode;
  /** What the cell shows; defaults to the row's value at `key`. */
  cell?: (row: T) => ReactNode;
  /** What sorting and filtering compare; defaults to the row's value at `key`. */
  sortValue?: (row: T) => SortValue;
  align?: "left" | "right" | "center";
  /** Set false for columns of buttons or links that make no sense to sort. */
  sortable?: boolean;
}

export interface SortState {
  key: string;
  direction: SortDirection;
}

// 5 is a phone's screenful.
export const PAGE_SIZES = [5, 10, 25, 50, 100] as const;

export function valueOf<T>(row: T, column: Pick<Column<T>, "key" | "sortValue">): SortValue {
  if (column.sortValue) return column.sortValue(row);
  const raw = (row as Record<string, unknown>)[column.key];
  return typeof raw === "string" || typeof raw === "number" || typeof raw === "boolean" || raw instanceof Date
    ? raw
    : null;
}

const collator = new Intl.Collator(undefined, { numeric: true, sensitivity: "base" });

function comparable(v: SortValue): string | number | undefined {
  if (v === null || v === undefined || v === "") return undefined;
  if (v instanceof Date) return v.getTime();
  if (typeof v === "boolean") return v ? 1 : 0;
  return v;
}

/** Ascending order of two non-blank values: numbers by size, text ignoring case with numbers in natural order. */
const byValue: SortingFn<unknown> = (a, b, columnId) => {
  const x = comparable(a.getValue<SortValue>(columnId))!;
  const y = comparable(b.getValue<SortValue>(columnId))!;
  return typeof x === "number" && typeof y === "number" ? x - y : collator.compare(String(x), String(y));
};

function cellText(v: SortValue): string {
  if (v === null || v === undefined) return "";
  if (v instanceof Date) return v.toISOString().slice(0, 10);
  return String(v);
}

function fold(s: string): string {
  return s.normalize("NFD").replace(/\p{Diacritic}/gu, "").toLowerCase();
}

// The filter asks "does every word appear somewhere in the row?"; the table asks it per column, so the
// row's text is folded once and remembered for as long as the row object lives.
const haystacks = new WeakMap<Row<unknown>, string>();
const rowText = (row: Row<unknown>) => {
  let text = haystacks.get(row);
  if (text === undefined) haystacks.set(row, (text = fold(row.getAllCells().map((c) => cellText(c.getValue<SortValue>())).join(" "))));
  return text;
};

/** Keeps rows where every word of the query appears in some column, ignoring case and accents. */
export const everyWord: FilterFn<unknown> = (row, _columnId, query: string) =>
  fold(query)
    .split(/\s+/)
    .filter(Boolean)
    .every((w) => rowText(row).includes(w));

/** Our columns as the library's: blanks always sort last, whatever the direction, so they never crowd the top. */
export function columnDefs<T>(columns: readonly Column<T>[]): ColumnDef<T, SortValue>[] {
  return columns.map((c) => ({
    id: c.key,
    accessorFn: (row: T) => {
      const v = valueOf(row, c);
      return v === null || v === "" ? undefined : v;
    },
    enableSorting: c.sortable !== false,
    sortingFn: byValue as SortingFn<T>,
    sortUndefined: "last",
    // A new column starts ascending (the library would start numbers descending).
    sortDescFirst: false,
  }));
}

export const toSorting = (sort: SortState | null): SortingState => (sort ? [{ id: sort.key, desc: sort.direction === "desc" }] : []);
export const fromSorting = (sorting: SortingState): SortState | null =>
  sorting[0] ? { key: sorting[0].id, direction: sorting[0].desc ? "desc" : "asc" } : null;

/** Options for a table that sorts, filters and pages its rows in the browser. */
export function clientTableOptions<T>(rows: readonly T[], defs: ColumnDef<T, SortValue>[]): TableOptions<T> {
  return {
    data: rows as T[],
    columns: defs,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    globalFilterFn: everyWord as FilterFn<T>,
    getColumnCanGlobalFilter: () => true,
    enableMultiSort: false,
    // A header click flips the column; it never falls back to "unsorted".
    enableSortingRemoval: false,
    // After an action reloads the rows, the teacher stays on the page they were on.
    autoResetPageIndex: false,
  };
}

export interface PageWindow {
  /** 1-based, clamped into range. */
  page: number;
  pageCount: number;
  total: number;
  /** 1-based index of the first row shown; 0 when there are none. */
  first: number;
  last: number;
}

/** Where a page sits among `total` rows; an out-of-range page is clamped to the nearest one. */
export function pageWindow(total: number, page: number, pageSize: number): PageWindow {
  const size = Math.max(1, Math.floor(pageSize) || 1);
  const pageCount = Math.max(1, Math.ceil(total / size));
  const current = Math.min(Math.max(1, Math.floor(page) || 1), pageCount);
  const first = total === 0 ? 0 : (current - 1) * size + 1;
  return { page: current, pageCount, total, first, last: total === 0 ? 0 : Math.min(total, current * size) };
}

// ---- tables paged on the server -------------------------------------------------------------

/** What a server-paged table shows, as read from the page's URL (`sort`, `dir`, `page`, `size`, `q`). */
export interface TableQuery {
  sort: SortState;
  /** 1-based. */
  page: number;
  size: number;
  q: string;
}

/**
 * Reads a table's place from the URL. Anything unknown or malformed falls back to the default rather
 * than failing: these are links people bookmark and share, and an old one should still open the table.
 */
export function readTableQuery(params: URLSearchParams, sortKeys: readonly string[], defaultSort: SortState, defaultSize = 10): TableQuery {
  const key = params.get("sort");
  const dir = params.get("dir");
  const page = z.coerce.number().int().min(1).max(100_000).safeParse(params.get("page"));
  const size = z.coerce.number().int().safeParse(params.get("size"));
  const sort = key !== null && sortKeys.includes(key) ? { key, direction: dir === "desc" ? "desc" : ("asc" as SortDirection) } : defaultSort;
  return {
    sort,
    page: page.success ? page.data : 1,
    size: size.success && (PAGE_SIZES as readonly number[]).includes(size.data) ? size.data : defaultSize,
    q: (params.get("q") ?? "").trim().slice(0, 100),
  };
}

/**
 * A link to the same page with the table moved: other parameters of the page are kept; a new sort,
 * size or filter starts again at page 1.
 */
export function tableHref(search: string, change: { sort?: SortState; page?: number }): string {
  const params = new URLSearchParams(search);
  if (change.sort) {
    params.set("sort", change.sort.key);
    params.set("dir", change.sort.direction);
    params.delete("page");
  }
  if (change.page !== undefined) {
    if (change.page > 1) params.set("page", String(change.page));
    else params.delete("page");
  }
  const query = params.toString();
  return query ? `?${query}` : "?";
}

/** Header clicks: a new column starts ascending, the same column flips. */
export function nextSort(current: SortState | null, key: string): SortState {
  return current?.key === key
    ? { key, direction: current.direction === "asc" ? "desc" : "asc" }
    : { key, direction: "asc" };
}
