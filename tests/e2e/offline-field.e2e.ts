// Field work with no signal: records made offline survive reloads, sync once when the network returns, and a
// retry after a lost answer does not make a second record (Idempotency-Key, api.md "Writes that may be retried").
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import path from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { startHarness, type Harness } from './harness.ts';
import { tileCounts, tileRange, type LonLatBox } from '../../shared/tile-math.ts';

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
 * while offline every API or map request that still leaves the browser is dropped as a lost connection too.
 */
async function signal(context: BrowserContext, on: boolean) {
  if (on) {
    await context.unroute('**/api/**');
    await context.unroute('**/map/**');
    await context.setOffline(false);
  } else {
    await context.setOffline(true);
    await context.route('**/api/**', (route) => route.abort('internetdisconnected'));
    await context.route('**/map/**', (route) => route.abort('internetdisconnected'));
  }
}

/** Waits until the query cache kept in IndexedDB holds `text` (it is written about a second after the last read). */
async function keptOnDevice(page: Page, text: string) {
  await expect
    .poll(
      () =>
        page.evaluate(async () => {
          const open = indexedDB.open('roostline-cache');
          const db: IDBDatabase = await new Promise((res, rej) => ((open.onsuccess = () => res(open.result)), (open.onerror = () => rej(open.error))));
          const value: unknown = await new Promise((res) => {
            const q = db.transaction('queries').objectStore('queries').get('roostline-queries');
            q.onsuccess = () => res(q.result);
            q.onerror = () => res(null);
          });
          db.close();
          return typeof value === 'string' ? value : '';
        }),
      { timeout: 30_000 },
    )
    .toContain(text);
}

type MapHandle = {
  getBounds: () => { getWest: () => number; getSouth: () => number; getEast: () => number; getNorth: () => number };
  jumpTo: (o: object) => void;
  once: (e: string, cb: () => void) => void;
  loaded: () => boolean;
  querySourceFeatures: (s: string, o: object) => unknown[];
};

/** Moves the map and waits until every tile of the new view is drawn (or has failed). */
async function mapTo(page: Page, lon: number, lat: number, zoom: number) {
  await page.evaluate(
    ([lon, lat, zoom]) =>
      new Promise<void>((resolve) => {
        const m = (window as unknown as { __roostlineMap: MapHandle }).__roostlineMap;
        m.once('idle', () => resolve());
        m.jumpTo({ center: [lon, lat], zoom });
      }),
    [lon, lat, zoom],
  );
}

async function mapBox(page: Page): Promise<LonLatBox> {
  return page.evaluate(() => {
    const b = (window as unknown as { __roostlineMap: MapHandle }).__roostlineMap.getBounds();
    return [b.getWest(), b.getSouth(), b.getEast(), b.getNorth()] as LonLatBox;
  });
}

async function drawn(page: Page) {
  return page.evaluate(() => {
    const m = (window as unknown as { __roostlineMap: MapHandle }).__roostlineMap;
    return { land: m.querySourceFeatures('basemap', { sourceLayer: 'land' }).length, spans: m.querySourceFeatures('spans', { sourceLayer: 'spans' }).length };
  });
}

async function cachedKeys(page: Page, cacheName: string) {
  return page.evaluate(async (name) => (await (await caches.open(name)).keys()).map((r) => new URL(r.url).pathname), cacheName);
}

/** Takes the map's current view offline over a zoom range, checking the estimate first. */
async function takeViewOffline(page: Page, name: string, minZoom: number, maxZoom: number) {
  const panel = page.getByTestId('offline-areas');
  await panel.getByRole('button', { name: 'Take an area offline' }).click();
  await page.getByLabel('From zoom').selectOption(String(minZoom));
  await page.getByLabel('To zoom').selectOption(String(maxZoom));
  await page.getByLabel('Name').fill(name);
  const box = await mapBox(page);
  const counts = tileCounts(box, minZoom, maxZoom);
  const estimate = page.getByTestId('area-estimate');
  await estimate.getByTestId('area-total').waitFor({ timeout: 60_000 });
  // The estimate counts the tiles of each zoom of the frame (Web Mercator XYZ, common practice) before anything is downloaded.
  const rows = await estimate.locator('tr[data-zoom]').evaluateAll((trs) => trs.map((tr) => [Number(tr.getAttribute('data-zoom')), Number(tr.children[1]!.textContent!.replace(/\s/g, ''))]));
  expect(rows).toEqual(counts.map((c) => [c.z, c.count]));
  const total = counts.reduce((a, c) => a + c.count, 0);
  expect(await estimate.getByTestId('area-total').innerText()).toMatch(new RegExp(`^About \\d+(\\.\\d)? (kB|MB) for ${total} tile places\\.$`));
  expect(await estimate.innerText()).toMatch(/\d+ spans, \d+ structures on \d+ lines?: /);
  await panel.getByRole('button', { name: /^Download / }).click();
  await panel.getByTestId('area-notice').filter({ hasText: `Saved “${name}”` }).waitFor({ timeout: 120_000 });
  return { box, total };
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

    // Take the area of the valley line offline from the map. A frame too large for one area is refused in words first.
    await page.goto('/map');
    await page.locator('[data-testid="map"][data-map-ready="true"]').waitFor({ timeout: 150_000 });
    await mapTo(page, -130.31, -30.21, 9);
    const panel = page.getByTestId('offline-areas');
    await panel.getByRole('button', { name: 'Take an area offline' }).click();
    await page.getByLabel('From zoom').selectOption('9');
    await page.getByLabel('To zoom').selectOption('16');
    const wide = tileCounts(await mapBox(page), 9, 16).reduce((a, c) => a + c.count, 0);
    expect(wide).toBeGreaterThan(4000);
    await page.getByTestId('area-estimate').getByRole('alert').filter({ hasText: `This frame needs ${wide.toLocaleString('en-US').replace(/,/g, ' ')} tiles at zooms 9–16; one area holds at most 4 000.` }).waitFor();
    expect(await panel.getByRole('button', { name: /^Download/ }).isDisabled()).toBe(true);
    await panel.getByRole('button', { name: 'Cancel' }).click();
    await mapTo(page, -130.31, -30.21, 14);
    const area = await takeViewOffline(page, `Valley ${RUN}`, 13, 15);
    const saved = panel.getByTestId('saved-area').filter({ hasText: `Valley ${RUN}` });
    expect(await saved.innerText()).toMatch(/Saved just now · zooms 13–15 · \d+ spans · \d+ photos/);
    expect(await saved.innerText()).toMatch(/\d+(\.\d)? (kB|MB)/);
    // The browser was asked to keep the data, and the panel says how much of the device it holds.
    expect(await page.getByTestId('storage-use').innerText()).toMatch(/^Roostline holds \d+(\.\d)? (bytes|kB|MB|GB) of \d+(\.\d)? (MB|GB|TB) on this device\./);
    // Every tile of the frame at every zoom is in the caches the service worker answers from (the basemap file ends at zoom 14).
    const spanTiles = await cachedKeys(page, 'roostline-span-tiles');
    const baseTiles = await cachedKeys(page, 'roostline-basemap-tiles');
    for (let z = 13; z <= 15; z++) {
      const r = tileRange(area.box, z);
      for (let x = r.xMin; x <= r.xMax; x++) {
        for (let y = r.yMin; y <= r.yMax; y++) {
          expect(spanTiles).toContain(`/api/tiles/spans/${z}/${x}/${y}.mvt`);
          if (z <= 14) expect(baseTiles).toContain(`/map/basemap/${z}/${x}/${y}.mvt`);
        }
      }
    }
    // The kept query cache holds the area's records before the signal goes (it is written a moment after the last read).
    await keptOnDevice(page, `"detail","${other.id}"`);

    // No signal from here; a reload opens the app from the device.
    await signal(context, false);
    await page.reload();
    await page.goto('/field');
    // The queue opens from the device: its groups with their totals and the first cards (the list is windowed).
    await page.getByRole('list', { name: 'Your spans' }).locator('[data-span-id]').first().waitFor();
    expect(await page.getByRole('list', { name: 'Your spans' }).getByRole('heading').first().innerText()).toMatch(/^(Sent back to you|Drafts|Submitted and approved) \(\d+\)$/);
    await page.goto(`/spans/${other.id}`);
    await page.getByRole('heading', { name: /^Span .+ → .+$/ }).waitFor();
    // The map area draws from what was saved: basemap and span tiles answered by the service worker, none by the network.
    const tileAnswers: { url: string; fromWorker: boolean; status: number }[] = [];
    page.on('response', (r) => {
      if (/\/(map\/basemap|api\/tiles\/spans)\//.test(r.url())) tileAnswers.push({ url: r.url(), fromWorker: r.fromServiceWorker(), status: r.status() });
    });
    await page.goto('/map');
    await page.locator('[data-testid="map"][data-map-ready="true"]').waitFor({ timeout: 150_000 });
    await panel.getByTestId('saved-area').filter({ hasText: `Valley ${RUN}` }).getByRole('button', { name: 'Show' }).click();
    await mapTo(page, -130.31, -30.21, 14);
    const shown = await drawn(page);
    expect(shown.land).toBeGreaterThan(0);
    expect(shown.spans).toBeGreaterThan(0);
    const inArea = tileAnswers.filter((a) => a.url.includes('/14/'));
    expect(inArea.some((a) => a.url.includes('/map/basemap/'))).toBe(true);
    expect(inArea.some((a) => a.url.includes('/api/tiles/spans/'))).toBe(true);
    for (const a of inArea) expect(a, a.url).toMatchObject({ fromWorker: true, status: 200 });
    expect(await panel.getByRole('button', { name: 'Take an area offline' }).isDisabled()).toBe(true);

    // Screens whose work only the server does say so in words instead of failing.
    await page.goto('/import');
    const notice = page.getByTestId('needs-network');
    await notice.getByRole('heading', { name: 'Import needs the network' }).waitFor();
    expect(await notice.innerText()).toContain('There is no connection right now. The server reads and checks the file');
    await page.goto('/calculators');
    await notice.getByRole('heading', { name: 'The calculator page needs the network' }).waitFor();

    await page.goto('/field/spans/new');
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

  it('when the signal drops on the review desk, or it is opened with none, then it says in words that it needs the network', async () => {
    const { context, page } = await open();
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    await page.getByRole('heading', { name: /^Waiting for review/ }).first().waitFor();
    await page.reload();
    await workerInControl(page);
    await page.getByRole('heading', { name: /^Waiting for review/ }).first().waitFor();
    const notice = page.getByTestId('needs-network');
    expect(await notice.count()).toBe(0);

    // Open when the signal drops: the desk stays on screen, out of reach, under the notice.
    await signal(context, false);
    await notice.getByRole('heading', { name: 'The review desk needs the network' }).waitFor();
    expect(await notice.innerText()).toContain('Decisions are checked against the span as the server holds it now');
    expect(await page.getByTestId('needs-network-paused').getAttribute('inert')).not.toBeNull();
    expect(await page.getByTestId('needs-network-paused').getByRole('heading', { name: /^Waiting for review/ }).count()).toBeGreaterThan(0);

    // Opened with no signal: the notice alone, nothing tried and failed on screen.
    await page.reload();
    await notice.getByRole('heading', { name: 'The review desk needs the network' }).waitFor();
    expect(await page.getByTestId('needs-network-paused').count()).toBe(0);
    expect(await page.getByRole('alert').count()).toBe(0);
    await page.goto('/admin/audit');
    await notice.getByRole('heading', { name: 'The audit log needs the network' }).waitFor();

    // Signal back: the desk opens by itself.
    await signal(context, true);
    await page.goto('/review');
    await page.getByRole('heading', { name: /^Waiting for review/ }).first().waitFor();
    expect(await notice.count()).toBe(0);
    await context.close();
  }, 180_000);

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
