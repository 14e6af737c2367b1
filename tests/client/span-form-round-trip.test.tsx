// Reopening a saved span shows every stored value, even when the catalogues answer after the form is drawn,
// and saving it again sends back exactly what was stored.
import { afterEach, describe, expect, it, vi } from 'vitest';
import { act, cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { createMemoryRouter, RouterProvider } from 'react-router';
import type { Span } from '#shared/schemas/inventory.ts';
import { SpanFormPage } from '../../src/features/field/span-form-page.tsx';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  window.localStorage.clear();
});

const stored: Span = {
  id: 'SP1',
  lineId: 'L1',
  lineName: 'Wendle Row 69 kV',
  fromStructureId: 'S1',
  toStructureId: 'S2',
  fromStructureLabel: 'KR-001',
  toStructureLabel: 'KR-002',
  status: 'draft',
  version: 4,
  lengthM: 180,
  conductor: { codeWord: 'Hawk', size: '477 kcmil 26/7', material: 'ACSR', diameterMm: 21.79, resistanceLowOhmPerM: null, tempLowC: null, resistanceHighOhmPerM: null, tempHighC: null, source: 'catalogue' },
  phasePosition: 'B (middle)',
  clearanceM: 9.6,
  lowestClearanceM: 9.1,
  lowestClearanceAlongM: 84,
  terrain: 'road',
  loadCurrentA: 410,
  loadCurrentSource: 'span',
  hazards: [{ id: 'H1', kindId: 'road-crossing', severity: 'high', positionAlongM: 40, note: 'County road' } as Span['hazards'][number]],
  photoIds: [],
  surveyDate: '2026-11-02',
  surveyorId: 'U1',
  returnReason: null,
  suspendReason: null,
  submittedAt: null,
  approvedAt: null,
  approvedById: null,
  assessment: null,
  createdAt: '2026-11-02T08:00:00Z',
  updatedAt: '2026-11-02T09:00:00Z',
};
const me = { id: 'U1', email: 'surveyor@roostline.test', name: 'Ada Surveyor', roles: ['surveyor'], unitSystem: 'metric' };
const line = { id: 'L1', name: 'Wendle Row 69 kV', owner: 'Harrow Vale Power Cooperative', voltageKv: 69, frequencyHz: 60, phases: 3, loadTypicalA: 320, loadMinA: 100, loadPeakA: 500, loadProfileA: null, version: 1 };
const structures = [
  { id: 'S1', lineId: 'L1', lat: -30, lon: -130, kind: 'pole', label: 'KR-001', attachmentHeightM: 14, version: 1, createdAt: '', updatedAt: '' },
  { id: 'S2', lineId: 'L1', lat: -30, lon: -129.998, kind: 'pole', label: 'KR-002', attachmentHeightM: 14, version: 1, createdAt: '', updatedAt: '' },
];
const conductors = [
  { codeWord: 'Penguin', size: '4/0 AWG', stranding: '6/1', material: 'ACSR', diameterMm: 14.3, resistanceDc20OhmPerM: 0, resistanceAc25OhmPerM: 0, resistanceAc75OhmPerM: 0, weightKgPerM: null },
  { codeWord: 'Hawk', size: '477 kcmil', stranding: '26/7', material: 'ACSR', diameterMm: 21.79, resistanceDc20OhmPerM: 0, resistanceAc25OhmPerM: 0, resistanceAc75OhmPerM: 0, weightKgPerM: null },
];
const hazardKinds = [
  { id: 'vegetation-encroachment', label: 'Vegetation encroachment', defaultSeverity: 'medium', active: true },
  { id: 'road-crossing', label: 'Road crossing', defaultSeverity: 'medium', active: true },
];

/** The API as the form sees it; the catalogues answer only when `release()` is called (a slow tablet link). */
function fakeApi() {
  const bodies: { method: string; url: string; body: unknown }[] = [];
  let release!: () => void;
  const late = new Promise<void>((r) => (release = r));
  const answer = (data: unknown) => ({ ok: true, status: 200, json: async () => data });
  vi.stubGlobal('fetch', async (url: string, init?: RequestInit) => {
    const method = init?.method ?? 'GET';
    const body = init?.body ? JSON.parse(String(init.body)) : undefined;
    bodies.push({ method, url, body });
    if (method === 'PATCH') return answer({ ...stored, version: stored.version + 1 });
    if (url === '/api/spans/SP1') return answer(stored);
    if (url === '/api/lines') return answer({ items: [line] });
    if (url.startsWith('/api/structures')) return answer({ items: structures });
    if (url === '/api/conductors') return late.then(() => answer({ items: conductors }));
    if (url === '/api/hazard-kinds') return late.then(() => answer({ items: hazardKinds }));
    return { ok: false, status: 404, json: async () => ({ error: { code: 'not_found', message: 'Not found' } }) };
  });
  return { bodies, release };
}

function renderForm(seed?: (qc: QueryClient) => void) {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false, staleTime: 30_000 } } });
  qc.setQueryData(['me'], me);
  seed?.(qc);
  const router = createMemoryRouter([{ path: '/field/spans/:id/edit', element: <SpanFormPage /> }, { path: '/field', element: <p>queue</p> }], {
    initialEntries: ['/field/spans/SP1/edit'],
  });
  render(
    <QueryClientProvider client={qc}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
}

const selected = (el: HTMLElement) => {
  const s = el as HTMLSelectElement;
  return s.options[s.selectedIndex]?.textContent;
};

describe('span form round trip', () => {
  it('when the catalogues load after the form (and the surveyor tabs through it), then every stored value shows and a save sends it back unchanged', async () => {
    const api = fakeApi();
    renderForm();
    const codeWord = await screen.findByLabelText('Code word');
    const kind = screen.getByLabelText('Kind');
    // Tabbing through before the catalogues arrive must not replace the stored choice with the placeholder.
    fireEvent.focus(codeWord);
    fireEvent.blur(codeWord);
    fireEvent.focus(kind);
    fireEvent.blur(kind);
    await act(async () => api.release());
    await waitFor(() => expect(selected(screen.getByLabelText('Code word'))).toBe('Hawk — 477 kcmil 26/7'));
    expect(selected(screen.getByLabelText('Kind'))).toBe('Road crossing');

    expect(screen.getByTestId('line-fixed').textContent).toBe('Wendle Row 69 kV (69 kV)');
    await waitFor(() => expect(selected(screen.getByLabelText('From structure'))).toBe('KR-001 · Pole'));
    expect(selected(screen.getByLabelText('To structure'))).toBe('KR-002 · Pole');
    expect((screen.getByLabelText('Phase / position (optional)') as HTMLInputElement).value).toBe('B (middle)');
    expect((screen.getByLabelText('Ground clearance at the perch point (m)') as HTMLInputElement).value).toBe('9.6');
    expect((screen.getByLabelText('Lowest clearance measured (m)') as HTMLInputElement).value).toBe('9.1');
    expect((screen.getByLabelText('Lowest clearance measured at, from the from-structure (m)') as HTMLInputElement).value).toBe('84');
    expect(selected(screen.getByLabelText('Terrain under the span'))).toBe('Road');
    expect((screen.getByLabelText('Estimated load current (A)') as HTMLInputElement).value).toBe('410');
    expect((screen.getByLabelText('Survey date') as HTMLInputElement).value).toBe('2026-11-02');
    const hazard = screen.getByRole('listitem', { name: 'Hazard 1' });
    expect((within(hazard).getByRole('radio', { name: 'High' }) as HTMLInputElement).checked).toBe(true);
    expect((within(hazard).getByLabelText('Position from the from-structure (m)') as HTMLInputElement).value).toBe('40');
    expect((within(hazard).getByLabelText('Note') as HTMLTextAreaElement).value).toBe('County road');

    fireEvent.click(screen.getByRole('button', { name: 'Save draft' }));
    await waitFor(() => expect(api.bodies.some((b) => b.method === 'PATCH')).toBe(true));
    const sent = api.bodies.find((b) => b.method === 'PATCH')!.body;
    expect(sent).toEqual({
      version: 4,
      fromStructureId: 'S1',
      toStructureId: 'S2',
      conductor: { codeWord: 'Hawk' },
      phasePosition: 'B (middle)',
      clearanceM: 9.6,
      lowestClearanceM: 9.1,
      lowestClearanceAlongM: 84,
      terrain: 'road',
      loadCurrentA: 410,
      surveyDate: '2026-11-02',
      hazards: [{ id: 'H1', kindId: 'road-crossing', severity: 'high', positionAlongM: 40, note: 'County road' }],
    });
  });

  it("when the kept list of the line's structures predates the to-structure, then the form still shows it and reads the list again", async () => {
    const api = fakeApi();
    api.release();
    // A copy kept on the device (fresh, so nothing would refetch it) read before the second structure was added.
    renderForm((qc) => qc.setQueryData(['structures', 'L1'], [structures[0]]));
    const to = await screen.findByLabelText('To structure');
    expect(selected(to)).toContain('KR-002');
    await waitFor(() => expect(selected(screen.getByLabelText('To structure'))).toBe('KR-002 · Pole'));
    expect(api.bodies.filter((b) => b.url.startsWith('/api/structures')).length).toBe(1);
    expect(selected(screen.getByLabelText('From structure'))).toBe('KR-001 · Pole');
  });
});
