// A stale save shows the user's change beside the saved record and merges what they choose.
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, within } from '@testing-library/react';
import type { Span } from '#shared/schemas/inventory.ts';
import { ConflictPanel } from '../../src/features/field/components/conflict-panel.tsx';
import { mergeChoices, savedFromConflict, type ConflictKey } from '../../src/features/field/conflict.ts';
import { spanToFormValues } from '../../src/features/field/form-values.ts';
import { StatusBadge } from '../../src/features/spans/components/status-badge.tsx';

afterEach(cleanup);

const saved: Span = {
  id: 'SP1',
  lineId: 'L1',
  lineName: 'North 69',
  fromStructureId: 'S1',
  toStructureId: 'S2',
  fromStructureLabel: 'N-001',
  toStructureLabel: 'N-002',
  status: 'draft',
  version: 5,
  lengthM: 120,
  conductor: { codeWord: 'Hawk', size: '477 kcmil', material: 'ACSR', diameterMm: 21.79, resistanceLowOhmPerM: null, tempLowC: null, resistanceHighOhmPerM: null, tempHighC: null, source: 'catalogue' },
  phasePosition: null,
  clearanceM: 10,
  lowestClearanceM: 8,
  lowestClearanceAlongM: 55,
  terrain: 'open-field',
  loadCurrentA: 300,
  loadCurrentSource: 'line',
  hazards: [],
  photoIds: [],
  surveyDate: '2026-05-01',
  surveyorId: 'U1',
  returnReason: null,
  suspendReason: null,
  submittedAt: null,
  approvedAt: null,
  approvedById: null,
  assessment: null,
  createdAt: '2026-05-01T08:00:00Z',
  updatedAt: '2026-05-01T09:00:00Z',
};
const lookups = { structures: [{ id: 'S1', label: 'N-001' }, { id: 'S2', label: 'N-002' }], hazardKinds: [{ id: 'public-access', label: 'Public access' }] };

describe('version conflict', () => {
  const mine = { ...spanToFormValues(saved, 'metric'), clearance: '11.5', terrain: 'road' as const, hazards: [{ kindId: 'public-access', severity: 'medium' as const, positionAlong: '', note: 'footpath' }] };
  // What someone else saved meanwhile: a new lowest clearance.
  const theirs: Span = { ...saved, version: 6, lowestClearanceM: 7.5 };

  it('when the panel opens, then only the differing fields are listed, each with both readings', () => {
    render(<ConflictPanel mine={mine} saved={theirs} unitSystem="metric" lookups={lookups} busy={false} onResolve={() => undefined} />);
    const rows = screen.getAllByRole('row').slice(1);
    expect(rows.map((r) => r.getAttribute('data-conflict-field'))).toEqual(['clearance', 'lowestClearance', 'terrain', 'hazards']);
    const clearance = rows[0];
    expect(within(clearance).getByText('11.5 m')).toBeTruthy();
    expect(within(clearance).getByText('10 m')).toBeTruthy();
    expect(within(rows[3]).getByText('Public access (medium) — footpath')).toBeTruthy();
    expect(within(rows[3]).getByText('none')).toBeTruthy();
    expect(screen.getByRole('button', { name: 'Save my choices on version 6' })).toBeTruthy();
  });

  it('when the user keeps the saved lowest clearance and their other changes, then the merge has exactly that', () => {
    const onResolve = vi.fn();
    render(<ConflictPanel mine={mine} saved={theirs} unitSystem="metric" lookups={lookups} busy={false} onResolve={onResolve} />);
    fireEvent.click(screen.getByLabelText(/Lowest clearance: keep saved/));
    fireEvent.click(screen.getByRole('button', { name: 'Save my choices on version 6' }));
    const [keys, save] = onResolve.mock.calls[0] as [Set<ConflictKey>, boolean];
    expect(save).toBe(true);
    expect([...keys].sort()).toEqual(['clearance', 'hazards', 'terrain']);
    const merged = mergeChoices(mine, theirs, 'metric', keys);
    expect(merged).toMatchObject({ clearance: '11.5', lowestClearance: '7.5', terrain: 'road' });
    expect(merged.hazards).toHaveLength(1);
  });

  it('when the panel knows where the user started, then fields only the other person changed default to the saved reading', () => {
    const onResolve = vi.fn();
    render(<ConflictPanel mine={mine} base={spanToFormValues(saved, 'metric')} saved={theirs} unitSystem="metric" lookups={lookups} busy={false} onResolve={onResolve} />);
    const lowest = screen.getAllByRole('row').find((r) => r.getAttribute('data-conflict-field') === 'lowestClearance')!;
    expect(within(lowest).getByText('changed by someone else')).toBeTruthy();
    expect((screen.getByLabelText(/Lowest clearance: keep saved/) as HTMLInputElement).checked).toBe(true);
    expect((screen.getByLabelText(/Clearance at the perch point: keep mine/) as HTMLInputElement).checked).toBe(true);
    fireEvent.click(screen.getByRole('button', { name: 'Save my choices on version 6' }));
    const [keys] = onResolve.mock.calls[0] as [Set<ConflictKey>, boolean];
    expect([...keys].sort()).toEqual(['clearance', 'hazards', 'terrain']);
  });

  it('when the user keeps the saved record, then nothing of theirs is applied', () => {
    const onResolve = vi.fn();
    render(<ConflictPanel mine={mine} saved={theirs} unitSystem="metric" lookups={lookups} busy={false} onResolve={onResolve} />);
    fireEvent.click(screen.getByRole('button', { name: 'Keep the saved record' }));
    const [keys, save] = onResolve.mock.calls[0] as [Set<ConflictKey>, boolean];
    expect(save).toBe(false);
    expect(mergeChoices(mine, theirs, 'metric', keys)).toEqual(spanToFormValues(theirs, 'metric'));
  });

  it('reads the saved record from a 409 body, and nothing from other bodies', () => {
    expect(savedFromConflict({ error: { code: 'conflict', message: 'stale', current: theirs } })?.version).toBe(6);
    expect(savedFromConflict({ error: { code: 'conflict', message: 'state' } })).toBeNull();
    expect(savedFromConflict(null)).toBeNull();
  });
});

describe('status badge', () => {
  it('shows the product wording with a glyph, not colour alone', () => {
    render(<StatusBadge status="returned" />);
    const badge = screen.getByText('Sent back').closest('[data-status]')!;
    expect(badge.getAttribute('data-status')).toBe('returned');
    expect(badge.textContent).toBe('↩Sent back');
  });
});
