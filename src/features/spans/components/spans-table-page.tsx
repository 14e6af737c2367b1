// The spans table for every role: server-side filters and sort; the whole view lives in the URL. Every matching
// record is reachable by scrolling: pages load as the reader nears the end, and only the rows on screen (and a few
// around them) are in the page, so a table of thousands scrolls like one of ten.
import { useEffect, useLayoutEffect, useMemo, useRef, useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import { useInfiniteQuery, useQuery } from '@tanstack/react-query';
import { useWindowVirtualizer } from '@tanstack/react-virtual';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  useReactTable,
  type OnChangeFn,
  type SortingState,
  type VisibilityState,
} from '@tanstack/react-table';
import { TERRAIN_LABELS, type Span } from '#shared/schemas/inventory.ts';
import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import { useMe } from '../../auth/queries.ts';
import { spanApi } from '../api.ts';
import { inventoryQueries, spanQueries } from '../queries.ts';
import { SPAN_STATUSES, SPAN_STATUS_LOOK, isSpanStatus } from '../status.ts';
import {
  apiQueryFromTableState,
  searchFromTableState,
  SPAN_COLUMNS,
  tableStateFromSearch,
  WIDE_ONLY_COLUMNS,
  withFilters,
  type SpanFilters,
  type SpansTableState,
} from '../table-url-state.ts';
import { StatusBadge } from './status-badge.tsx';
import { count, date, dateTime, score } from '../../../lib/format.ts';

const col = createColumnHelper<Span>();
/** Spans fetched per page as the reader scrolls; rows before the end of what is loaded at which the next page is asked for. */
const TABLE_PAGE = 200;
const LOAD_AHEAD = 40;

function conductorText(s: Span, system: UnitSystem) {
  const c = s.conductor;
  if (!c) return '—';
  const name = c.codeWord ?? c.size ?? 'custom';
  return c.diameterMm ? `${name} · ${formatQuantity(c.diameterMm, 'diameter', system)}` : name;
}

function buildColumns(system: UnitSystem) {
  const title = (id: string) => SPAN_COLUMNS.find((c) => c.id === id)!.title;
  return [
    col.display({
      id: 'label',
      header: title('label'),
      cell: ({ row }) => (
        <Link to={`/spans/${row.original.id}`} className="font-semibold text-ink-900 underline decoration-ink-300 underline-offset-2 hover:decoration-ink-900">
          {row.original.fromStructureLabel} → {row.original.toStructureLabel}
        </Link>
      ),
    }),
    col.accessor('status', { header: title('status'), cell: (c) => <StatusBadge status={c.getValue()} /> }),
    col.accessor((s) => s.assessment?.harvestW ?? null, { id: 'harvestW', header: title('harvestW'), cell: (c) => formatQuantity(c.getValue(), 'power', system), meta: { numeric: true } }),
    col.accessor((s) => s.assessment?.score ?? null, {
      id: 'score',
      header: title('score'),
      cell: (c) => {
        const a = c.row.original.assessment;
        if (!a) return '—';
        return (
          <span title={a.perchable ? 'Passes every gate' : 'Fails a gate: not perchable'}>
            {score(a.score)}
            {!a.perchable && <span className="ml-1 text-alarm" aria-label="not perchable">✕</span>}
          </span>
        );
      },
      meta: { numeric: true },
    }),
    col.accessor('clearanceM', { header: title('clearanceM'), cell: (c) => formatQuantity(c.getValue(), 'length', system), meta: { numeric: true } }),
    col.accessor('lengthM', { header: title('lengthM'), cell: (c) => formatQuantity(c.getValue(), 'length', system), meta: { numeric: true } }),
    col.accessor('lineName', { id: 'line', header: title('line') }),
    col.display({ id: 'conductor', header: title('conductor'), cell: ({ row }) => conductorText(row.original, system) }),
    col.accessor('loadCurrentA', {
      header: title('loadCurrentA'),
      cell: (c) => `${formatQuantity(c.getValue(), 'current', system)}${c.row.original.loadCurrentSource === 'line' ? ' (line)' : ''}`,
      meta: { numeric: true },
    }),
    col.accessor('terrain', { header: title('terrain'), cell: (c) => (c.getValue() ? TERRAIN_LABELS[c.getValue()!] : '—') }),
    col.display({ id: 'hazards', header: title('hazards'), cell: ({ row }) => row.original.hazards.length, meta: { numeric: true } }),
    col.accessor('surveyDate', { header: title('surveyDate'), cell: (c) => date(c.getValue()) }),
    col.accessor('updatedAt', { header: title('updatedAt'), cell: (c) => dateTime(c.getValue()) }),
  ];
}

export function SpansTablePage() {
  const me = useMe();
  const [params, setParams] = useSearchParams();
  const state = useMemo(() => tableStateFromSearch(params), [params]);
  // The URL updates a moment after a change (the navigation settles first), so quick successive changes
  // (a status pick, then typing) build on the latest requested state, not on the last rendered one.
  const latest = useRef(state);
  const seenParams = useRef(params);
  if (seenParams.current !== params) {
    seenParams.current = params;
    latest.current = state;
  }
  const setState = (update: (s: SpansTableState) => SpansTableState) => {
    latest.current = update(latest.current);
    setParams(searchFromTableState(latest.current));
  };
  const query = apiQueryFromTableState(state);
  const spans = useInfiniteQuery(spanQueries.pages(query, TABLE_PAGE));
  const lines = useQuery(inventoryQueries.lines());
  const columns = useMemo(() => buildColumns(me.unitSystem), [me.unitSystem]);
  const total = spans.data?.pages[0]?.total ?? 0;
  const data = useMemo(() => spans.data?.pages.flatMap((p) => p.items) ?? [], [spans.data]);

  const onSortingChange: OnChangeFn<SortingState> = (u) =>
    setState((s) => ({ ...s, sorting: typeof u === 'function' ? u(s.sorting) : u }));
  const onColumnVisibilityChange: OnChangeFn<VisibilityState> = (u) =>
    setState((s) => ({ ...s, columnVisibility: typeof u === 'function' ? u(s.columnVisibility) : u }));

  const table = useReactTable({
    data,
    columns,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (s) => s.id,
    manualSorting: true,
    manualFiltering: true,
    enableMultiSort: false,
    enableSortingRemoval: false,
    rowCount: total,
    state: { sorting: state.sorting, columnVisibility: state.columnVisibility },
    onSortingChange,
    onColumnVisibilityChange,
  });
  // Columns the reader did not choose: below 1024 px the wide-only ones step aside so harvest and score fit.
  const chosen = params.has('cols');
  const narrowHidden = (id: string) => (!chosen && WIDE_ONLY_COLUMNS.has(id) ? 'hidden lg:table-cell' : '');
  const sortable = new Set<string>(SPAN_COLUMNS.filter((c) => c.sortable).map((c) => c.id));
  const setFilters = (patch: Partial<SpanFilters>) => setState((s) => withFilters(s, patch));

  // Rows are windowed against the page's own scroll (the header and filters scroll away above them).
  const rows = table.getRowModel().rows;
  const visibleCount = table.getVisibleLeafColumns().length;
  const bodyRef = useRef<HTMLTableSectionElement>(null);
  const [margin, setMargin] = useState(0);
  useLayoutEffect(() => setMargin((bodyRef.current?.getBoundingClientRect().top ?? 0) + window.scrollY), [spans.isPending, !!spans.error, visibleCount]);
  const virtualizer = useWindowVirtualizer({ count: rows.length, estimateSize: () => 45, overscan: 12, scrollMargin: margin, getItemKey: (i) => rows[i]?.id ?? i });
  const virtualRows = virtualizer.getVirtualItems();
  // Offsets are measured from the top of the table's body.
  const offset = virtualizer.options.scrollMargin ?? 0;
  const padTop = virtualRows.length ? Math.max(0, virtualRows[0]!.start - offset) : 0;
  const padBottom = virtualRows.length ? Math.max(0, virtualizer.getTotalSize() - (virtualRows[virtualRows.length - 1]!.end - offset)) : 0;
  const lastShown = virtualRows.length ? virtualRows[virtualRows.length - 1]!.index : -1;
  // Near the end of what is loaded: the next page.
  useEffect(() => {
    if (spans.hasNextPage && !spans.isFetchingNextPage && lastShown >= rows.length - LOAD_AHEAD) void spans.fetchNextPage();
  }, [lastShown, rows.length, spans]);

  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="page-title">Spans</h1>
          <p className="text-ink-700">Every span of the inventory. Filters, sort, page and columns are kept in the address: copy it to share this view.</p>
        </div>
        <ExportButtons filters={state.filters} />
      </header>

      <Filters filters={state.filters} lines={lines.data ?? []} onChange={setFilters} />

      <div className="flex flex-wrap items-center justify-between gap-3">
        <p className="text-sm text-ink-700" role="status" aria-live="polite">
          {spans.isPending ? 'Loading spans…' : `${count(total)} span${total === 1 ? '' : 's'} match`}
          {!spans.isPending && total > data.length ? ` · ${count(data.length)} loaded, more as you scroll` : ''}
          {spans.isFetching && !spans.isPending ? ' · updating…' : ''}
        </p>
        <ColumnChooser table={table} />
      </div>

      {spans.error && (
        <p className="field-error" role="alert">
          The spans did not load: {spans.error.message}
        </p>
      )}

      <div className="card overflow-x-auto p-0">
        <table className="w-full border-collapse text-left text-sm" aria-label="Spans" aria-rowcount={total + 1}>
          <thead className="bg-ink-50">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  const numeric = (h.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                  return (
                    <th
                      key={h.id}
                      scope="col"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                      className={`border-b border-ink-200 px-3 py-2 font-semibold ${numeric ? 'text-right' : ''} ${narrowHidden(h.column.id)}`}
                    >
                      {sortable.has(h.column.id) ? (
                        <button type="button" className="inline-flex min-h-11 items-center gap-1 hover:underline" onClick={h.column.getToggleSortingHandler()}>
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden="true" className="text-ink-500">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}</span>
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
          <tbody ref={bodyRef}>
            {padTop > 0 && (
              <tr aria-hidden="true">
                <td colSpan={visibleCount} style={{ height: padTop, padding: 0 }} />
              </tr>
            )}
            {virtualRows.map((v) => {
              const row = rows[v.index]!;
              return (
                <tr key={row.id} ref={virtualizer.measureElement} data-index={v.index} aria-rowindex={v.index + 2} className="border-b border-ink-100 hover:bg-ink-50" data-span-id={row.id}>
                  {row.getVisibleCells().map((cell) => {
                    const numeric = (cell.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                    return (
                      <td key={cell.id} className={`whitespace-nowrap px-3 py-2 ${numeric ? 'text-right tabular-nums' : ''} ${narrowHidden(cell.column.id)}`}>
                        {flexRender(cell.column.columnDef.cell, cell.getContext())}
                      </td>
                    );
                  })}
                </tr>
              );
            })}
            {padBottom > 0 && (
              <tr aria-hidden="true">
                <td colSpan={visibleCount} style={{ height: padBottom, padding: 0 }} />
              </tr>
            )}
            {spans.hasNextPage && (
              <tr>
                <td colSpan={visibleCount} className="px-3 py-3 text-center text-ink-700" data-testid="spans-loading-more">
                  {spans.isFetchingNextPage ? 'Loading more spans…' : `Scroll on for more (${count(data.length)} of ${count(total)} shown so far)`}
                </td>
              </tr>
            )}
            {spans.data && total === 0 && (
              <tr>
                <td colSpan={visibleCount} className="px-3 py-6 text-center text-ink-700">
                  No span matches these filters.
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>

    </div>
  );
}

function Filters({ filters, lines, onChange }: { filters: SpanFilters; lines: { id: string; name: string; voltageKv: number }[]; onChange: (p: Partial<SpanFilters>) => void }) {
  // Text filters wait for a pause in typing before they reach the URL (and the server).
  const [q, setQ] = useState(filters.q ?? '');
  const [minHarvest, setMinHarvest] = useState(filters.minHarvestW?.toString() ?? '');
  const [minScore, setMinScore] = useState(filters.minScore?.toString() ?? '');
  useEffect(() => setQ(filters.q ?? ''), [filters.q]);
  useEffect(() => setMinHarvest(filters.minHarvestW?.toString() ?? ''), [filters.minHarvestW]);
  useEffect(() => setMinScore(filters.minScore?.toString() ?? ''), [filters.minScore]);
  useEffect(() => {
    const t = setTimeout(() => {
      const patch: Partial<SpanFilters> = {};
      if ((filters.q ?? '') !== q.trim()) patch.q = q.trim() || undefined;
      const h = minHarvest.trim() === '' ? undefined : Number(minHarvest);
      if (h === undefined || (Number.isFinite(h) && h >= 0)) if (h !== filters.minHarvestW) patch.minHarvestW = h;
      const s = minScore.trim() === '' ? undefined : Number(minScore);
      if (s === undefined || (Number.isFinite(s) && s >= 0)) if (s !== filters.minScore) patch.minScore = s;
      if (Object.keys(patch).length) onChange(patch);
    }, 350);
    return () => clearTimeout(t);
  }, [q, minHarvest, minScore]); // eslint-disable-line react-hooks/exhaustive-deps

  return (
    <form className="card grid gap-3 sm:grid-cols-2 lg:grid-cols-5" role="search" aria-label="Filter spans" onSubmit={(e) => e.preventDefault()}>
      <div>
        <label className="field-label" htmlFor="f-status">Status</label>
        <select id="f-status" className="field-input" value={filters.status ?? ''} onChange={(e) => onChange({ status: isSpanStatus(e.target.value) ? e.target.value : undefined })}>
          <option value="">Any status</option>
          {SPAN_STATUSES.map((s) => (
            <option key={s} value={s}>{SPAN_STATUS_LOOK[s].label}</option>
          ))}
        </select>
      </div>
      <div>
        <label className="field-label" htmlFor="f-line">Line</label>
        <select id="f-line" className="field-input" value={filters.lineId ?? ''} onChange={(e) => onChange({ lineId: e.target.value || undefined })}>
          <option value="">Any line</option>
          {lines.map((l) => (
            <option key={l.id} value={l.id}>{l.name} ({l.voltageKv} kV)</option>
          ))}
        </select>
      </div>
      <div>
        <label className="field-label" htmlFor="f-q">Search</label>
        <input id="f-q" type="search" className="field-input" placeholder="Structure, conductor, note…" value={q} onChange={(e) => setQ(e.target.value)} />
      </div>
      <div>
        <label className="field-label" htmlFor="f-harvest">Min. harvest (W)</label>
        <input id="f-harvest" inputMode="decimal" className="field-input" value={minHarvest} onChange={(e) => setMinHarvest(e.target.value)} />
      </div>
      <div>
        <label className="field-label" htmlFor="f-score">Min. score (0–100)</label>
        <input id="f-score" inputMode="numeric" className="field-input" value={minScore} onChange={(e) => setMinScore(e.target.value)} />
      </div>
    </form>
  );
}

function ColumnChooser({ table }: { table: ReturnType<typeof useReactTable<Span>> }) {
  return (
    <details className="relative">
      <summary className="btn-ghost cursor-pointer list-none">Columns</summary>
      <fieldset className="card absolute right-0 z-10 mt-2 w-56 space-y-1">
        <legend className="sr-only">Columns shown</legend>
        {table.getAllLeafColumns().map((c) => {
          const meta = SPAN_COLUMNS.find((x) => x.id === c.id);
          return (
            <label key={c.id} className="flex min-h-9 items-center gap-2">
              <input type="checkbox" checked={c.getIsVisible()} onChange={c.getToggleVisibilityHandler()} disabled={c.id === 'label'} />
              {meta?.title ?? c.id}
            </label>
          );
        })}
      </fieldset>
    </details>
  );
}

function ExportButtons({ filters }: { filters: SpanFilters }) {
  const formats = [
    { id: 'geojson', label: 'GeoJSON' },
    { id: 'csv', label: 'CSV' },
    { id: 'kml', label: 'KML' },
  ] as const;
  return (
    <div className="flex flex-wrap items-center gap-2" role="group" aria-label="Export the filtered spans">
      <span className="text-sm font-semibold text-ink-700">Export:</span>
      {formats.map((f) => (
        <a key={f.id} className="btn-ghost" href={spanApi.exportUrl(f.id, filters)} download>
          {f.label}
        </a>
      ))}
    </div>
  );
}
