"use client";

import { useQuery } from "@tanstack/react-query";
import { flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from "@tanstack/react-table";
import { useState, type ReactNode } from "react";
import { api } from "@/lib/api";
import type { ApiResponse, ApiRoute } from "@/shared/api";
import { ErrorNote, Skeleton } from "@/components/ui/Page";

export interface FilterDef {
  id: string;
  label: string;
  options: { value: string; label: string }[];
}

/** The list endpoints: their answer holds the items under a key and the next page's position. */
type ListRoute = "GET /api/v1/runs" | "GET /api/v1/sweeps" | "GET /api/v1/networks" | "GET /api/v1/fits" | "GET /api/v1/datasets";
type ListKey<R extends ListRoute> = { [K in keyof ApiResponse<R>]: ApiResponse<R>[K] extends unknown[] ? K : never }[keyof ApiResponse<R>];
export type ListItem<R extends ListRoute, K extends ListKey<R> = ListKey<R>> = ApiResponse<R>[K] extends (infer T)[] ? T : never;

interface Props<R extends ListRoute, K extends ListKey<R>> {
  /** The list endpoint, e.g. "GET /api/v1/runs". */
  route: R;
  /** Where the answer holds the items (e.g. "runs"). */
  listKey: K;
  columns: ColumnDef<ListItem<R, K>, unknown>[];
  filters?: FilterDef[];
  /** Fixed query parameters (e.g. networkId). */
  fixed?: Record<string, string | undefined>;
  pageSize?: number;
  /** Query parameter that carries the next page's position (the API's name for it). */
  cursorParam?: "cursor" | "before";
  empty: ReactNode;
  label: string;
}

/**
 * A list read page by page from the API (cursor pagination), with sort and filters passed to the
 * server as query parameters, drawn with TanStack Table.
 */
export function DataTable<R extends ListRoute & ApiRoute, K extends ListKey<R>>({
  route,
  listKey,
  columns,
  filters = [],
  fixed = {},
  pageSize = 20,
  cursorParam = "cursor",
  empty,
  label,
}: Props<R, K>) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const [filterValues, setFilterValues] = useState<Record<string, string>>({});
  const [cursors, setCursors] = useState<(string | null)[]>([null]);
  const cursor = cursors[cursors.length - 1];
  // The API filters and pages (newest first); columns with a value sort the page shown.
  const params = { ...fixed, ...filterValues, limit: pageSize, [cursorParam]: cursor ?? undefined };
  const q = useQuery({
    queryKey: [listKey, params],
    queryFn: async () => {
      const page = await api(route, { query: params });
      const next = page as { nextCursor?: string | null; nextBefore?: string | null };
      return { items: page[listKey] as ListItem<R, K>[], nextCursor: (cursorParam === "before" ? next.nextBefore : next.nextCursor) ?? null };
    },
    placeholderData: (prev) => prev,
    refetchInterval: 5_000,
  });
  // TanStack Table's hook returns new functions every render; nothing here is memoized by a compiler.
  // eslint-disable-next-line react-hooks/incompatible-library -- the app does not use the React Compiler
  const table = useReactTable({
    data: q.data?.items ?? [],
    columns,
    state: { sorting },
    enableSortingRemoval: true,
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });
  return (
    <div className="space-y-3">
      {filters.length > 0 ? (
        <div className="flex flex-wrap items-end gap-3" role="search" aria-label={`Filter ${label}`}>
          {filters.map((f) => (
            <label key={f.id} className="text-caption text-fg-soft">
              {f.label}
              <select
                className="tk-field mt-1 py-1 text-caption"
                value={filterValues[f.id] ?? ""}
                onChange={(e) => {
                  setFilterValues((v) => ({ ...v, [f.id]: e.target.value }));
                  setCursors([null]);
                }}
              >
                <option value="">All</option>
                {f.options.map((o) => (
                  <option key={o.value} value={o.value}>
                    {o.label}
                  </option>
                ))}
              </select>
            </label>
          ))}
        </div>
      ) : null}
      {q.error ? <ErrorNote error={q.error} title={`Could not load ${label}`} /> : null}
      {!q.data && q.isLoading ? <Skeleton lines={4} /> : null}
      {q.data && q.data.items.length === 0 ? (
        <div className="rounded-card border border-dashed border-line-strong p-8 text-center text-body text-fg-soft">{empty}</div>
      ) : null}
      {q.data && q.data.items.length > 0 ? (
        <div className="overflow-x-auto rounded-card border border-line bg-surface">
          <table className="w-full text-left text-body" aria-label={label}>
            <thead className="border-b border-line bg-surface-sunk text-caption uppercase tracking-wide text-fg-faint">
              {table.getHeaderGroups().map((hg) => (
                <tr key={hg.id}>
                  {hg.headers.map((h) => {
                    const can = h.column.getCanSort();
                    const dir = h.column.getIsSorted();
                    return (
                      <th key={h.id} scope="col" className="px-3 py-2 font-medium" aria-sort={dir ? (dir === "asc" ? "ascending" : "descending") : undefined}>
                        {can ? (
                          <button
                            type="button"
                            className="inline-flex items-center gap-1 uppercase hover:text-fg"
                            onClick={h.column.getToggleSortingHandler()}
                            title="Sort the rows on this page"
                          >
                            {flexRender(h.column.columnDef.header, h.getContext())}
                            <span aria-hidden>{dir === "asc" ? "▲" : dir === "desc" ? "▼" : "↕"}</span>
                          </button>
                        ) : (
                          flexRender(h.column.columnDef.header, h.getContext())
                        )}
                      </th>
                    );
                  })}
                </tr>
              ))}
            </thead>
            <tbody>
              {table.getRowModel().rows.map((r) => (
                <tr key={r.id} className="border-b border-line last:border-0 hover:bg-surface-sunk/50">
                  {r.getVisibleCells().map((c) => (
                    <td key={c.id} className="px-3 py-2 align-top">
                      {flexRender(c.column.columnDef.cell, c.getContext())}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      {/* Paging only when there is more than one page (an empty or short list has none). */}
      {cursors.length > 1 || q.data?.nextCursor ? (
        <div className="flex items-center gap-2 text-caption text-fg-soft" data-testid="pagination">
          <button type="button" className="tk-btn-quiet" disabled={cursors.length <= 1} onClick={() => setCursors((c) => c.slice(0, -1))}>
            ← Newer
          </button>
          <span>Page {cursors.length}</span>
          <button
            type="button"
            className="tk-btn-quiet"
            disabled={!q.data?.nextCursor}
            onClick={() => q.data?.nextCursor && setCursors((c) => [...c, q.data!.nextCursor!])}
          >
            Older →
          </button>
          {q.isFetching ? <span className="text-fg-faint">updating…</span> : null}
        </div>
      ) : null}
    </div>
  );
}
