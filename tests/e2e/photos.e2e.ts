// A surveyor adds a geotagged photo from the span form: a progress bar while it uploads, then the thumbnail,
// linked to the span; the span page's gallery opens it full size.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
let tmp: string;
let photoPath: string;
let noGpsPath: string;

beforeAll(async () => {
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-photo-e2e-'));
  // ~0.6 MB, tagged 20 m north of the span's middle by exiftool (scripts/make-photo-fixtures.ts): a throttled upload takes seconds.
  photoPath = path.join(tmp, 'span-photo.jpg');
  fs.copyFileSync(path.resolve('tests/fixtures/photos/journey-span-photo.jpg'), photoPath);
  noGpsPath = path.join(tmp, 'no-gps.jpg');
  fs.writeFileSync(noGpsPath, await sharp({ create: { width: 400, height: 300, channels: 3, background: '#8a6' } }).jpeg().toBuffer());
  h = await startHarness();
});

afterAll(async () => {
  await h?.stop();
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
});

/** A line, two structures about 200 m apart (east from -30.2, -130.3) and a span between them, through the API with the page's session. */
async function makeSpan(page: Page, extra: object = {}): Promise<{ id: string; hazards: { id: string }[] }> {
  const headers = { Origin: h.baseUrl };
  const post = async (url: string, data: object) => {
    const res = await page.request.post(url, { data, headers });
    expect(res.status(), `${url}: ${await res.text()}`).toBe(201);
    return res.json();
  };
  const line = await post('/api/lines', { name: `Photo journey feeder ${Date.now()}`, owner: 'Harrow Vale Power Cooperative', voltageKv: 25, frequencyHz: 60, loadTypicalA: 200, loadMinA: 80, loadPeakA: 320 });
  const a = await post('/api/structures', { lineId: line.id, lat: -30.2, lon: -130.3, kind: 'pole', attachmentHeightM: 12 });
  const b = await post('/api/structures', { lineId: line.id, lat: -30.2, lon: -130.29793, kind: 'pole', attachmentHeightM: 12 });
  return post('/api/spans', { lineId: line.id, fromStructureId: a.id, toStructureId: b.id, ...extra });
}

/**
 * A surveyor on the new-span form at 820 × 1180, on a fresh line with two structures (about 200 m apart, east from
 * `lat`, -130.3), both chosen; `ready` also fills what a submit needs. The photo is picked before the first save.
 */
async function newSpanWithHeldPhoto(name: string, lat: number, photo: string, ready: boolean) {
  const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 }, hasTouch: true });
  await h.signIn(page, 'surveyor');
  await page.waitForURL((u) => u.pathname === '/field');
  const headers = { Origin: h.baseUrl };
  const post = async (url: string, data: object) => (await page.request.post(url, { data, headers })).json();
  const line = await post('/api/lines', { name: `${name} ${Date.now()}`, owner: 'Harrow Vale Power Cooperative', voltageKv: 25, frequencyHz: 60, loadTypicalA: 200, loadMinA: 80, loadPeakA: 320 });
  const a = await post('/api/structures', { lineId: line.id, lat, lon: -130.3, kind: 'pole', attachmentHeightM: 12 });
  const b = await post('/api/structures', { lineId: line.id, lat, lon: -130.29793, kind: 'pole', attachmentHeightM: 12 });

  await page.goto('/field/spans/new');
  await page.getByLabel('Line', { exact: true }).selectOption(line.id);
  await expect.poll(() => page.locator('#fromStructureId option').count(), { timeout: 20_000 }).toBeGreaterThan(2);
  await page.locator('#fromStructureId').selectOption(a.id);
  await page.locator('#toStructureId').selectOption(b.id);
  if (ready) {
    await page.getByLabel('Code word').selectOption('Hawk');
    await page.getByLabel(/^Ground clearance at the perch point/).fill('9.5');
    await page.getByLabel('Terrain under the span').selectOption('road');
  }
  await page.getByTestId('photo-input').setInputFiles(photo);
  await page.getByTestId('photo-held').waitFor();
  return { context, page, line: line as { id: string } };
}

describe('photo journey', () => {
  it('when a surveyor adds a photo on the span form, then a progress bar runs, the thumbnail shows and the span gallery opens it', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 1024, height: 1300 } });
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');

    const span = await makeSpan(page);

    await page.goto(`/field/spans/${span.id}/edit`);
    const uploader = page.getByTestId('photo-uploader');
    await uploader.waitFor({ timeout: 60_000 }).catch(async (err) => {
      await page.screenshot({ path: path.join(os.tmpdir(), 'roostline-photo-e2e-failure.png') });
      throw err;
    });

    // Record every value the progress bar shows, from the page itself.
    await page.evaluate(() => {
      const w = window as unknown as { __progress: number[] };
      w.__progress = [];
      new MutationObserver(() => {
        for (const el of document.querySelectorAll('[data-testid="photo-progress"]')) {
          const v = Number(el.getAttribute('aria-valuenow'));
          if (w.__progress[w.__progress.length - 1] !== v) w.__progress.push(v);
        }
      }).observe(document.body, { subtree: true, childList: true, attributes: true, attributeFilter: ['aria-valuenow'] });
    });
    // A thin field connection: about 192 kB/s up, so the bar has time to move.
    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 40, downloadThroughput: -1, uploadThroughput: 192 * 1024 });

    await page.getByTestId('photo-input').setInputFiles(photoPath);
    const bar = page.getByRole('progressbar', { name: /Upload of span-photo\.jpg/ });
    await bar.waitFor({ state: 'visible' });

    const thumb = page.getByTestId('photo-thumbnail');
    await thumb.waitFor({ state: 'visible', timeout: 60_000 });
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    // Visible is not yet loaded: on a busy machine the thumbnail's bytes come a moment after its element.
    await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth > 0), { timeout: 20_000 }).toBe(true);
    expect(await thumb.evaluate((img: HTMLImageElement) => img.naturalWidth)).toBe(320);
    const seen = await page.evaluate(() => (window as unknown as { __progress: number[] }).__progress);
    expect(seen.some((v) => v > 0 && v < 100), `progress values seen: ${seen.join(', ')}`).toBe(true);
    expect(seen).toEqual([...seen].sort((x, y) => x - y));

    const row = page.getByTestId('photo-upload-row');
    expect(await row.getAttribute('data-status')).toBe('done');
    await row.getByText('Linked to this span').waitFor();
    await row.getByText('4 May 2026, 10:11 (UTC-09:00)').waitFor();

    // The span page shows it in the gallery; the full-size view opens in a dialog.
    await page.goto(`/spans/${span.id}`);
    const gallery = page.getByTestId('photo-gallery');
    await gallery.waitFor();
    await gallery.getByRole('button', { name: /Open photo 1 of 1/ }).click();
    const dialog = page.getByRole('dialog', { name: 'Photo 1 of 1' });
    await dialog.waitFor();
    const full = dialog.getByRole('img', { name: /Photo 1 of the span/ });
    await full.waitFor();
    await page.waitForFunction(() => {
      const img = document.querySelector<HTMLImageElement>('[data-testid="photo-dialog"] img');
      return !!img && img.complete && img.naturalWidth > 0;
    });
    expect(await full.evaluate((img: HTMLImageElement) => img.naturalWidth)).toBe(1200);
    await dialog.getByRole('button', { name: 'Close' }).click();
    await dialog.waitFor({ state: 'hidden' });
    await context.close();
  }, 180_000);

  it('when a photo is picked before a new span is first saved, then it is kept, and uploads onto the span with its progress bar right after the save', async () => {
    const { context, page } = await newSpanWithHeldPhoto('Photo first-save feeder', -30.2, photoPath, false);
    const row = page.getByTestId('photo-upload-row');
    expect(await row.getAttribute('data-status')).toBe('held');
    expect(await page.getByRole('progressbar').count()).toBe(0);

    // A thin connection, so the bar is seen moving after the save.
    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 40, downloadThroughput: -1, uploadThroughput: 192 * 1024 });
    await page.getByRole('button', { name: 'Save draft' }).click();
    await page.waitForURL((u) => /^\/field\/spans\/[^/]+\/edit$/.test(u.pathname), { timeout: 20_000 });
    const spanId = new URL(page.url()).pathname.split('/')[3]!;
    await page.getByRole('progressbar', { name: /Upload of span-photo\.jpg/ }).waitFor({ state: 'visible', timeout: 20_000 });
    await row.getByTestId('photo-thumbnail').waitFor({ state: 'visible', timeout: 60_000 });
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    await row.getByText('Linked to this span').waitFor();
    const span = await (await page.request.get(`/api/spans/${spanId}`)).json();
    expect(span.photoIds).toHaveLength(1);
    await context.close();
  }, 180_000);

  it('when a new span is submitted at its first save with a photo picked before, then the page waits for the upload and the span has the photo', async () => {
    const { context, page, line } = await newSpanWithHeldPhoto('Photo first-submit feeder', -30.21, photoPath, true);

    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 40, downloadThroughput: -1, uploadThroughput: 192 * 1024 });
    await page.getByRole('button', { name: 'Submit for review' }).click();
    // The form stays while the photo goes up, its bar showing, then leaves for the field queue.
    await page.getByRole('progressbar', { name: /Upload of span-photo\.jpg/ }).waitFor({ state: 'visible', timeout: 20_000 });
    expect(new URL(page.url()).pathname).not.toBe('/field');
    await page.waitForURL((u) => u.pathname === '/field', { timeout: 60_000 });
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    const listed = (await (await page.request.get(`/api/spans?lineId=${line.id}`)).json()).items as { id: string; status: string; photoIds: string[] }[];
    expect(listed).toHaveLength(1);
    expect(listed[0]!.status).toBe('submitted');
    expect(listed[0]!.photoIds).toHaveLength(1);
    await context.close();
  }, 180_000);

  // The refusal may come before or after the submit's own answer (on a busy server the photo's 415 often wins):
  // either way the form must hear of it. The browser holds back whichever request must go second.
  for (const order of ['after', 'before'] as const) {
    it(`when the photo picked before a first submit is refused by the server (the refusal arriving ${order} the submit's answer), then the form stays on the saved span and says so beside the photo`, async () => {
      // Named like a photo, but not an image: the server judges by content and refuses it (415).
      const notImage = path.join(tmp, 'not-a-photo.jpg');
      fs.writeFileSync(notImage, 'this is a text file, not a picture\n'.repeat(50));
      const { context, page, line } = await newSpanWithHeldPhoto(`Photo refused feeder ${order}`, -30.22, notImage, true);
      const answered: string[] = [];
      page.on('response', (r) => {
        if (r.request().method() === 'POST' && /\/api\/(photos|spans\/[^/]+\/submit)$/.test(new URL(r.url()).pathname)) answered.push(r.url().endsWith('/submit') ? 'submit' : `photo ${r.status()}`);
      });
      // The upload starts once the draft exists, while the submit is on its way: one of the two is let through
      // to the server only after the other has been answered.
      const [first, second] = order === 'before' ? ['photo 415', '**/api/spans/*/submit'] : ['submit', '**/api/photos'];
      await page.route(second, async (route) => {
        if (route.request().method() === 'POST') await expect.poll(() => answered.includes(first), { timeout: 20_000 }).toBe(true);
        await route.continue();
      });
      await page.getByRole('button', { name: 'Submit for review' }).click();
      await page.waitForURL((u) => /^\/field\/spans\/[^/]+\/edit$/.test(u.pathname), { timeout: 30_000 });
      await page.getByText('Span submitted for review, but a photo was not uploaded; see the photo below.').waitFor();
      const row = page.getByTestId('photo-upload-row');
      expect(await row.getAttribute('data-status')).toBe('failed');
      await row.getByRole('alert').waitFor();
      expect(answered).toEqual(order === 'before' ? ['photo 415', 'submit'] : ['submit', 'photo 415']);
      expect(new URL(page.url()).pathname).not.toBe('/field');
      // Nothing went to the field outbox: the refusal is the server's answer, not a lost connection.
      expect(await page.getByTestId('waiting-count').count()).toBe(0);
      const listed = (await (await page.request.get(`/api/spans?lineId=${line.id}`)).json()).items as { status: string }[];
      expect(listed.map((s) => s.status)).toEqual(['submitted']);
      await context.close();
    }, 180_000);
  }

  it('when a photo has no GPS, then the surveyor places it by clicking the map and it is marked as placed by hand', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 1024, height: 1100 } });
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    const span = await makeSpan(page);
    await page.goto(`/field/spans/${span.id}/edit`);
    await page.getByTestId('photo-input').setInputFiles(noGpsPath);
    const row = page.getByTestId('photo-upload-row');
    await row.getByText('No GPS in this file.').waitFor({ timeout: 60_000 });
    await row.getByRole('button', { name: 'Place on the map' }).click();
    const dialog = page.getByRole('dialog', { name: 'Place the photo on the map' });
    await dialog.waitFor();
    const canvas = dialog.locator('canvas.maplibregl-canvas');
    await canvas.waitFor({ state: 'visible', timeout: 60_000 });
    const box = (await canvas.boundingBox())!;
    await canvas.click({ position: { x: box.width / 2, y: box.height / 2 } });
    const lat = Number(await dialog.getByLabel(/Latitude/).inputValue());
    const lon = Number(await dialog.getByLabel(/Longitude/).inputValue());
    // The map opened on the span's middle (zoom 16), so its centre is within a few metres of it.
    expect(lat).toBeCloseTo(-30.2, 3);
    expect(lon).toBeCloseTo(-130.298965, 3);
    await dialog.getByRole('button', { name: 'Place here' }).click();
    await row.getByText('(placed by hand)').waitFor();
    await dialog.waitFor({ state: 'hidden' });
    await context.close();
  }, 180_000);

  it('when the connection drops during an upload, then the photo is kept on the device and sent once when the connection returns', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 1024, height: 1100 } });
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    const span = await makeSpan(page);
    await page.goto(`/field/spans/${span.id}/edit`);
    await page.getByTestId('photo-uploader').waitFor({ timeout: 60_000 });
    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', { offline: true, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    await page.getByTestId('photo-input').setInputFiles(photoPath);
    // The file goes to the field outbox with the same Idempotency-Key the dropped upload carried.
    const kept = page.getByTestId('offline-photo');
    await kept.waitFor({ timeout: 30_000 });
    expect(await kept.innerText()).toContain('Waiting to send');
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    await expect.poll(() => page.getByTestId('offline-photo').count(), { timeout: 60_000 }).toBe(0);
    const photos = (await (await page.request.get(`/api/photos?spanId=${span.id}`)).json()).items as { id: string }[];
    expect(photos).toHaveLength(1);
    await context.close();
  }, 180_000);

  it('when the span has hazards, then the surveyor can say which one the photo shows', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 1024, height: 1100 } });
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    const kinds = (await (await page.request.get('/api/hazard-kinds')).json()).items as { id: string; label: string }[];
    expect(kinds.length).toBeGreaterThan(0);
    const span = await makeSpan(page, { hazards: [{ kindId: kinds[0].id, severity: 'high', note: 'under the perch point' }] });
    await page.goto(`/field/spans/${span.id}/edit`);
    await page.getByTestId('photo-input').setInputFiles(noGpsPath);
    const row = page.getByTestId('photo-upload-row');
    const picker = row.getByLabel('Shows hazard');
    await picker.waitFor({ timeout: 60_000 });
    await picker.selectOption({ label: `${kinds[0].label} (high) — under the perch point` });
    const photoId = (await row.getByTestId('photo-thumbnail').getAttribute('src'))!.split('/')[3];
    await expect.poll(async () => (await (await page.request.get(`/api/photos/${photoId}`)).json()).hazardId, { timeout: 20_000 }).toBe(span.hazards[0].id);
    await context.close();
  }, 180_000);
});
