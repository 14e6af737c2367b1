// Field work with no signal: records made offline survive reloads, sync once when the network returns, and a
// retry after a lost answer does not make a second record (Idempotency-Key, api.md "Writes that may be retried").
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import path from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

const TABLET = { width: 820, height: 1180 };
const RUN = Date.now().toString(36).slice(-5).toUpperCase();
// Committed fixture with a GPS position written by exiftool (scripts/make-photo-fixtures.ts): 12.5° N, 45.25° E.
const PHOTO = path.resolve('tests/fixtures/photos/ne.jpg');

async function open() {
  const p = await h.newPage({ viewport: TABLET, hasTouch: true });
  p.context.setDefaultTimeout(60_000);
  return p;
}

async function api<T>(page: Page, method: 'get' | 'post' | 'patch', url: string, data?: unknown): Promise<T> {
  const res = await page.request[method](url, { data, headers: { Origin: h.baseUrl } });
  expect(res.status(), `${method.toUpperCase()} ${url}: ${await res.text()}`).toBeLessThan(300);
  return (await res.json()) as T;
}

async function newLine(page: Page, name: string) {
  return api<{ id: string }>(page, 'post', '/api/lines', { name, owner: 'Harrow Vale Power Cooperative', voltageKv: 12.47, frequencyHz: 60, phases: 3, loadTypicalA: 180, loadMinA: 90, loadPeakA: 260 });
}

async function workerInControl(page: Page) {
  await page.evaluate(async () => {
    await navigator.serviceWorker.ready;
    for (let i = 0; i < 100 && !navigator.serviceWorker.controller; i++) await new Promise((r) => setTimeout(r, 100));
  });
}

async function addStructure(page: Page, nth: number, lat: string, lon: string) {
  await page.getByRole('button', { name: 'Add here' }).nth(nth).click();
  await page.getByLabel('Latitude (°)').fill(lat);
  await page.getByLabel('Longitude (°)').fill(lon);
  await page.getByLabel(/^Attachment height/).fill('11');
  await page.getByRole('button', { name: 'Add this structure' }).click();
}

const indicator = (page: Page) => page.getByTestId('connection');

async function counts(page: Page, lineId: string, surveyorId: string) {
  const structures = await api<{ items: { id: string; label: string }[] }>(page, 'get', `/api/structures?lineId=${lineId}`);
  const spans = await api<{ items: { id: string; lineId: string; photoIds: string[]; fromStructureId: string; toStructureId: string; clearanceM: number | null }[] }>(
    page,
    'get',
    `/api/spans?surveyorId=${surveyorId}&lineId=${lineId}&pageSize=200`,
  );
  return { structures: structures.items, spans: spans.items.filter((s) => s.lineId === lineId) };
}

/**
 * No signal, or signal back. Offline mode alone does not always cut a service worker's own fetches in Chromium, so
 * while offline every API request that still leaves the browser is dropped as a lost connection too.
 */
async function signal(context: BrowserContext, on: boolean) {
  if (on) {
    await context.unroute('**/api/**');
    await context.setOffline(false);
  } else {
    await context.setOffline(true);
    await context.route('**/api/**', (route) => route.abort('internetdisconnected'));
  }
}

describe('offline field work', () => {
  it('when a surveyor makes two structures, a span between them, a photo and an edit with no signal, then they survive a reload and reach the server exactly once', async () => {
    const { context, page } = await open();
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    const me = await api<{ user: { id: string } }>(page, 'get', '/api/me');
    const line = await newLine(page, `Offline valley line ${RUN}`);
    // A span of this surveyor to edit offline: made online on the new line, opened once so the tablet has it.
    const [s1, s2] = [
      await api<{ id: string }>(page, 'post', '/api/structures', { lineId: line.id, lat: -30.21, lon: -130.31, kind: 'pole', attachmentHeightM: 10 }),
      await api<{ id: string }>(page, 'post', '/api/structures', { lineId: line.id, lat: -30.2109, lon: -130.31, kind: 'pole', attachmentHeightM: 10 }),
    ];
    const other = await api<{ id: string; version: number }>(page, 'post', '/api/spans', { lineId: line.id, fromStructureId: s1.id, toStructureId: s2.id, hazards: [] });
    await page.reload();
    await workerInControl(page);
    await page.goto(`/field/spans/${other.id}/edit`);
    await page.getByLabel('Phase / position (optional)').waitFor();
    await page.waitForTimeout(1500); // the persisted cache is written a moment after the last read
    await page.goto('/field/spans/new');
    await page.getByLabel('Line', { exact: true }).selectOption(line.id);
    await page.locator('#fromStructureId option').nth(2).waitFor({ state: 'attached' });
    await page.waitForTimeout(1500); // the persisted cache is written a moment after the last read
    const before = await counts(page, line.id, me.user.id);
    expect(before.structures).toHaveLength(2);
    expect(before.spans).toHaveLength(1);

    // No signal from here.
    await signal(context, false);
    await page.reload();
    await page.getByLabel('Line', { exact: true }).selectOption(line.id);
    await addStructure(page, 0, '-30.2200', '-130.3200');
    await expect.poll(() => page.locator('#fromStructureId option:checked').innerText()).toContain('waiting to send');
    await addStructure(page, 1, '-30.2209', '-130.3200');
    await expect.poll(() => page.locator('#toStructureId option:checked').innerText()).toContain('waiting to send');
    await page.getByLabel('Ground clearance at the perch point').fill('9.5');
    await page.getByRole('button', { name: 'Save draft' }).click();
    await page.waitForURL((u) => /^\/field\/spans\/local-[0-9a-f-]{36}\/edit$/.test(u.pathname));
    await page.getByText('Kept on this device; it will be sent when there is a connection.', { exact: true }).waitFor();
    await page.getByTestId('photo-input').setInputFiles(PHOTO);
    const offlinePhoto = page.getByTestId('offline-photo');
    await offlinePhoto.waitFor();
    expect(await offlinePhoto.innerText()).toContain('Waiting to send');
    // The position is read on the device, before the server has seen the file.
    expect(await page.getByTestId('offline-photo-exif').innerText()).toContain('12.50000°, 45.25000°');

    await page.goto(`/field/spans/${other.id}/edit`);
    await page.getByLabel('Phase / position (optional)').fill(`top phase ${RUN}`);
    await page.getByRole('button', { name: 'Save draft' }).click();
    await page.getByText('Kept on this device; it will be sent when there is a connection.', { exact: true }).waitFor();

    // Still offline: a reload keeps all of it, in order, in words.
    await page.reload();
    await page.goto('/field/outbox');
    await page.getByRole('heading', { name: 'Field outbox' }).waitFor();
    const rows = page.locator('[data-outbox-item]');
    await expect.poll(() => rows.count()).toBe(5);
    expect(await rows.evaluateAll((els) => els.map((e) => e.getAttribute('data-outbox-item')))).toEqual(['structure.create', 'structure.create', 'span.create', 'photo.upload', 'span.update']);
    const text = await page.locator('ol[aria-label="Waiting to send, in order"]').innerText();
    expect(text).toContain(`New pole on Offline valley line ${RUN}`);
    expect(text).toContain('Changes to span');
    expect(text).not.toMatch(/local-[0-9a-f]{8}/);
    expect(await indicator(page).getAttribute('data-state')).toBe('offline');
    expect(await page.getByTestId('waiting-count').innerText()).toBe('5');
    await page.goto('/field');
    await page.locator('[data-kept-span]').first().waitFor();
    // Nothing reached the server.
    const offlineCounts = await counts(page, line.id, me.user.id);
    expect(offlineCounts.structures).toHaveLength(2);

    // Signal back: everything goes, once.
    await signal(context, true);
    await expect.poll(() => indicator(page).getAttribute('data-waiting'), { timeout: 60_000 }).toBe('0');
    const after = await counts(page, line.id, me.user.id);
    expect(after.structures).toHaveLength(4);
    expect(after.spans).toHaveLength(2);
    const made = after.spans.find((s) => s.id !== other.id)!;
    const newIds = after.structures.map((s) => s.id).filter((id) => id !== s1.id && id !== s2.id);
    expect(new Set([made.fromStructureId, made.toStructureId])).toEqual(new Set(newIds));
    expect(made.clearanceM).toBeCloseTo(9.5, 6);
    const photos = await api<{ items: { id: string; lat: number | null; lon: number | null }[] }>(page, 'get', `/api/photos?spanId=${made.id}`);
    expect(photos.items).toHaveLength(1);
    expect(photos.items[0]!.lat).toBeCloseTo(12.5, 5);
    expect(photos.items[0]!.lon).toBeCloseTo(45.25, 5);
    const edited = await api<{ phasePosition: string; version: number }>(page, 'get', `/api/spans/${other.id}`);
    expect(edited.phasePosition).toBe(`top phase ${RUN}`);
    expect(edited.version).toBe(other.version + 1);
    expect(await page.locator('[data-kept-span]').count()).toBe(0);
    await context.close();
  }, 300_000);

  it('when the answer to a create is lost on the way back, then the retry with the same key makes no second record', async () => {
    const { context, page } = await open();
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    const me = await api<{ user: { id: string } }>(page, 'get', '/api/me');
    const line = await newLine(page, `Lost answer line ${RUN}`);
    await page.goto('/field/spans/new');
    await page.getByLabel('Line', { exact: true }).selectOption(line.id);
    // The server does the work, then the connection drops before the answer reaches the tablet.
    let cut = 0;
    let answerLost = false;
    await page.route('**/api/structures', async (route) => {
      if (route.request().method() !== 'POST' || cut > 0) return route.continue();
      cut++;
      await route.fetch();
      await route.abort('connectionreset');
      answerLost = true;
    });
    await addStructure(page, 0, '-30.2300', '-130.3300');
    // Kept after the lost answer, then sent again by itself with the same key: the server answers with the first record.
    await expect.poll(() => answerLost).toBe(true);
    await expect.poll(() => page.locator('#fromStructureId option:checked').innerText(), { timeout: 60_000 }).not.toContain('waiting to send');
    await expect.poll(() => indicator(page).getAttribute('data-waiting'), { timeout: 60_000 }).toBe('0');
    const after = await counts(page, line.id, me.user.id);
    expect(cut).toBe(1);
    expect(after.structures).toHaveLength(1);
    await expect.poll(() => page.locator('#fromStructureId option:checked').innerText()).toContain(after.structures[0]!.label);

    // The same from the outbox: made offline, its first send's answer lost, sent again by the queue with the same key.
    await context.setOffline(true);
    cut = 0;
    answerLost = false;
    await addStructure(page, 1, '-30.2309', '-130.3300');
    await expect.poll(() => indicator(page).getAttribute('data-waiting')).toBe('1');
    await context.setOffline(false);
    await expect.poll(() => answerLost, { timeout: 60_000 }).toBe(true);
    await expect.poll(() => indicator(page).getAttribute('data-waiting'), { timeout: 60_000 }).toBe('0');
    expect(cut).toBe(1);
    expect((await counts(page, line.id, me.user.id)).structures).toHaveLength(2);
    await context.close();
  }, 180_000);

  it('when a span changed on the server while the surveyor edited it offline, then the queued edit waits in the conflict view and nothing is lost', async () => {
    const { context, page } = await open();
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    const line = await newLine(page, `Conflict line ${RUN}`);
    const a = await api<{ id: string }>(page, 'post', '/api/structures', { lineId: line.id, lat: -30.24, lon: -130.34, kind: 'pole', attachmentHeightM: 10 });
    const b = await api<{ id: string }>(page, 'post', '/api/structures', { lineId: line.id, lat: -30.2409, lon: -130.34, kind: 'pole', attachmentHeightM: 10 });
    const span = await api<{ id: string; version: number }>(page, 'post', '/api/spans', { lineId: line.id, fromStructureId: a.id, toStructureId: b.id, hazards: [] });
    await page.reload();
    await workerInControl(page);
    await page.goto(`/field/spans/${span.id}/edit`);
    await page.getByLabel('Phase / position (optional)').waitFor();
    await page.waitForTimeout(1500); // the persisted cache is written a moment after the last read

    await signal(context, false);
    await page.getByLabel('Phase / position (optional)').fill(`mine ${RUN}`);
    await page.getByRole('button', { name: 'Save draft' }).click();
    await page.getByText('Kept on this device; it will be sent when there is a connection.', { exact: true }).waitFor();
    // Meanwhile a colleague's tablet saves the same span.
    const other = await open();
    await h.signIn(other.page, 'surveyor');
    await other.page.waitForURL((u) => u.pathname === '/field');
    await api(other.page, 'patch', `/api/spans/${span.id}`, { version: span.version, phasePosition: `theirs ${RUN}` });
    await other.context.close();

    await signal(context, true);
    await page.goto('/field/outbox');
    await expect.poll(() => page.locator('[data-outbox-item="span.update"]').getAttribute('data-state'), { timeout: 60_000 }).toBe('conflict');
    // Kept, not dropped: the server still has the colleague's value until the surveyor decides.
    expect((await api<{ phasePosition: string }>(page, 'get', `/api/spans/${span.id}`)).phasePosition).toBe(`theirs ${RUN}`);
    await page.getByRole('link', { name: 'Open and choose what to keep' }).click();
    const panel = page.getByRole('alertdialog', { name: 'Someone saved this span while you were editing' });
    await panel.waitFor();
    expect(await panel.innerText()).toContain(`mine ${RUN}`);
    expect(await panel.innerText()).toContain(`theirs ${RUN}`);
    await panel.getByRole('button', { name: /Save my choices on version/ }).click();
    await expect.poll(async () => (await api<{ phasePosition: string }>(page, 'get', `/api/spans/${span.id}`)).phasePosition, { timeout: 30_000 }).toBe(`mine ${RUN}`);
    await expect.poll(() => indicator(page).getAttribute('data-waiting'), { timeout: 60_000 }).toBe('0');
    await context.close();
  }, 240_000);
});

export type { BrowserContext };
