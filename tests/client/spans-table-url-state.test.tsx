// Spans-table state ⇄ URL search params: a shared link reproduces the same view.
import { describe, expect, it } from 'vitest';
import {
  apiQueryFromTableState,
  searchFromTableState,
  tableStateFromSearch,
  withFilters,
} from '../../src/features/spans/table-url-state.ts';

const parse = (s: string) => tableStateFromSearch(new URLSearchParams(s));

describe('spans table state in the URL', () => {
  it('when the URL is empty, then the defaults apply and writing them back gives an empty query', () => {
    const st = parse('');
    expect(st.filters).toEqual({ status: undefined, lineId: undefined, q: undefined, minHarvestW: undefined, minScore: undefined });
    expect(st.sorting).toEqual([{ id: 'updatedAt', desc: true }]);
    expect(st.columnVisibility.label).toBe(true);
    expect(st.columnVisibility.terrain).toBe(false);
    expect(searchFromTableState(st).toString()).toBe('');
  });

  it('when a full view is in the URL, then it is read back and written out identically', () => {
    const url = 'status=approved&lineId=L7&q=HV69&minHarvestW=12.5&minScore=60&sort=-harvestW&cols=label%2Cstatus%2CharvestW%2Cscore';
    const st = parse(url);
    expect(st.filters).toEqual({ status: 'approved', lineId: 'L7', q: 'HV69', minHarvestW: 12.5, minScore: 60 });
    expect(st.sorting).toEqual([{ id: 'harvestW', desc: true }]);
    expect(Object.entries(st.columnVisibility).filter(([, v]) => v).map(([k]) => k)).toEqual(['label', 'status', 'harvestW', 'score']);
    expect(searchFromTableState(st).toString()).toBe(url);
  });

  it('when the URL holds junk, then each bad value falls back to its default instead of failing', () => {
    const st = parse('status=bogus&minHarvestW=-3&minScore=abc&sort=-password&cols=nope');
    expect(st.filters.status).toBeUndefined();
    expect(st.filters.minHarvestW).toBeUndefined();
    expect(st.filters.minScore).toBeUndefined();
    expect(st.sorting).toEqual([{ id: 'updatedAt', desc: true }]);
    expect(st.columnVisibility.label).toBe(true);
  });

  it('when an old link names a page, then it is left out: the table scrolls through every record instead', () => {
    const st = withFilters(parse('page=4&pageSize=50&status=submitted'), { lineId: 'L2' });
    expect(st.filters).toMatchObject({ status: 'submitted', lineId: 'L2' });
    expect(searchFromTableState(st).toString()).toBe('status=submitted&lineId=L2');
  });

  it('when the state becomes an API query, then it carries the filters and one signed sort key (the table asks for its pages)', () => {
    const q = apiQueryFromTableState(parse('status=approved&sort=score&page=2&pageSize=100'));
    expect(q).toEqual({ status: 'approved', lineId: undefined, q: undefined, minHarvestW: undefined, minScore: undefined, sort: 'score' });
  });
});
