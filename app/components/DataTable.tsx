// A client-side table that sorts, filters and paginates, and stays usable on a phone:
// it scrolls sideways inside its own box while the first column stays in view.
import { useEffect, useId, useMemo, useState, type ReactNode } from "react";
import {
  filterRows,
  nextSort,
  paginate,
  sortRows,
  valueOf,
  type Column,
  type SortState,
} from "./dataTable";

export type { Column, SortState } from "./dataTable";

const PAGE_SIZES = [10, 25, 50, 100];

const alignClass = { left: "text-left", right: "text-right", center: "text-center" } as const;

export function DataTable<T>({
  rows,
  columns,
  rowKey,
  caption,
  filterPlaceholder = "Filter",
  pageSize: initialPageSize = 10,
  empty = "Nothing here yet.",
  initialSort = null,
}: {
  rows: readonly T[];
  columns: readonly Column<T>[];
  rowKey: (row: T) => string | number;
  /** Names the table for screen readers (shown visually hidden). */
  caption: string;
  filterPlaceholder?: string;
  pageSize?: number;
  empty?: ReactNode;
  initialSort?: SortState | null;
}) {
  const id = useId();
  const [query, setQuery] = useState("");
  const [sort, setSort] = useState<SortState | null>(initialSort);
  const [page, setPage] = useState(1);
  const [pageSize, setPageSize] = useState(initialPageSize);
  // Paging needs scripts: until they run (or with JavaScript off) every row is shown, so the
  // forms in rows past the first page can still be reached.
  const [scripted, setScripted] = useState(false);
  useEffect(() => setScripted(true), []);

  const view = useMemo(
    () => paginate(sortRows(filterRows(rows, columns, query), columns, sort), page, scripted ? pageSize : rows.length),
    [rows, columns, query, sort, page, pageSize, scripted],
  );
  const sizes = PAGE_SIZES.includes(initialPageSize) ? PAGE_SIZES : [initialPageSize, ...PAGE_SIZES].sort((a, b) => a - b);

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <div className="min-w-0 flex-1">
          <label htmlFor={`${id}-filter`} className="sr-only">
            {filterPlaceholder}
          </label>
          <input
            id={`${id}-filter`}
            type="search"
            value={query}
            placeholder={filterPlaceholder}
            onChange={(e) => {
              setQuery(e.target.value);
              setPage(1);
            }}
            className="block min-h-11 w-full rounded-xl border-2 border-ink/20 bg-white px-3 py-2 text-lg focus:border-sky"
          />
        </div>
        <label className="flex items-center gap-2 text-sm">
          Rows per page
          <select
            value={pageSize}
            onChange={(e) => {
              setPageSize(Number(e.target.value));
              setPage(1);
            }}
            className="min-h-11 rounded-xl border-2 border-ink/20 bg-white px-2"
          >
            {sizes.map((s) => (
              <option key={s} value={s}>
                {s}
              </option>
            ))}
          </select>
        </label>
      </div>

      <div className="overflow-x-auto rounded-2xl border border-ink/10 bg-white/70">
        <table className="w-full border-collapse text-left">
          <caption className="sr-only">
            {caption}
            {sort ? `, sorted by ${headerText(columns, sort.key)} ${sort.direction === "asc" ? "ascending" : "descending"}` : ""}
          </caption>
          <thead>
            <tr className="border-b-2 border-ink/10">
              {columns.map((c, i) => {
                const active = sort?.key === c.key;
                const align = alignClass[c.align ?? "left"];
                return (
                  <th
                    key={c.key}
                    scope="col"
                    aria-sort={active ? (sort.direction === "asc" ? "ascending" : "descending") : undefined}
                    className={`whitespace-nowrap px-3 py-2 font-display font-medium ${align} ${i === 0 ? stickyClass : ""}`}
                  >
                    {c.sortable === false ? (
                      c.header
                    ) : (
                      <button
                        type="button"
                        onClick={() => setSort(nextSort(sort, c.key))}
                        className="inline-flex min-h-11 items-center gap-1 rounded-lg hover:underline"
                      >
                        {c.header}
                        <span aria-hidden="true" className={active ? "" : "opacity-30"}>
                          {active ? (sort.direction === "asc" ? "▲" : "▼") : "↕"}
                        </span>
                      </button>
                    )}
                  </th>
                );
              })}
            </tr>
          </thead>
          <tbody>
            {view.rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-ink-soft">
                  {query ? `No rows match “${query}”.` : empty}
                </td>
              </tr>
            ) : (
              view.rows.map((row) => (
                <tr key={rowKey(row)} className="border-b border-ink/5 last:border-0">
                  {columns.map((c, i) => {
                    const content = c.cell ? c.cell(row) : String(valueOf(row, c) ?? "");
                    const cls = `px-3 py-2 ${alignClass[c.align ?? "left"]} ${i === 0 ? stickyClass : ""}`;
                    return i === 0 ? (
                      <th key={c.key} scope="row" className={`${cls} font-medium`}>
                        {content}
                      </th>
                    ) : (
                      <td key={c.key} className={cls}>
                        {content}
                      </td>
                    );
                  })}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>

      <nav aria-label={`${caption}: pages`} className="flex flex-wrap items-center justify-between gap-2">
        <p aria-live="polite" className="text-sm text-ink-soft">
          {view.total === 0 ? "No rows" : `Rows ${view.first}–${view.last} of ${view.total}`}
          {view.total !== rows.length ? ` (filtered from ${rows.length})` : ""}
        </p>
        <div className="flex items-center gap-2">
          <button
            type="button"
            onClick={() => setPage(view.page - 1)}
            disabled={view.page <= 1}
            className="min-h-11 rounded-xl border-2 border-ink/20 px-3 disabled:opacity-40"
          >
            <span aria-hidden="true">← </span>Previous
          </button>
          <span className="text-sm">
            Page {view.page} of {view.pageCount}
          </span>
          <button
            type="button"
            onClick={() => setPage(view.page + 1)}
            disabled={view.page >= view.pageCount}
            className="min-h-11 rounded-xl border-2 border-ink/20 px-3 disabled:opacity-40"
          >
            Next<span aria-hidden="true"> →</span>
          </button>
        </div>
      </nav>
    </div>
  );
}

// The first column names the row, so it stays visible while the rest scrolls on a narrow screen.
const stickyClass = "sticky left-0 z-10 bg-paper";

function headerText<T>(columns: readonly Column<T>[], key: string): string {
  const h = columns.find((c) => c.key === key)?.header;
  return typeof h === "string" ? h : key;
}
