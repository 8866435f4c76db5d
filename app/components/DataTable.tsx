// A table that sorts, filters and pages, and stays usable on a phone: it scrolls sideways inside its
// own box while the first column stays in view. @tanstack/react-table keeps the state and the row
// models; the markup and the look are ours. Small tables do it all in the browser; a large one
// (`server`) gets one page from its loader and moves by plain links and a GET form, so it works
// without JavaScript too.
import { useReactTable, type PaginationState, type SortingState } from "@tanstack/react-table";
import { useEffect, useId, useMemo, useState, type ReactNode, type SelectHTMLAttributes } from "react";
import { Form, Link, useLocation } from "react-router";
import {
  clientTableOptions,
  columnDefs,
  fromSorting,
  nextSort,
  pageWindow,
  PAGE_SIZES,
  tableHref,
  toSorting,
  valueOf,
  type Column,
  type PageWindow,
  type SortState,
  type TableQuery,
} from "./dataTable";
import { Icon } from "./Icon";

export type { Column, SortState, TableQuery } from "./dataTable";

/** A table paged on the server: where it is (from the URL) and how many rows there are in all. */
export interface ServerPaging {
  query: TableQuery;
  total: number;
}

const alignClass = { left: "text-left", right: "text-right", center: "text-center" } as const;
const inputClass = "block min-h-11 w-full rounded-xl border-2 border-ink/20 bg-white px-3 py-2 text-lg focus:border-sky";
const pagerClass = "inline-flex min-h-11 items-center rounded-xl border-2 border-ink/20 px-3";
// An unavailable step is told by its faint dashed border; its words keep full text contrast, so they stay readable.
const pagerOffClass = "border-dashed border-ink/15 text-ink-soft";

export function DataTable<T>({
  rows,
  columns,
  rowKey,
  caption,
  filterPlaceholder = "Filter",
  pageSize: initialPageSize = 10,
  empty = "Nothing here yet.",
  initialSort = null,
  server,
}: {
  /** Every row; with `server`, the rows of the current page only. */
  rows: readonly T[];
  columns: readonly Column<T>[];
  rowKey: (row: T) => string | number;
  /** Names the table for screen readers (shown visually hidden). */
  caption: string;
  filterPlaceholder?: string;
  pageSize?: number;
  empty?: ReactNode;
  initialSort?: SortState | null;
  server?: ServerPaging;
}) {
  const id = useId();
  const { search } = useLocation();
  const [query, setQuery] = useState("");
  const [sorting, setSorting] = useState<SortingState>(() => toSorting(initialSort));
  const [paging, setPaging] = useState<PaginationState>({ pageIndex: 0, pageSize: initialPageSize });
  // Paging in the browser needs scripts: until they run (or with JavaScript off) every row is
  // shown, so the forms in rows past the first page can still be reached.
  const [scripted, setScripted] = useState(false);
  useEffect(() => setScripted(true), []);

  const defs = useMemo(() => columnDefs(columns), [columns]);
  const total = server ? server.total : undefined;
  const table = useReactTable({
    ...clientTableOptions(rows, defs),
    getRowId: (row) => String(rowKey(row)),
    ...(server ? { manualSorting: true, manualFiltering: true, manualPagination: true, rowCount: total } : {}),
    state: server
      ? { sorting: toSorting(server.query.sort), pagination: { pageIndex: server.query.page - 1, pageSize: server.query.size }, globalFilter: server.query.q }
      : { sorting, pagination: scripted ? paging : { pageIndex: 0, pageSize: Math.max(rows.length, 1) }, globalFilter: query },
    onSortingChange: setSorting,
    onPaginationChange: setPaging,
  });

  const sort = fromSorting(table.getState().sorting);
  const filtered = server ? server.total : table.getPrePaginationRowModel().rows.length;
  const view = pageWindow(filtered, table.getState().pagination.pageIndex + 1, table.getState().pagination.pageSize);
  // Rows removed by an action can leave the page past the end: show the last page that exists instead.
  if (!server && scripted && view.page !== paging.pageIndex + 1) table.setPageIndex(view.page - 1);
  const shown = table.getRowModel().rows;
  const shownQuery = server ? server.query.q : query;
  const sizes = (PAGE_SIZES as readonly number[]).includes(initialPageSize) ? [...PAGE_SIZES] : [initialPageSize, ...PAGE_SIZES].sort((a, b) => a - b);

  return (
    <div className="space-y-3">
      {server ? (
        <ServerFilter id={id} search={search} query={server.query} placeholder={filterPlaceholder} sizes={sizes} />
      ) : (
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
                table.setPageIndex(0);
              }}
              className={inputClass}
            />
          </div>
          <RowsPerPage sizes={sizes} value={paging.pageSize} onChange={(e) => setPaging({ pageIndex: 0, pageSize: Number(e.target.value) })} />
        </div>
      )}

      {/* Focusable, so a keyboard can scroll a table wider than the screen. */}
      <div className="overflow-x-auto rounded-2xl border border-ink/10 bg-white/70" tabIndex={0} role="region" aria-label={caption}>
        <table className="w-full border-collapse text-left">
          <caption className="sr-only">
            {caption}
            {sort ? `, sorted by ${headerText(columns, sort.key)} ${sort.direction === "asc" ? "ascending" : "descending"}` : ""}
          </caption>
          <thead>
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id} className="border-b-2 border-ink/10">
                {group.headers.map((h, i) => {
                  const c = columns[i]!;
                  const dir = h.column.getIsSorted();
                  const label = (
                    <>
                      {c.header}
                      <Icon name={dir === "asc" ? "sortUp" : dir === "desc" ? "sortDown" : "sortBoth"} className={`h-4 w-4 ${dir ? "" : "opacity-30"}`} />
                    </>
                  );
                  const control = "inline-flex min-h-11 items-center gap-1 rounded-lg hover:underline";
                  return (
                    <th
                      key={h.id}
                      scope="col"
                      aria-sort={dir === "asc" ? "ascending" : dir === "desc" ? "descending" : undefined}
                      className={`whitespace-nowrap px-3 py-2 font-display font-medium ${alignClass[c.align ?? "left"]} ${i === 0 ? stickyClass : ""}`}
                    >
                      {!h.column.getCanSort() ? (
                        c.header
                      ) : server ? (
                        <Link to={tableHref(search, { sort: nextSort(sort, c.key) })} preventScrollReset className={control}>
                          {label}
                        </Link>
                      ) : (
                        <button type="button" onClick={h.column.getToggleSortingHandler()} className={control}>
                          {label}
                        </button>
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {shown.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-ink-soft">
                  {shownQuery ? `No rows match “${shownQuery}”.` : empty}
                </td>
              </tr>
            ) : (
              shown.map((row) => (
                <tr key={row.id} className="border-b border-ink/5 last:border-0">
                  {row.getVisibleCells().map((cell, i) => {
                    const c = columns[i]!;
                    const content = c.cell ? c.cell(row.original) : String(valueOf(row.original, c) ?? "");
                    const cls = `px-3 py-2 ${alignClass[c.align ?? "left"]} ${i === 0 ? stickyClass : ""}`;
                    return i === 0 ? (
                      <th key={cell.id} scope="row" className={`${cls} font-medium`}>
                        {content}
                      </th>
                    ) : (
                      <td key={cell.id} className={cls}>
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
          {!server && view.total !== rows.length ? ` (filtered from ${rows.length})` : ""}
        </p>
        <Pager view={view} search={server ? search : null} onPage={(page) => table.setPageIndex(page - 1)} />
      </nav>
    </div>
  );
}

/** Previous / next: buttons in the browser, links when the server pages. */
function Pager({ view, search, onPage }: { view: PageWindow; search: string | null; onPage: (page: number) => void }) {
  const step = (page: number, enabled: boolean, children: ReactNode) =>
    search === null ? (
      <button type="button" onClick={() => onPage(page)} disabled={!enabled} className={`${pagerClass} ${enabled ? "" : pagerOffClass}`}>
        {children}
      </button>
    ) : enabled ? (
      <Link to={tableHref(search, { page })} preventScrollReset className={pagerClass}>
        {children}
      </Link>
    ) : (
      <span aria-disabled="true" className={`${pagerClass} ${pagerOffClass}`}>
        {children}
      </span>
    );
  return (
    <div className="flex items-center gap-2">
      {step(view.page - 1, view.page > 1, <><span aria-hidden="true">← </span>Previous</>)}
      <span className="text-sm">
        Page {view.page} of {view.pageCount}
      </span>
      {step(view.page + 1, view.page < view.pageCount, <>Next<span aria-hidden="true"> →</span></>)}
    </div>
  );
}

/** The filter and page size of a server-paged table: a GET form that keeps the page's other parameters. */
function ServerFilter({ id, search, query, placeholder, sizes }: { id: string; search: string; query: TableQuery; placeholder: string; sizes: number[] }) {
  const kept = [...new URLSearchParams(search)].filter(([name]) => !["q", "size", "page"].includes(name));
  return (
    <Form method="get" preventScrollReset className="flex flex-wrap items-end gap-3">
      {kept.map(([name, value]) => (
        <input key={name} type="hidden" name={name} value={value} />
      ))}
      <div className="min-w-0 flex-1">
        <label htmlFor={`${id}-filter`} className="sr-only">
          {placeholder}
        </label>
        <input id={`${id}-filter`} type="search" name="q" defaultValue={query.q} placeholder={placeholder} className={inputClass} />
      </div>
      <RowsPerPage sizes={sizes} name="size" defaultValue={query.size} />
      <button className={pagerClass}>Show</button>
    </Form>
  );
}

function RowsPerPage({ sizes, ...select }: { sizes: number[] } & SelectHTMLAttributes<HTMLSelectElement>) {
  return (
    <label className="flex items-center gap-2 text-sm">
      Rows per page
      <select {...select} className="min-h-11 rounded-xl border-2 border-ink/20 bg-white px-2">
        {sizes.map((s) => (
          <option key={s} value={s}>
            {s}
          </option>
        ))}
      </select>
    </label>
  );
}

// The first column names the row, so it stays visible while the rest scrolls on a narrow screen.
const stickyClass = "sticky left-0 z-10 bg-paper";

function headerText<T>(columns: readonly Column<T>[], key: string): string {
  const h = columns.find((c) => c.key === key)?.header;
  return typeof h === "string" ? h : key;
}
