// Spans-table state ⇄ URL search params, so a view (filters, sort, columns) can be shared as a link. The table
// scrolls through every matching record, so there is no page to keep (an old link's `page` is ignored).
// Pure functions: the table page reads the URL, renders from it, and writes every change back to it.
import type { ColumnSort, SortingState, VisibilityState } from '@tanstack/react-table';
import { isSpanStatus, type SpanStatus } from './status.ts';

export interface SpanFilters {
  status?: SpanStatus;
  lineId?: string;
  q?: string;
  minHarvestW?: number;
  minScore?: number;
}

export interface SpansTableState {
  filters: SpanFilters;
  sorting: SortingState;
  columnVisibility: VisibilityState;
}

export const DEFAULT_SORTING: SortingState = [{ id: 'updatedAt', desc: true }];

/** Columns the table can show; `defaultVisible` ones show when the URL names none. */
export const SPAN_COLUMNS = [
  // Harvest and score right after the status: on a tablet they are what a reader looks for first.
  { id: 'label', title: 'Span', defaultVisible: true, sortable: false },
  { id: 'status', title: 'Status', defaultVisible: true, sortable: true },
  { id: 'harvestW', title: 'Harvest', defaultVisible: true, sortable: true },
  { id: 'score', title: 'Score', defaultVisible: true, sortable: true },
  { id: 'clearanceM', title: 'Clearance', defaultVisible: true, sortable: true },
  { id: 'lengthM', title: 'Length', defaultVisible: true, sortable: true },
  { id: 'line', title: 'Line', defaultVisible: true, sortable: true },
  { id: 'conductor', title: 'Conductor', defaultVisible: true, sortable: false },
  { id: 'loadCurrentA', title: 'Load', defaultVisible: false, sortable: true },
  { id: 'terrain', title: 'Terrain', defaultVisible: false, sortable: false },
  { id: 'hazards', title: 'Hazards', defaultVisible: false, sortable: false },
  { id: 'surveyDate', title: 'Surveyed', defaultVisible: false, sortable: true },
  { id: 'updatedAt', title: 'Updated', defaultVisible: true, sortable: true },
] as const;
/** Default columns left out below 1024 px (the 820 px tablet) unless the reader chose columns: the line is in the filters, the conductor and update time on the span page. */
export const WIDE_ONLY_COLUMNS: ReadonlySet<string> = new Set(['line', 'conductor', 'updatedAt']);
export type SpanColumnId = (typeof SPAN_COLUMNS)[number]['id'];
const COLUMN_IDS = new Set<string>(SPAN_COLUMNS.map((c) => c.id));
const SORTABLE_IDS = new Set<string>(SPAN_COLUMNS.filter((c) => c.sortable).map((c) => c.id));

function defaultVisibility(): VisibilityState {
  return Object.fromEntries(SPAN_COLUMNS.map((c) => [c.id, c.defaultVisible]));
}

function positiveNumber(raw: string | null): number | undefined {
  if (raw === null || raw.trim() === '') return undefined;
  const n = Number(raw);
  return Number.isFinite(n) && n >= 0 ? n : undefined;
}

function text(raw: string | null): string | undefined {
  const t = raw?.trim();
  return t ? t.slice(0, 200) : undefined;
}

/** `sort=-score` → [{id:'score',desc:true}]. The API sorts by one key, so only one column sorts at a time; unknown keys fall back to the default. */
export function parseSort(raw: string | null): SortingState {
  if (!raw) return DEFAULT_SORTING;
  const desc = raw.startsWith('-');
  const id = desc ? raw.slice(1) : raw;
  const sort: ColumnSort = { id, desc };
  return SORTABLE_IDS.has(id) ? [sort] : DEFAULT_SORTING;
}

export function formatSort(sorting: SortingState): string {
  const first = sorting[0];
  return first ? `${first.desc ? '-' : ''}${first.id}` : '';
}

/** Reads table state from the URL; anything invalid falls back to its default rather than failing. */
export function tableStateFromSearch(params: URLSearchParams): SpansTableState {
  const status = params.get('status');
  const columnVisibility = defaultVisibility();
  const cols = params.get('cols');
  if (cols !== null) {
    const shown = new Set(cols.split(',').filter((c) => COLUMN_IDS.has(c)));
    if (shown.size) for (const id of Object.keys(columnVisibility)) columnVisibility[id] = shown.has(id);
  }
  return {
    filters: {
      status: status && isSpanStatus(status) ? status : undefined,
      lineId: text(params.get('lineId')),
      q: text(params.get('q')),
      minHarvestW: positiveNumber(params.get('minHarvestW')),
      minScore: positiveNumber(params.get('minScore')),
    },
    sorting: parseSort(params.get('sort')),
    columnVisibility,
  };
}

/** Writes table state to URL params, leaving out defaults so links stay short. */
export function searchFromTableState(state: SpansTableState): URLSearchParams {
  const p = new URLSearchParams();
  const f = state.filters;
  if (f.status) p.set('status', f.status);
  if (f.lineId) p.set('lineId', f.lineId);
  if (f.q) p.set('q', f.q);
  if (f.minHarvestW !== undefined) p.set('minHarvestW', String(f.minHarvestW));
  if (f.minScore !== undefined) p.set('minScore', String(f.minScore));
  const sort = formatSort(state.sorting);
  if (sort && sort !== formatSort(DEFAULT_SORTING)) p.set('sort', sort);
  const defaults = defaultVisibility();
  const visible = SPAN_COLUMNS.filter((c) => state.columnVisibility[c.id] ?? defaults[c.id]).map((c) => c.id);
  const defaultVisible = SPAN_COLUMNS.filter((c) => c.defaultVisible).map((c) => c.id);
  if (visible.join(',') !== defaultVisible.join(',')) p.set('cols', visible.join(','));
  return p;
}

/** The list query the API takes (GET /api/spans): filters and sort; the table asks for its pages itself. */
export function apiQueryFromTableState(state: SpansTableState): Omit<SpanListQuery, 'page' | 'pageSize'> {
  return { ...state.filters, sort: formatSort(state.sorting) || undefined };
}

export interface SpanListQuery extends SpanFilters {
  sort?: string;
  page?: number;
  pageSize?: number;
  surveyorId?: string;
  /** Only spans that pass every blocking gate for at least one active pair (what planners may be offered). */
  perchable?: boolean;
}

/** A filter change: the table starts again at its first row. */
export function withFilters(state: SpansTableState, patch: Partial<SpanFilters>): SpansTableState {
  return { ...state, filters: { ...state.filters, ...patch } };
}
