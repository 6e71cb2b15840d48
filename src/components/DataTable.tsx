import { useCallback, useMemo, type ReactNode } from "react";
import { useSearchParams } from "react-router-dom";
import { errorMessage } from "../lib/api.ts";
import { EmptyState } from "./EmptyState.tsx";

export interface Column<T> {
  /** Unique column id. */
  id: string;
  header: ReactNode;
  /** Cell content. */
  cell: (row: T) => ReactNode;
  /** The server's sort column name; omit for columns that cannot be sorted. */
  sortKey?: string;
  /** Figures: right-aligned (their cells should use <Figure>). */
  numeric?: boolean;
  className?: string;
  /** Hidden below this breakpoint: "sm" | "md" | "lg". */
  hideBelow?: "sm" | "md" | "lg";
}

export interface DataTableProps<T> {
  columns: Column<T>[];
  rows: T[] | undefined;
  rowKey: (row: T) => string | number;
  total?: number;
  page?: number;
  pageSize?: number;
  /** "name" or "-name". */
  sort?: string;
  onSortChange?: (sort: string) => void;
  onPageChange?: (page: number) => void;
  loading?: boolean;
  error?: unknown;
  empty?: ReactNode;
  /** Filters and search shown above the table. */
  toolbar?: ReactNode;
  caption?: string;
  onRowClick?: (row: T) => void;
  rowClassName?: (row: T) => string;
}

const HIDE = { sm: "hidden sm:table-cell", md: "hidden md:table-cell", lg: "hidden lg:table-cell" } as const;

/** Next sort when a header is clicked: ascending → descending → ascending on the same column. */
export function nextSort(current: string | undefined, key: string): string {
  if (current === key) return `-${key}`;
  return key;
}

/** A table whose sorting, filtering and paging happen on the server (docs/api.md list conventions). */
export function DataTable<T>(props: DataTableProps<T>) {
  const { columns, rows, rowKey, total, page = 1, pageSize = 25, sort, onSortChange, onPageChange, loading, error, empty, toolbar, caption, onRowClick, rowClassName } = props;
  const pages = total !== undefined ? Math.max(1, Math.ceil(total / pageSize)) : 1;
  const sortKey = sort?.replace(/^-/, "");
  const desc = sort?.startsWith("-");
  return (
    <div className="overflow-hidden rounded-md border border-line bg-surface shadow-card">
      {toolbar && <div className="flex flex-wrap items-end gap-3 border-b border-line bg-surface px-3 py-2.5">{toolbar}</div>}
      <div className="relative overflow-x-auto">
        <table className="w-full border-collapse text-body">
          {caption && <caption className="sr-only">{caption}</caption>}
          <thead>
            <tr className="border-b border-line bg-sunken/60">
              {columns.map((c) => {
                const active = c.sortKey && sortKey === c.sortKey;
                return (
                  <th
                    key={c.id}
                    scope="col"
                    aria-sort={active ? (desc ? "descending" : "ascending") : undefined}
                    className={`px-3 py-2 text-caption font-semibold uppercase tracking-wide text-ink-muted ${c.numeric ? "text-right" : "text-left"} ${c.hideBelow ? HIDE[c.hideBelow] : ""} ${c.className ?? ""}`}
                  >
                    {c.sortKey && onSortChange ? (
                      <button
                        type="button"
                        className={`inline-flex items-center gap-1 uppercase hover:text-ink ${active ? "text-ink" : ""}`}
                        onClick={() => onSortChange(nextSort(sort, c.sortKey!))}
                      >
                        {c.header}
                        <span aria-hidden="true" className="num text-[0.7rem]">{active ? (desc ? "▼" : "▲") : "↕"}</span>
                      </button>
                    ) : (
                      c.header
                    )}
                  </th>
                );
              })}
            </tr>
          </thead>
          <tbody>
            {rows?.map((row) => (
              <tr
                key={rowKey(row)}
                onClick={onRowClick ? () => onRowClick(row) : undefined}
                className={`border-b border-line last:border-b-0 ${onRowClick ? "cursor-pointer hover:bg-brand-soft/50" : ""} ${rowClassName?.(row) ?? ""}`}
              >
                {columns.map((c) => (
                  <td key={c.id} className={`px-3 py-2 align-middle ${c.numeric ? "text-right num" : ""} ${c.hideBelow ? HIDE[c.hideBelow] : ""} ${c.className ?? ""}`}>
                    {c.cell(row)}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {error ? (
        <div role="alert" className="border-t border-line bg-danger-soft px-3 py-3 text-danger">{errorMessage(error)}</div>
      ) : loading && !rows?.length ? (
        <div className="px-3 py-6 text-center text-ink-muted" aria-live="polite">Loading…</div>
      ) : rows && rows.length === 0 ? (
        <div className="p-4">{empty ?? <EmptyState title="Nothing here yet" />}</div>
      ) : null}
      {total !== undefined && total > 0 && onPageChange && (
        <div className="flex items-center justify-between gap-3 border-t border-line px-3 py-2 text-caption text-ink-muted">
          <span>
            <span className="num">{(page - 1) * pageSize + 1}</span>–<span className="num">{Math.min(page * pageSize, total)}</span> of{" "}
            <span className="num">{total}</span>
          </span>
          <span className="flex items-center gap-2">
            <button type="button" className="rounded-sm border border-line px-2 py-1 hover:bg-sunken disabled:opacity-40" disabled={page <= 1} onClick={() => onPageChange(page - 1)}>
              Previous
            </button>
            <span>
              Page <span className="num">{page}</span> / <span className="num">{pages}</span>
            </span>
            <button type="button" className="rounded-sm border border-line px-2 py-1 hover:bg-sunken disabled:opacity-40" disabled={page >= pages} onClick={() => onPageChange(page + 1)}>
              Next
            </button>
          </span>
        </div>
      )}
    </div>
  );
}

export interface ListParams {
  page: number;
  pageSize: number;
  sort: string | undefined;
  filters: Record<string, string>;
}

/**
 * List state (page, sort, filters) kept in the URL's search params, so a table view can be linked and survives reload.
 * Changing a filter or the sort goes back to page 1.
 */
export function useListParams(defaults: { pageSize?: number; sort?: string; filters?: string[] } = {}) {
  const [sp, setSp] = useSearchParams();
  const filterNames = defaults.filters ?? [];
  const params: ListParams = useMemo(
    () => ({
      page: Math.max(1, Number(sp.get("page")) || 1),
      pageSize: Math.min(200, Number(sp.get("pageSize")) || defaults.pageSize || 25),
      sort: sp.get("sort") ?? defaults.sort,
      filters: Object.fromEntries(filterNames.map((f) => [f, sp.get(f) ?? ""])),
    }),
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [sp, defaults.pageSize, defaults.sort, filterNames.join(",")],
  );
  const update = useCallback(
    (changes: Record<string, string | number | undefined | null>, resetPage = true) => {
      setSp(
        (prev) => {
          const next = new URLSearchParams(prev);
          for (const [k, v] of Object.entries(changes)) {
            if (v === undefined || v === null || v === "") next.delete(k);
            else next.set(k, String(v));
          }
          if (resetPage && !("page" in changes)) next.delete("page");
          return next;
        },
        { replace: true },
      );
    },
    [setSp],
  );
  return {
    ...params,
    setPage: (page: number) => update({ page }, false),
    setSort: (sort: string) => update({ sort }),
    setFilter: (name: string, value: string) => update({ [name]: value }),
    /** Query object for the API: page, pageSize, sort and the non-empty filters. */
    query: { page: params.page, pageSize: params.pageSize, sort: params.sort, ...params.filters },
  };
}

/**
 * The DataTable props that come from the URL's list state and one server page query:
 * `<DataTable {...pagedTableProps(list, query)} columns={…} rowKey={…} />`.
 */
export function pagedTableProps<T>(
  list: Pick<ReturnType<typeof useListParams>, "page" | "pageSize" | "sort" | "setSort" | "setPage">,
  q: { data?: { items: T[]; total: number }; isPending: boolean; error: unknown },
): Pick<DataTableProps<T>, "rows" | "total" | "page" | "pageSize" | "sort" | "onSortChange" | "onPageChange" | "loading" | "error"> {
  return {
    rows: q.data?.items,
    total: q.data?.total,
    page: list.page,
    pageSize: list.pageSize,
    sort: list.sort,
    onSortChange: list.setSort,
    onPageChange: list.setPage,
    loading: q.isPending,
    error: q.error,
  };
}
