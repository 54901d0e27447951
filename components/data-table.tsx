"use client";

import { useId, useMemo, useState, type HTMLAttributes, type ReactNode } from "react";

// A small sortable, paged table for Airkeep's lists. Client-side by default (give it every row);
// pass `manual` with the total row count, and control `sort` and `page`, when the server sorts and pages.

export type SortDirection = "asc" | "desc";
export type SortState = { columnId: string; direction: SortDirection } | null;
export type SortValue = string | number | boolean | null | undefined;

export type DataColumn<T> = {
  id: string;
  header: ReactNode;
  cell: (row: T) => ReactNode;
  /** Present = the column is sortable by this value. Empty values (null, undefined, "") sort last either way. */
  sortValue?: (row: T) => SortValue;
  /** Right-aligned tabular figures in Roboto Mono (numbers with units). */
  numeric?: boolean;
  /** Extra classes for this column's cells. */
  className?: string;
  /** Extra classes for the header cell (e.g. a width). */
  headerClassName?: string;
};

export type DataTableProps<T> = {
  rows: readonly T[];
  columns: readonly DataColumn<T>[];
  rowKey: (row: T) => string | number;
  /** Names the table for assistive technology; shown above it when `showCaption`. */
  caption: string;
  showCaption?: boolean;
  /** Sort on first render (uncontrolled). */
  initialSort?: SortState;
  /** Rows per page; 0 shows everything on one page. */
  pageSize?: number;
  pageSizeOptions?: readonly number[];
  emptyText?: ReactNode;
  /** Shown in the body instead of rows while the first load is in flight. */
  loading?: boolean;
  rowProps?: (row: T) => HTMLAttributes<HTMLTableRowElement> & { "data-testid"?: string };
  "data-testid"?: string;
  /** Controlled sort (both, or neither). */
  sort?: SortState;
  onSortChange?: (sort: SortState) => void;
  /** Controlled page, zero-based (both, or neither). */
  page?: number;
  onPageChange?: (page: number) => void;
  onPageSizeChange?: (size: number) => void;
  /** Server-side mode: `rows` is already the sorted current page; `totalRows` is the full count. */
  manual?: { totalRows: number };
};

const collator = new Intl.Collator(undefined, { numeric: true, sensitivity: "base" });

const isEmpty = (v: SortValue) => v === null || v === undefined || v === "" || (typeof v === "number" && Number.isNaN(v));

/** Ascending comparison of two cell values; empty values are not handled here (see sortRows). */
export function compareSortValues(a: SortValue, b: SortValue): number {
  if (typeof a === "number" && typeof b === "number") return a - b;
  if (typeof a === "boolean" && typeof b === "boolean") return Number(a) - Number(b);
  return collator.compare(String(a), String(b));
}

/** A stable sort; empty values go last whichever the direction. */
export function sortRows<T>(rows: readonly T[], columns: readonly DataColumn<T>[], sort: SortState): T[] {
  const column = sort ? columns.find((c) => c.id === sort.columnId) : undefined;
  if (!sort || !column?.sortValue) return [...rows];
  const value = column.sortValue;
  const sign = sort.direction === "asc" ? 1 : -1;
  return rows
    .map((row, index) => ({ row, index, v: value(row) }))
    .sort((x, y) => {
      const ex = isEmpty(x.v);
      const ey = isEmpty(y.v);
      if (ex || ey) return ex && ey ? x.index - y.index : ex ? 1 : -1;
      return sign * compareSortValues(x.v, y.v) || x.index - y.index;
    })
    .map((x) => x.row);
}

/** Clicking a header: a new column sorts ascending, the same column flips direction. */
export function nextSort(current: SortState, columnId: string): SortState {
  if (current?.columnId === columnId) return { columnId, direction: current.direction === "asc" ? "desc" : "asc" };
  return { columnId, direction: "asc" };
}

export function pageCount(totalRows: number, pageSize: number): number {
  return pageSize > 0 ? Math.max(1, Math.ceil(totalRows / pageSize)) : 1;
}

export function clampPage(page: number, totalRows: number, pageSize: number): number {
  return Math.min(Math.max(0, Math.floor(page)), pageCount(totalRows, pageSize) - 1);
}

export function pageSlice<T>(rows: readonly T[], page: number, pageSize: number): T[] {
  if (pageSize <= 0) return [...rows];
  const p = clampPage(page, rows.length, pageSize);
  return rows.slice(p * pageSize, (p + 1) * pageSize);
}

/** "Rows 26–40 of 40" */
export function rangeText(page: number, pageSize: number, totalRows: number): string {
  if (totalRows === 0) return "No rows";
  if (pageSize <= 0) return `Rows 1–${totalRows} of ${totalRows}`;
  const p = clampPage(page, totalRows, pageSize);
  return `Rows ${p * pageSize + 1}–${Math.min(totalRows, (p + 1) * pageSize)} of ${totalRows}`;
}

const ariaSort = (sort: SortState, id: string) =>
  sort?.columnId === id ? (sort.direction === "asc" ? "ascending" : "descending") : "none";

export function DataTable<T>(props: DataTableProps<T>) {
  const {
    rows,
    columns,
    rowKey,
    caption,
    showCaption = false,
    initialSort = null,
    pageSizeOptions = [10, 25, 50, 100],
    emptyText = "Nothing to show.",
    loading = false,
    rowProps,
    manual,
  } = props;
  const pagerId = useId();
  const [ownSort, setOwnSort] = useState<SortState>(initialSort);
  const [ownPage, setOwnPage] = useState(0);
  const [ownPageSize, setOwnPageSize] = useState(props.pageSize ?? 25);

  const sort = props.sort !== undefined ? props.sort : ownSort;
  const pageSize = props.onPageSizeChange ? (props.pageSize ?? 25) : ownPageSize;
  const totalRows = manual ? manual.totalRows : rows.length;
  const page = clampPage(props.page ?? ownPage, totalRows, pageSize);
  const pages = pageCount(totalRows, pageSize);

  const sorted = useMemo(() => (manual ? [...rows] : sortRows(rows, columns, sort)), [manual, rows, columns, sort]);
  const visible = manual ? sorted : pageSlice(sorted, page, pageSize);

  function changeSort(columnId: string) {
    const next = nextSort(sort, columnId);
    if (props.onSortChange) props.onSortChange(next);
    else setOwnSort(next);
    goTo(0);
  }

  function goTo(p: number) {
    const next = clampPage(p, totalRows, pageSize);
    if (props.onPageChange) props.onPageChange(next);
    else setOwnPage(next);
  }

  function changePageSize(size: number) {
    if (props.onPageSizeChange) props.onPageSizeChange(size);
    else setOwnPageSize(size);
    goTo(0);
  }

  const sizes = [...new Set([...pageSizeOptions, pageSize])].filter((n) => n > 0).sort((a, b) => a - b);

  return (
    <div className="space-y-1.5" data-testid={props["data-testid"]}>
      <div className="overflow-x-auto rounded border border-line bg-raised">
        <table className="w-full border-collapse text-sm" aria-busy={loading || undefined}>
          <caption className={showCaption ? "px-2 py-1.5 text-left font-semibold" : "sr-only"}>{caption}</caption>
          <thead className="bg-panel">
            <tr>
              {columns.map((c) => (
                <th
                  key={c.id}
                  scope="col"
                  aria-sort={c.sortValue ? ariaSort(sort, c.id) : undefined}
                  className={`border-b border-line px-2 py-1.5 font-semibold whitespace-nowrap ${
                    c.numeric ? "text-right" : "text-left"
                  } ${c.headerClassName ?? ""}`}
                >
                  {c.sortValue ? (
                    <button
                      type="button"
                      onClick={() => changeSort(c.id)}
                      className={`inline-flex items-center gap-1 rounded px-0.5 hover:underline ${c.numeric ? "flex-row-reverse" : ""}`}
                    >
                      <span>{c.header}</span>
                      <SortMark direction={sort?.columnId === c.id ? sort.direction : null} />
                    </button>
                  ) : (
                    c.header
                  )}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {loading && visible.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-2 py-3 text-muted">
                  Loading…
                </td>
              </tr>
            ) : visible.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-2 py-3 text-muted">
                  {emptyText}
                </td>
              </tr>
            ) : (
              visible.map((row) => {
                const extra = rowProps?.(row) ?? {};
                return (
                  <tr key={rowKey(row)} {...extra} className={`border-t border-line first:border-t-0 ${extra.className ?? ""}`}>
                    {columns.map((c) => (
                      <td
                        key={c.id}
                        className={`px-2 py-1 align-middle ${c.numeric ? "num text-right whitespace-nowrap" : ""} ${c.className ?? ""}`}
                      >
                        {c.cell(row)}
                      </td>
                    ))}
                  </tr>
                );
              })
            )}
          </tbody>
        </table>
      </div>
      <nav aria-label={`${caption}: pages`} className="flex flex-wrap items-center gap-2 text-sm text-muted">
        <span aria-live="polite" className="num" id={pagerId}>
          {rangeText(page, pageSize, totalRows)}
        </span>
        {pages > 1 && (
          <span className="flex items-center gap-1">
            <PagerButton label="First page" onClick={() => goTo(0)} disabled={page === 0}>
              «
            </PagerButton>
            <PagerButton label="Previous page" onClick={() => goTo(page - 1)} disabled={page === 0}>
              ‹ Prev
            </PagerButton>
            <span className="num px-1">
              Page {page + 1} of {pages}
            </span>
            <PagerButton label="Next page" onClick={() => goTo(page + 1)} disabled={page >= pages - 1}>
              Next ›
            </PagerButton>
            <PagerButton label="Last page" onClick={() => goTo(pages - 1)} disabled={page >= pages - 1}>
              »
            </PagerButton>
          </span>
        )}
        {totalRows > (sizes[0] ?? 0) && (
          <label className="ml-auto flex items-center gap-1">
            Rows per page
            <select
              className="num rounded border border-line bg-raised px-1 py-0.5 text-ink"
              value={pageSize}
              onChange={(e) => changePageSize(Number(e.target.value))}
            >
              {sizes.map((n) => (
                <option key={n} value={n}>
                  {n}
                </option>
              ))}
            </select>
          </label>
        )}
      </nav>
    </div>
  );
}

function SortMark({ direction }: { direction: SortDirection | null }) {
  return (
    <span aria-hidden="true" className={`text-xs ${direction ? "text-ink" : "text-muted"}`}>
      {direction === "asc" ? "▲" : direction === "desc" ? "▼" : "↕"}
    </span>
  );
}

function PagerButton({
  label,
  onClick,
  disabled,
  children,
}: {
  label: string;
  onClick: () => void;
  disabled: boolean;
  children: ReactNode;
}) {
  return (
    <button
      type="button"
      aria-label={label}
      onClick={onClick}
      disabled={disabled}
      className="rounded border border-line bg-raised px-2 py-0.5 text-ink hover:bg-panel disabled:cursor-not-allowed disabled:opacity-50"
    >
      {children}
    </button>
  );
}
