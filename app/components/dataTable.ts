// Pure sort / filter / paginate helpers behind DataTable, kept apart so they are unit-tested without React.
import type { ReactNode } from "react";

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

export function valueOf<T>(row: T, column: Pick<Column<T>, "key" | "sortValue">): SortValue {
  if (column.sortValue) return column.sortValue(row);
  const raw = (row as Record<string, unknown>)[column.key];
  return typeof raw === "string" || typeof raw === "number" || typeof raw === "boolean" || raw instanceof Date
    ? raw
    : null;
}

const collator = new Intl.Collator(undefined, { numeric: true, sensitivity: "base" });

function comparable(v: SortValue): string | number | null {
  if (v === null || v === undefined || v === "") return null;
  if (v instanceof Date) return v.getTime();
  if (typeof v === "boolean") return v ? 1 : 0;
  return v;
}

/** Compares two values; empty values always sort last, whatever the direction, so blanks never crowd the top. */
export function compareValues(a: SortValue, b: SortValue, direction: SortDirection): number {
  const x = comparable(a);
  const y = comparable(b);
  if (x === null || y === null) return x === y ? 0 : x === null ? 1 : -1;
  const order = typeof x === "number" && typeof y === "number" ? x - y : collator.compare(String(x), String(y));
  return direction === "asc" ? order : -order;
}

/** A stable sort on one column; unknown keys leave the order as given. */
export function sortRows<T>(rows: readonly T[], columns: readonly Column<T>[], sort: SortState | null): T[] {
  const column = sort ? columns.find((c) => c.key === sort.key) : undefined;
  if (!sort || !column) return [...rows];
  return rows
    .map((row, index) => ({ row, index, value: valueOf(row, column) }))
    .sort((a, b) => compareValues(a.value, b.value, sort.direction) || a.index - b.index)
    .map((e) => e.row);
}

function text(v: SortValue): string {
  if (v === null || v === undefined) return "";
  if (v instanceof Date) return v.toISOString().slice(0, 10);
  return String(v);
}

/** Keeps rows where every word of the query appears in some column, ignoring case and accents. */
export function filterRows<T>(rows: readonly T[], columns: readonly Column<T>[], query: string): T[] {
  const words = fold(query).split(/\s+/).filter(Boolean);
  if (words.length === 0) return [...rows];
  return rows.filter((row) => {
    const haystack = fold(columns.map((c) => text(valueOf(row, c))).join(" "));
    return words.every((w) => haystack.includes(w));
  });
}

function fold(s: string): string {
  return s.normalize("NFD").replace(/\p{Diacritic}/gu, "").toLowerCase();
}

export interface Page<T> {
  rows: T[];
  /** 1-based, clamped into range. */
  page: number;
  pageCount: number;
  total: number;
  /** 1-based index of the first row shown; 0 when there are none. */
  first: number;
  last: number;
}

export function paginate<T>(rows: readonly T[], page: number, pageSize: number): Page<T> {
  const size = Math.max(1, Math.floor(pageSize) || 1);
  const pageCount = Math.max(1, Math.ceil(rows.length / size));
  const current = Math.min(Math.max(1, Math.floor(page) || 1), pageCount);
  const start = (current - 1) * size;
  const shown = rows.slice(start, start + size);
  return {
    rows: shown,
    page: current,
    pageCount,
    total: rows.length,
    first: shown.length ? start + 1 : 0,
    last: start + shown.length,
  };
}

/** Header clicks: a new column starts ascending, the same column flips. */
export function nextSort(current: SortState | null, key: string): SortState {
  return current?.key === key
    ? { key, direction: current.direction === "asc" ? "desc" : "asc" }
    : { key, direction: "asc" };
}
