// The app's one date format, durations, scores and codes in words, and a span's history read as sentences:
// field names in words, values in the viewer's units, no ids, JSON or internal codes.
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, render, screen, waitFor } from '@testing-library/react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { codeWords, date, dateTime, duration, number, percent, score, writtenDateTime } from '../../src/lib/format.ts';
import { actionLabel, describeChanges } from '../../src/lib/history.ts';
import { SpanHistoryList } from '../../src/features/spans/components/span-history-list.tsx';

afterEach(cleanup);

describe('format', () => {
  it('writes every time in one format, in the viewer zone, and plain dates as written', () => {
    const at = new Date(2026, 11, 3, 9, 5);
    expect(dateTime(at.toISOString())).toBe('3 Dec 2026, 09:05');
    expect(date('2026-05-04')).toBe('4 May 2026');
    expect(date(at)).toBe('3 Dec 2026');
    expect(dateTime(null)).toBe('—');
    expect(dateTime('not a time')).toBe('—');
    expect(writtenDateTime('2026-03-01T14:15:00+12:00')).toBe('1 Mar 2026, 14:15 (UTC+12:00)');
    expect(writtenDateTime('2026-05-04T10:11:00', "camera's local time")).toBe("4 May 2026, 10:11 (camera's local time)");
  });

  it('writes minutes as hours and minutes', () => {
    expect(duration(481)).toBe('8 h 1 min');
    expect(duration(45.4)).toBe('45 min');
    expect(duration(120)).toBe('2 h');
    expect(duration(3000)).toBe('2 d 2 h');
    expect(duration(0.3)).toBe('under 1 min');
    expect(duration(Infinity)).toBe('never');
  });

  it('rounds scores, shares and plain numbers for reading', () => {
    expect(score(72.4381)).toBe('72');
    expect(percent(0.8734)).toBe('87 %');
    expect(number(9.4000001)).toBe('9.4');
    expect(number(0.123456)).toBe('0.12');
    expect(number(1234.56)).toBe('1 235');
    expect(number(-0.0001)).toBe('0');
  });

  it('writes internal codes in words', () => {
    expect(codeWords('open-field')).toBe('Open field');
    expect(codeWords('password_reset')).toBe('Password reset');
    expect(codeWords('us')).toBe('US');
    expect(actionLabel('span.approve')).toBe('Approved the span');
    expect(actionLabel('mission.authorise')).toBe('Mission: authorise');
  });
});

describe('describeChanges', () => {
  const metric = { system: 'metric' as const };
  const us = { system: 'us' as const };

  it('labels fields, formats quantities in the chosen units and leaves bookkeeping out', () => {
    const before = { clearanceM: 9.4, status: 'submitted', version: 3, updatedAt: '2026-01-01T00:00:00Z', terrain: 'open-field' };
    const after = { clearanceM: 9.6, status: 'approved', version: 4, updatedAt: '2026-01-02T00:00:00Z', terrain: 'road' };
    expect(describeChanges(before, after, metric)).toEqual([
      { field: 'Clearance at the perch point', before: '9.40 m', after: '9.60 m' },
      { field: 'Status', before: 'Awaiting review', after: 'Approved' },
      { field: 'Terrain', before: 'Open field', after: 'Road' },
    ]);
    // 9.4 m / 0.3048 = 30.84 ft; 9.6 m = 31.50 ft (exact international foot, shared/units.ts).
    expect(describeChanges({ clearanceM: 9.4 }, { clearanceM: 9.6 }, us)).toEqual([{ field: 'Clearance at the perch point', before: '30.8 ft', after: '31.5 ft' }]);
  });

  it('reads nested records field by field and never shows an id', () => {
    const id1 = '0f8fad5b-d9cb-469f-a165-70867728950e';
    const id2 = '7c9e6679-7425-40de-944b-e07fc1f90ae7';
    const rows = describeChanges(
      { lineId: id1, conductor: { codeWord: 'Hawk', diameterMm: 21.79 } },
      { lineId: id2, conductor: { codeWord: 'Dove', diameterMm: 23.55 } },
      { system: 'us', nameOf: (f, id) => (f === 'lineId' && id === id2 ? 'Harrow Vale 69 kV' : undefined) },
    );
    expect(rows).toEqual([
      { field: 'Line', before: 'another line', after: 'Harrow Vale 69 kV' },
      { field: 'Conductor · Code word', before: 'Hawk', after: 'Dove' },
      // 21.79 mm / 25.4 = 0.858 in; 23.55 mm = 0.927 in.
      { field: 'Conductor · Outside diameter', before: '0.858 in', after: '0.927 in' },
    ]);
    const unnamed = describeChanges({ surveyorId: id1 }, { surveyorId: id2 }, metric);
    expect(unnamed).toEqual([{ field: 'Surveyor', before: '', after: 'changed' }]);
  });

  it('says what a zone shape, a photo and a hazard list became', () => {
    const ring = [[0, 0], [1, 0], [1, 1], [0, 1], [0, 0]];
    expect(describeChanges(null, { geometry: { type: 'Polygon', coordinates: [ring] }, severity: 'exclude' }, metric)).toEqual([
      { field: 'Shape', before: '—', after: 'an area with 4 corners' },
      { field: 'Severity', before: '—', after: 'Exclude' },
    ]);
    expect(describeChanges(null, { contentType: 'image/jpeg', bytes: 2_400_000 }, metric)).toEqual([
      { field: 'File type', before: '—', after: 'JPEG image' },
      { field: 'File size', before: '—', after: '2.3 MB' },
    ]);
    const hazards = describeChanges({ hazards: [] }, { hazards: [{ kindId: 'k1', severity: 'high', positionAlongM: 40, note: '' }] }, { system: 'metric', nameOf: () => 'Tree growth' });
    expect(hazards).toEqual([{ field: 'Hazards', before: 'none', after: 'Tree growth (high) at 40.00 m' }]);
  });
});

describe('span history', () => {
  it('shows each entry as who, what, when and the changes in words, with nothing raw', async () => {
    const qc = new QueryClient({ defaultOptions: { queries: { retry: false, staleTime: Infinity } } });
    const id = 'SP1';
    qc.setQueryData(['spans', 'history', id], [
      {
        id: 7, at: '2026-04-02T10:30:00Z', actorId: 'u1', actorName: 'Ines Varga', action: 'span.update', recordType: 'span', recordId: id,
        before: { clearanceM: 9.4, terrain: 'open-field', version: 2, lineId: 'L1', conductor: { diameterMm: 21.79 } },
        after: { clearanceM: 9.6, terrain: 'road', version: 3, lineId: 'L1', conductor: { diameterMm: 23.55 } },
      },
      { id: 8, at: '2026-04-03T10:30:00Z', actorId: 'u2', actorName: 'Tomas Reyl', action: 'span.approve', recordType: 'span', recordId: id, before: { status: 'submitted' }, after: { status: 'approved' } },
    ]);
    qc.setQueryData(['spans', 'detail', id], null);
    qc.setQueryData(['hazard-kinds'], []);
    qc.setQueryData(['lines'], []);
    render(
      <QueryClientProvider client={qc}>
        <SpanHistoryList spanId={id} system="us" />
      </QueryClientProvider>,
    );
    const list = await screen.findByRole('list', { name: 'Span history' });
    await waitFor(() => expect(list.textContent).toContain('Approved the span'));
    const text = list.textContent!;
    expect(text).toContain('Clearance at the perch point30.8 ft→31.5 ft');
    expect(text).toContain('TerrainOpen field→Road');
    expect(text).toContain('StatusAwaiting review→Approved');
    expect(text).toContain('Edited the span');
    expect(text).not.toMatch(/[{}]|\b[a-z]+-[a-z]+\b|\d\.\d{4,}|version|clearanceM|SP1|u1/);
  });
});

describe('coordinates in history', () => {
  it('writes a position with its hemisphere and no trailing zeros', () => {
    expect(describeChanges(null, { base: { lat: -30.08, lon: -130.5 } }, { system: 'metric' })).toEqual([
      { field: 'Base · Latitude', before: '—', after: '30.08° S' },
      { field: 'Base · Longitude', before: '—', after: '130.5° W' },
    ]);
  });
});
