// A span from the field to the planner: surveyor fills the tablet form (US units), saves a draft, submits;
// a safety officer approves; a planner finds it in the spans table by filter, from a shareable URL.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fs from 'node:fs';
import path from 'node:path';
import Papa from 'papaparse';
import type { Page } from 'playwright-core';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

const TABLET = { width: 820, height: 1180 };
// Two positions about 100 m apart inside the invented demo region (open ocean box, see shared/demo-region.ts).
const POLE_A = { latitude: -30.2, longitude: -130.3 };
const POLE_B = { latitude: -30.2009, longitude: -130.3 };
const RUN = Date.now().toString(36).slice(-5).toUpperCase();
const LABEL_A = `E2E-${RUN}-A`;
const LABEL_B = `E2E-${RUN}-B`;

async function apiCall(page: Page, method: 'post' | 'patch', url: string, data: unknown) {
  const res = await page.request[method](url, { data, headers: { Origin: h.baseUrl } });
  expect(res.status(), `${method.toUpperCase()} ${url}: ${await res.text()}`).toBeLessThan(300);
  return res.json();
}

let spanId = '';

/** A page with room for a busy machine: the shared CI box runs several browser journeys at once. */
async function open(opts?: Parameters<Harness['newPage']>[0]) {
  const p = await h.newPage(opts);
  p.context.setDefaultTimeout(60_000);
  return p;
}

describe('span journey', () => {
  it('when a surveyor fills the form on a tablet, saves a draft and submits, then the span is awaiting review in SI units', async () => {
    const { context, page } = await open({ viewport: TABLET, hasTouch: true });
    await context.grantPermissions(['geolocation'], { origin: h.baseUrl });
    await context.setGeolocation(POLE_A);
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    // This surveyor works in US customary units; the line is new for this run.
    await apiCall(page, 'patch', '/api/me', { unitSystem: 'us' });
    const line = await apiCall(page, 'post', '/api/lines', {
      name: `Journey test line ${RUN}`,
      owner: 'Harrow Vale Power Cooperative',
      voltageKv: 12.47,
      frequencyHz: 60,
      phases: 3,
      loadTypicalA: 180,
      loadMinA: 90,
      loadPeakA: 260,
    });
    await page.reload();

    await page.getByRole('link', { name: '+ New span' }).click();
    await page.waitForURL((u) => u.pathname === '/field/spans/new');
    await page.getByLabel('Line', { exact: true }).selectOption(line.id);

    // From structure: added here, at the tablet's position.
    await page.getByRole('button', { name: 'Add here' }).first().click();
    await page.getByRole('button', { name: 'Use my position' }).click();
    await expect.poll(() => page.getByLabel('Latitude (°)').inputValue()).toBe('-30.200000');
    await page.getByLabel('Attachment height (ft)').fill('38');
    await page.getByLabel(/^Label/).fill(LABEL_A);
    await page.getByRole('button', { name: 'Add this structure' }).click();
    await expect.poll(async () => page.locator('#fromStructureId option:checked').innerText()).toContain(LABEL_A);

    // To structure: the surveyor walked to the next pole.
    await context.setGeolocation(POLE_B);
    await page.getByRole('button', { name: 'Add here' }).nth(1).click();
    await page.getByRole('button', { name: 'Use my position' }).click();
    await expect.poll(() => page.getByLabel('Latitude (°)').inputValue()).toBe('-30.200900');
    await page.getByLabel('Attachment height (ft)').fill('38');
    await page.getByLabel(/^Label/).fill(LABEL_B);
    await page.getByRole('button', { name: 'Add this structure' }).click();
    await expect.poll(async () => page.locator('#toStructureId option:checked').innerText()).toContain(LABEL_B);

    // Catalogue conductor: the diameter fills in, shown in inches.
    await page.getByLabel('Code word').selectOption('Hawk');
    expect(await page.getByTestId('conductor-filled').innerText()).toContain('0.858 in (from the catalogue)');

    // A lowest clearance above the perch-point clearance is refused inline, beside its field.
    await page.getByLabel('Ground clearance at the perch point (ft)').fill('31');
    await page.getByLabel('Lowest clearance measured (ft)').fill('40');
    await page.getByRole('button', { name: 'Save draft' }).click();
    await page.getByText('The lowest clearance cannot be above the clearance at the perch point').waitFor();
    expect(page.url()).toContain('/field/spans/new');
    await page.getByLabel('Lowest clearance measured (ft)').fill('28');

    await page.getByLabel('Terrain under the span').selectOption('road');
    await page.getByLabel('Estimated load current (A)').fill('210');
    await page.getByRole('button', { name: '+ Add a hazard' }).click();
    await page.getByLabel('Kind').selectOption('road-crossing');
    await page.getByLabel('Position from the from-structure (ft)').fill('150');
    await page.getByLabel('Note').fill('Farm track under mid-span');

    // The primary actions are thumb-sized and sit at the bottom edge of the tablet screen.
    const submit = page.getByRole('button', { name: 'Submit for review' });
    const box = (await submit.boundingBox())!;
    expect(box.height).toBeGreaterThanOrEqual(44);
    expect(box.y + box.height).toBeGreaterThan(TABLET.height - 120);

    await page.getByRole('button', { name: 'Save draft' }).click();
    await page.waitForURL((u) => /\/field\/spans\/[^/]+\/edit$/.test(u.pathname));
    await page.getByText('Draft saved.').waitFor();
    spanId = new URL(page.url()).pathname.split('/')[3];

    // Reopened from the server, the form shows every stored value (in the surveyor's units), so a second save loses nothing.
    await page.reload();
    await expect.poll(() => page.getByLabel('Code word').inputValue()).toBe('Hawk');
    expect(await page.locator('#fromStructureId option:checked').innerText()).toContain(LABEL_A);
    expect(await page.locator('#toStructureId option:checked').innerText()).toContain(LABEL_B);
    expect(Number(await page.getByLabel('Ground clearance at the perch point (ft)').inputValue())).toBeCloseTo(31, 6);
    expect(Number(await page.getByLabel('Lowest clearance measured (ft)').inputValue())).toBeCloseTo(28, 6);
    expect(await page.getByLabel('Terrain under the span').inputValue()).toBe('road');
    expect(Number(await page.getByLabel('Estimated load current (A)').inputValue())).toBe(210);
    expect(await page.getByLabel('Kind').inputValue()).toBe('road-crossing');
    expect(Number(await page.getByLabel('Position from the from-structure (ft)').inputValue())).toBeCloseTo(150, 6);
    expect(await page.getByLabel('Note').inputValue()).toBe('Farm track under mid-span');

    await submit.click();
    await page.waitForURL((u) => u.pathname === '/field');
    await page.getByText('Span submitted for review.').waitFor();
    const card = page.locator(`[data-span-id="${spanId}"]`);
    // The queue draws only the cards near the screen: scroll down to this one (its group follows the returned spans and the drafts).
    await expect.poll(async () => (await card.count()) > 0 || (await page.mouse.wheel(0, 700), false), { timeout: 30_000, interval: 300 }).toBe(true);
    expect(await card.innerText()).toContain('Awaiting review');

    // The server got SI units: 31 ft = 9.4488 m, 150 ft = 45.72 m (1 ft = 0.3048 m exactly).
    const saved = await (await page.request.get(`/api/spans/${spanId}`)).json();
    expect(saved.status).toBe('submitted');
    expect(saved.clearanceM).toBeCloseTo(9.4488, 6);
    expect(saved.lowestClearanceM).toBeCloseTo(8.5344, 6);
    expect(saved.loadCurrentA).toBe(210);
    expect(saved.loadCurrentSource).toBe('span');
    expect(saved.conductor.codeWord).toBe('Hawk');
    expect(saved.hazards).toHaveLength(1);
    expect(saved.hazards[0].positionAlongM).toBeCloseTo(45.72, 6);
    // ≈100 m between the two poles (0.0009° of latitude ≈ 99.7 m; geodesic computed by the server).
    expect(saved.lengthM).toBeGreaterThan(95);
    expect(saved.lengthM).toBeLessThan(105);
    await context.close();
  }, 180_000);

  it('when a safety officer opens the span and approves it, then it shows as approved', async () => {
    expect(spanId).not.toBe('');
    const { context, page } = await open();
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    await page.goto(`/spans/${spanId}`);
    await page.getByRole('heading', { level: 1, name: `Span ${LABEL_A} → ${LABEL_B}` }).waitFor();
    expect(await page.locator('[data-status]').first().innerText()).toContain('Awaiting review');
    await page.getByRole('button', { name: 'Approve' }).click();
    await page.getByText('Approved.').waitFor();
    expect(await page.locator('[data-status]').first().getAttribute('data-status')).toBe('approved');
    // The history lists the submission and the approval.
    await page.getByRole('heading', { name: 'History' }).waitFor();
    await context.close();
  }, 120_000);

  it('when a planner filters the spans table, then the approved span is found and the view is in the URL', async () => {
    expect(spanId).not.toBe('');
    const { context, page } = await open();
    await h.signIn(page, 'planner');
    await page.waitForURL((u) => u.pathname === '/planning');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Spans', exact: true }).click();
    await page.waitForURL((u) => u.pathname === '/spans');
    const filters = page.getByRole('search', { name: 'Filter spans' });
    await filters.getByLabel('Status').selectOption('approved');
    await filters.getByLabel('Search').fill(LABEL_A);
    await page.waitForURL((u) => u.searchParams.get('q') === LABEL_A && u.searchParams.get('status') === 'approved');
    const row = page.locator(`tr[data-span-id="${spanId}"]`);
    await row.waitFor();
    // Until the filtered answer arrives the previous page stays on screen; then only this span matches.
    await expect.poll(() => page.locator('tbody tr[data-span-id]').count(), { timeout: 15_000 }).toBe(1);
    expect(await row.innerText()).toContain('Approved');

    // The export buttons carry the same filter.
    const csvHref = await page.getByRole('group', { name: 'Export the filtered spans' }).getByRole('link', { name: 'CSV' }).getAttribute('href');
    expect(csvHref).toBe(`/api/spans/export.csv?status=approved&q=${encodeURIComponent(LABEL_A)}`);
    const exported = await (await page.request.get(csvHref!)).text();
    expect(exported).toContain(LABEL_A);
    expect(exported.trim().split('\n')).toHaveLength(2);

    // The same URL opened afresh shows the same view.
    const shared = page.url();
    const other = await open();
    await h.signIn(other.page, 'planner');
    await other.page.waitForURL((u) => u.pathname === '/planning');
    await other.page.goto(shared);
    await other.page.locator(`tr[data-span-id="${spanId}"]`).waitFor();
    const otherFilters = other.page.getByRole('search', { name: 'Filter spans' });
    expect(await otherFilters.getByLabel('Status').inputValue()).toBe('approved');
    expect(await otherFilters.getByLabel('Search').inputValue()).toBe(LABEL_A);
    await other.context.close();

    // A different status filter leaves it out.
    await filters.getByLabel('Status').selectOption('draft');
    await page.waitForURL((u) => u.searchParams.get('status') === 'draft');
    await page.getByText('No span matches these filters.').waitFor();
    await context.close();
  }, 120_000);

  it('when someone saves the span while the surveyor edits it, then saving shows both versions and keeps both changes', async () => {
    const { context, page } = await open({ viewport: TABLET, hasTouch: true });
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    await apiCall(page, 'patch', '/api/me', { unitSystem: 'metric' });
    const drafts = await (await page.request.get('/api/spans?mine=true&status=draft&pageSize=5')).json();
    const draft = drafts.items[0];
    expect(draft, 'the demo scenario has drafts of the surveyor').toBeTruthy();
    await page.goto(`/field/spans/${draft.id}/edit`);
    await page.getByRole('heading', { level: 1, name: `Span ${draft.fromStructureLabel} → ${draft.toStructureLabel}` }).waitFor();

    // Meanwhile, from another device: a new clearance at the perch point.
    const otherClearanceM = draft.clearanceM === 12.34 ? 12.35 : 12.34;
    const lowest = draft.lowestClearanceM !== null && draft.lowestClearanceM > otherClearanceM ? null : draft.lowestClearanceM;
    const other = await apiCall(page, 'patch', `/api/spans/${draft.id}`, { version: draft.version, clearanceM: otherClearanceM, lowestClearanceM: lowest });
    expect(other.version).toBe(draft.version + 1);

    // On the tablet the surveyor changes the phase position and saves their (now stale) form.
    await page.getByLabel('Phase / position (optional)').fill(`E2E ${RUN}`);
    await page.getByRole('button', { name: 'Save draft' }).click();
    const panel = page.getByRole('alertdialog');
    await panel.waitFor();
    expect(await panel.innerText()).toContain(`version ${other.version}`);
    const clearanceRow = panel.locator('[data-conflict-field="clearance"]');
    expect(await clearanceRow.innerText()).toContain('changed by someone else');
    expect(await clearanceRow.innerText()).toContain('12.3');
    expect(await panel.locator('[data-conflict-field="phasePosition"]').innerText()).toContain('you changed this');
    await panel.getByRole('button', { name: `Save my choices on version ${other.version}` }).click();
    await page.getByText('Draft saved.').waitFor();

    const after = await (await page.request.get(`/api/spans/${draft.id}`)).json();
    expect(after.version).toBe(other.version + 1);
    expect(after.phasePosition).toBe(`E2E ${RUN}`);
    expect(after.clearanceM).toBe(otherClearanceM);
    await context.close();
  }, 120_000);

  it('when a surveyor imports an export of a line, then the dry run reports no changes; an edited row updates on commit', async () => {
    const { context, page } = await open();
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    const lines = await (await page.request.get('/api/lines')).json();
    const line = lines.items.find((l: { name: string }) => l.name.startsWith('Journey test line'));
    expect(line, 'the line made by the first journey').toBeTruthy();
    const csv = await (await page.request.get(`/api/spans/export.csv?lineId=${line.id}`)).text();
    const dir = fs.mkdtempSync(path.join(h.dataDir, 'import-'));
    const file = path.join(dir, 'line.csv');
    fs.writeFileSync(file, csv);

    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Import' }).click();
    await page.waitForURL((u) => u.pathname === '/import');
    await page.getByLabel('File (.csv, .geojson)').setInputFiles(file);
    await page.getByRole('button', { name: 'Check the file (dry run)' }).click();
    await page.getByRole('table', { name: 'Import report' }).waitFor();
    expect(await page.getByText('Nothing would change').isVisible()).toBe(true);
    expect(await page.locator('tr[data-action]').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-action')))).toEqual(['unchanged']);
    expect(await page.getByRole('button', { name: /^Commit/ }).isDisabled()).toBe(true);

    // Change one span's perch-point clearance in the file: the dry run names it, the commit saves it.
    const parsed = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true });
    parsed.data[0].clearance_m = '9.75';
    const edited = path.join(dir, 'line-edited.csv');
    fs.writeFileSync(edited, Papa.unparse(parsed.data, { columns: parsed.meta.fields }));
    await page.getByLabel('File (.csv, .geojson)').setInputFiles(edited);
    await page.getByRole('button', { name: 'Check the file (dry run)' }).click();
    await page.locator('tr[data-action="update"]').waitFor();
    await page.getByRole('button', { name: 'Commit 1 change' }).click();
    await page.getByText('Saved: 0 created, 1 updated').waitFor();
    const spans = await (await page.request.get(`/api/spans?lineId=${line.id}`)).json();
    expect(spans.items[0].clearanceM).toBe(9.75);
    await context.close();
  }, 120_000);

  it('when the tablet reloads before a save, then the typed entries are offered back and restored', async () => {
    const { context, page } = await open({ viewport: TABLET, hasTouch: true });
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    const lines = await (await page.request.get('/api/lines')).json();
    await page.goto('/field/spans/new');
    await page.getByLabel('Line', { exact: true }).selectOption(lines.items[0].id);
    await page.getByLabel('Ground clearance at the perch point (m)').fill('12.5');
    await page.getByLabel('Terrain under the span').selectOption('water');
    await page.waitForTimeout(1000);
    await page.reload();
    await page.getByRole('heading', { name: 'Unsaved entries on this device' }).waitFor();
    await page.getByRole('button', { name: 'Restore my entries' }).click();
    expect(await page.getByLabel('Ground clearance at the perch point (m)').inputValue()).toBe('12.5');
    expect(await page.getByLabel('Terrain under the span').inputValue()).toBe('water');
    expect(await page.getByLabel('Line', { exact: true }).inputValue()).toBe(lines.items[0].id);
    await context.close();
  }, 120_000);
});
