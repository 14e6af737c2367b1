// Small inventories built through the API for the inventory tests.
import type { Client } from './helpers.ts';

export const LINE_69 = {
  name: 'Test Ridge 69 kV',
  owner: 'Harrow Vale Power Cooperative',
  voltageKv: 69,
  frequencyHz: 60,
  phases: 3,
  loadTypicalA: 320,
  loadMinA: 140,
  loadPeakA: 520,
};

/** A line with `n` structures about 200 m apart going east, and spans joining neighbours (drafts, complete for submit). */
export async function buildLine(surveyor: Client, n = 4, line: Partial<typeof LINE_69> = {}) {
  const l = await surveyor.post('/api/lines', { ...LINE_69, ...line });
  if (l.status !== 201) throw new Error(`line: ${l.status} ${JSON.stringify(l.body)}`);
  const structures: any[] = [];
  for (let i = 0; i < n; i++) {
    const r = await surveyor.post('/api/structures', { lineId: l.body.id, lat: -30.2, lon: -130.3 + i * 0.002, kind: 'pole', attachmentHeightM: 14 });
    if (r.status !== 201) throw new Error(`structure: ${r.status} ${JSON.stringify(r.body)}`);
    structures.push(r.body);
  }
  const spans: any[] = [];
  for (let i = 1; i < n; i++) {
    const r = await surveyor.post('/api/spans', completeSpan(l.body.id, structures[i - 1].id, structures[i].id));
    if (r.status !== 201) throw new Error(`span: ${r.status} ${JSON.stringify(r.body)}`);
    spans.push(r.body);
  }
  return { line: l.body, structures, spans };
}

export function completeSpan(lineId: string, fromStructureId: string, toStructureId: string) {
  return {
    lineId,
    fromStructureId,
    toStructureId,
    conductor: { codeWord: 'Hawk' },
    clearanceM: 9.5,
    lowestClearanceM: 8.9,
    terrain: 'open-field',
    surveyDate: '2026-11-20',
    hazards: [{ kindId: 'vegetation-encroachment', severity: 'medium', positionAlongM: 40, note: 'Gum trees on the north side' }],
  };
}
