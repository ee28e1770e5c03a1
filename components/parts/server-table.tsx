"use client";

import { flexRender, getCoreRowModel, useReactTable, type ColumnDef, type RowSelectionState, type SortingState } from "@tanstack/react-table";
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { useEffect, useMemo, useState } from "react";
import { apiJson } from "@/components/floor/api";
import { ScrollRegion } from "@/components/ui/scroll-region";

export type ServerTableProps<Row> = {
  /** API path without the query string, e.g. /api/parts */
  path: string;
  queryKey: string;
  columns: ColumnDef<Row, unknown>[];
  /** Extra filters sent with every request (they reset the page). */
  filters?: Record<string, string | undefined>;
  defaultSort: { id: string; desc: boolean };
  searchPlaceholder: string;
  getRowId: (row: Row) => string;
  selectable?: (row: Row) => boolean;
  onSelectionChange?: (rows: Row[]) => void;
  toolbar?: React.ReactNode;
  caption: string;
  pageSize?: number;
  testId?: string;
  emptyText?: string;
  /** Offer the rows as CSV from `${path}/export`, with the same search, filters and sort (all pages). */
  exportCsv?: boolean;
};

type Page<Row> = { rows: Row[]; total: number };

/**
 * A table whose sorting, search, filters and pages all happen on the server: the client only
 * keeps the state and asks the API for the one page it shows.
 */
export function ServerTable<Row>({ path, queryKey, columns, filters = {}, defaultSort, searchPlaceholder, getRowId, selectable, onSelectionChange, toolbar, caption, pageSize = 25, testId, emptyText = "Nothing matches.", exportCsv = false }: ServerTableProps<Row>) {
  const [sorting, setSorting] = useState<SortingState>([defaultSort]);
  const [pageIndex, setPageIndex] = useState(0);
  const [searchInput, setSearchInput] = useState("");
  const [search, setSearch] = useState("");
  const [selection, setSelection] = useState<RowSelectionState>({});
  const filterKey = JSON.stringify(filters);

  useEffect(() => {
    const t = setTimeout(() => setSearch(searchInput.trim()), 250);
    return () => clearTimeout(t);
  }, [searchInput]);
  // a new search or filter starts again on page one
  const [lastQuery, setLastQuery] = useState(`${search}|${filterKey}`);
  if (lastQuery !== `${search}|${filterKey}`) {
    setLastQuery(`${search}|${filterKey}`);
    setPageIndex(0);
  }

  const params = useMemo(() => {
    const p = new URLSearchParams();
    p.set("page", String(pageIndex + 1));
    p.set("page_size", String(pageSize));
    if (sorting[0]) {
      p.set("sort", sorting[0].id);
      p.set("dir", sorting[0].desc ? "desc" : "asc");
    }
    if (search) p.set("search", search);
    for (const [k, v] of Object.entries(filters)) if (v) p.set(k, v);
    return p.toString();
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [pageIndex, pageSize, sorting, search, filterKey]);

  const query = useQuery({
    queryKey: [queryKey, params],
    queryFn: ({ signal }) => apiJson<Page<Row>>(`${path}?${params}`, { signal }),
    placeholderData: keepPreviousData,
    refetchInterval: 30_000,
  });
  const data = useMemo(() => query.data?.rows ?? [], [query.data]);
  const total = query.data?.total ?? 0;
  const pageCount = Math.max(1, Math.ceil(total / pageSize));

  // TanStack Table hands back fresh functions each render; the compiler skips this component, as it should.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    data,
    columns,
    getRowId,
    state: { sorting, rowSelection: selection, pagination: { pageIndex, pageSize } },
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    pageCount,
    enableRowSelection: selectable ? (row) => selectable(row.original) : false,
    onSortingChange: (updater) => {
      setSorting((old) => (typeof updater === "function" ? updater(old) : updater));
      setPageIndex(0);
    },
    onRowSelectionChange: setSelection,
    getCoreRowModel: getCoreRowModel(),
  });

  const selectedRows = table.getSelectedRowModel().rows.map((r) => r.original);
  const selectedKey = selectedRows.map(getRowId).join(",");
  useEffect(() => {
    onSelectionChange?.(selectedRows);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [selectedKey]);

  return (
    <div className="rounded-card border border-soot-200 bg-white shadow-card" data-testid={testId}>
      <div className="flex flex-wrap items-center gap-2 border-b border-soot-100 px-3 py-2">
        <label className="flex items-center gap-2 text-sm text-soot-600">
          <span className="sr-only">Search</span>
          <input
            type="search"
            value={searchInput}
            onChange={(e) => setSearchInput(e.target.value)}
            placeholder={searchPlaceholder}
            className="w-64 rounded-md border border-soot-200 px-2.5 py-1.5 text-sm focus:border-clay-500 focus:outline-none"
          />
        </label>
        {toolbar}
        {exportCsv ? (
          <a
            href={`${path}/export?${new URLSearchParams([...new URLSearchParams(params)].filter(([k]) => k !== "page" && k !== "page_size")).toString()}`}
            download
            className="tap-target inline-flex items-center justify-center rounded-md border border-soot-200 px-2.5 py-1.5 text-sm font-semibold text-soot-700 hover:bg-soot-50"
          >
            CSV<span className="sr-only"> of the {caption.toLowerCase()} as filtered</span>
          </a>
        ) : null}
        <span className="ml-auto text-xs text-soot-500" aria-live="polite">
          {query.isFetching ? "Loading… " : ""}
          {total} {total === 1 ? "row" : "rows"}
        </span>
      </div>
      <ScrollRegion label={caption}>
        <table className="w-full text-left text-sm">
          <caption className="sr-only">{caption}</caption>
          <thead className="bg-soot-50 text-xs text-soot-500">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sort = h.column.getIsSorted();
                  return (
                    <th key={h.id} scope="col" className="whitespace-nowrap px-3 py-2 font-semibold" aria-sort={sort ? (sort === "asc" ? "ascending" : "descending") : undefined}>
                      {h.isPlaceholder ? null : h.column.getCanSort() ? (
                        <button type="button" onClick={h.column.getToggleSortingHandler()} className="inline-flex items-center gap-1 hover:text-soot-800">
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden className="text-2xs">{sort === "asc" ? "▲" : sort === "desc" ? "▼" : "↕"}</span>
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
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className={`border-t border-soot-100 align-top ${row.getIsSelected() ? "bg-clay-50" : "hover:bg-soot-50"}`} data-row-id={row.id}>
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-3 py-2">{flexRender(cell.column.columnDef.cell, cell.getContext())}</td>
                ))}
              </tr>
            ))}
            {!query.isLoading && data.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-sm text-soot-500">{emptyText}</td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </ScrollRegion>
      {query.isError ? <p role="alert" className="px-3 py-2 text-sm text-oxide-700">{(query.error as Error).message}</p> : null}
      <div className="flex items-center justify-between gap-2 border-t border-soot-100 px-3 py-2 text-sm">
        <span className="text-soot-500">
          Page {pageIndex + 1} of {pageCount}
        </span>
        <div className="flex gap-1">
          <button type="button" className="rounded border border-soot-200 px-2 py-1 disabled:opacity-40" onClick={() => setPageIndex(0)} disabled={pageIndex === 0}>
            First
          </button>
          <button type="button" className="rounded border border-soot-200 px-2 py-1 disabled:opacity-40" onClick={() => setPageIndex((p) => Math.max(0, p - 1))} disabled={pageIndex === 0}>
            Previous
          </button>
          <button type="button" className="rounded border border-soot-200 px-2 py-1 disabled:opacity-40" onClick={() => setPageIndex((p) => Math.min(pageCount - 1, p + 1))} disabled={pageIndex >= pageCount - 1}>
            Next
          </button>
        </div>
      </div>
    </div>
  );
}
