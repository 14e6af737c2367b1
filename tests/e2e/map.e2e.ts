import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import type { Page } from 'playwright-core';

// Map journeys: the real server and Chromium (WebGL through SwiftShader); every request must stay on the app's origin.
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
}, 240_000);
afterAll(() => h?.stop());

async function openMap(page: Page, role: string) {
  page.setDefaultTimeout(120_000);
  await h.signIn(page, role);
  await page.waitForURL((u) => u.pathname !== '/sign-in');
  await page.goto('/map');
  await page.getByRole('heading', { level: 1, name: 'Map' }).waitFor();
  // SwiftShader draws WebGL on the CPU: on a busy machine the first idle can take a while.
  await page.locator('[data-testid="map"][data-map-ready="true"]').waitFor({ timeout: 150_000 });
}

/** Spread of the canvas' pixel values: a blank or single-colour canvas has (almost) none. */
async function canvasStats(page: Page) {
  const png = await page.locator('[data-testid="map"] canvas.maplibregl-canvas').screenshot();
  const { data, info } = await sharp(png).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  const colours = new Set<number>();
  let sum = 0;
  let sumSq = 0;
  for (let i = 0; i < data.length; i += 3) {
    const grey = (data[i] + data[i + 1] + data[i + 2]) / 3;
    sum += grey;
    sumSq += grey * grey;
    colours.add((data[i] >> 3) * 1024 + (data[i + 1] >> 3) * 32 + (data[i + 2] >> 3));
  }
  const n = info.width * info.height;
  const mean = sum / n;
  return { stddev: Math.sqrt(sumSq / n - mean * mean), colours: colours.size, width: info.width };
}

function foreignRequests() {
  const origin = new URL(h.baseUrl).origin;
  return h.requests.filter((u) => !u.startsWith('data:') && !u.startsWith('blob:') && new URL(u).origin !== origin);
}

describe('the map', () => {
  it('when a planner opens the map, then the basemap and the spans render (the canvas is not blank) from the app alone', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 1280, height: 900 } });
    await openMap(page, 'planner');
    const stats = await canvasStats(page);
    expect(stats.width).toBeGreaterThan(300);
    expect(stats.stddev).toBeGreaterThan(4);
    expect(stats.colours).toBeGreaterThan(20);
    // The style loaded its own sources: span tiles and the basemap answered from the app.
    const tileRequests = h.requests.filter((u) => u.includes('/api/tiles/spans/'));
    expect(tileRequests.length).toBeGreaterThan(0);
    expect(h.requests.some((u) => u.includes('/map/basemap/'))).toBe(true);
    const rendered = await page.evaluate(() => {
      const m = (window as unknown as { __roostlineMap: { querySourceFeatures: (s: string, o: object) => unknown[] } }).__roostlineMap;
      return { spans: m.querySourceFeatures('spans', { sourceLayer: 'spans' }).length, land: m.querySourceFeatures('basemap', { sourceLayer: 'land' }).length };
    });
    expect(rendered.land).toBeGreaterThan(0);
    expect(rendered.spans).toBeGreaterThan(0);
    // Nothing the planner can draw: no zone tool.
    expect(await page.getByRole('button', { name: 'Draw a no-perch zone' }).count()).toBe(0);
    await page.getByRole('button', { name: 'Score' }).click();
    await page.waitForURL((u) => u.searchParams.get('colour') === 'score');
    await page.getByLabel('Min. harvest (W)').fill('1');
    await page.waitForURL((u) => u.searchParams.get('minHarvestW') === '1');
    await page.locator('a[href="/spans?minHarvestW=1"]', { hasText: 'Same filters in the spans table' }).waitFor();
    expect(foreignRequests()).toEqual([]);
    await context.close();
  }, 300_000);

  it('when a safety officer draws a polygon on the map and fills the form, then the zone is saved and listed by GET /api/zones', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 1280, height: 900 }, hasTouch: false });
    await openMap(page, 'safety');
    await page.getByRole('button', { name: 'Draw a no-perch zone' }).click();
    await page.getByText('Tap the corners of the zone on the map').waitFor();
    const box = (await page.locator('[data-testid="map"]').boundingBox())!;
    const cx = box.x + box.width / 2;
    const cy = box.y + box.height / 2;
    const corners = [
      [cx - 90, cy - 70],
      [cx + 90, cy - 70],
      [cx + 90, cy + 70],
      [cx - 90, cy + 70],
    ];
    for (const [x, y] of corners) {
      await page.mouse.move(x, y);
      await page.mouse.click(x, y);
      await page.waitForTimeout(150);
    }
    await page.mouse.move(corners[0][0], corners[0][1]);
    await page.mouse.click(corners[0][0], corners[0][1]);
    await page.getByRole('heading', { name: 'New no-perch zone' }).waitFor();
    await page.getByLabel('Name').fill('Browser-drawn zone');
    await page.getByLabel('Reason').fill('Crane works beside the line');
    await page.getByLabel('Caution').check();
    await page.getByLabel('Valid from').fill('2026-01-01');
    await page.getByRole('button', { name: 'Save zone' }).click();
    await page.getByRole('button', { name: 'Draw a no-perch zone' }).waitFor();
    const zones = await page.evaluate(async () => (await fetch('/api/zones')).json());
    const mine = zones.features.find((f: { properties: { name: string } }) => f.properties.name === 'Browser-drawn zone');
    expect(mine).toBeTruthy();
    expect(mine.properties).toMatchObject({ severity: 'caution', reason: 'Crane works beside the line', validFrom: '2026-01-01' });
    const ring = mine.geometry.coordinates[0];
    expect(ring.length).toBe(5);
    expect(ring[0]).toEqual(ring[4]);
    expect(foreignRequests()).toEqual([]);
    await context.close();
  }, 300_000);
});
