// Load evidence: a planner uploads a flight record that perches on an approved demo span and sees the perch on the
// track, its predicted and measured harvest, and the measured-vs-predicted chart; the demo line shows its heat map.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

describe('load evidence', () => {
  it('when a planner uploads a flight record over an approved span, then the perch, its figures and the chart show', async () => {
    const { page } = await h.newPage({ viewport: { width: 820, height: 1180 } });
    await h.signIn(page, 'planner');
    await page.waitForURL((u) => u.pathname === '/planning');
    const spans = await (await page.request.get('/api/spans?status=approved&pageSize=1')).json();
    const span = spans.items[0];
    const structures = await (await page.request.get(`/api/structures?lineId=${span.lineId}`)).json();
    const a = structures.items.find((s: { id: string }) => s.id === span.fromStructureId);
    const b = structures.items.find((s: { id: string }) => s.id === span.toStructureId);
    const mid = { lat: (a.lat + b.lat) / 2, lon: (a.lon + b.lon) / 2 };
    const rows = ['time,lat,lon,altitude_m,battery_pct,harvest_w'];
    const t0 = Date.parse('2026-06-01T19:00:00Z'); // 10:00 at −09:00
    const at = (s: number) => new Date(t0 + s * 1000).toISOString().slice(0, 19) + '+00:00';
    let s = 0;
    for (let k = 10; k > 0; k--, s += 5) rows.push(`${at(s)},${mid.lat},${(mid.lon - k * 0.0006).toFixed(6)},30,70,`);
    for (let k = 0; k < 40; k++, s += 5) rows.push(`${at(s)},${mid.lat},${mid.lon.toFixed(6)},20,${(70 + k * 0.1).toFixed(1)},40`);
    for (let k = 1; k <= 10; k++, s += 5) rows.push(`${at(s)},${mid.lat},${(mid.lon + k * 0.0006).toFixed(6)},30,74,`);
    const file = path.join(h.dataDir, 'demo-flight.csv');
    fs.writeFileSync(file, rows.join('\n'));

    await page.getByRole('link', { name: 'Load evidence' }).first().click();
    await page.waitForURL((u) => u.pathname === '/evidence');
    await page.getByLabel('Upload a flight record').setInputFiles(file);
    const status = page.getByRole('status').filter({ hasText: 'demo-flight.csv' });
    await status.waitFor({ timeout: 30_000 });
    await expect.poll(() => status.textContent()).toMatch(/1 perch\(es\), 0 hover\(s\)/);
    expect(await page.getByRole('img', { name: 'Flight track with its stops' }).getByText('Perch 1').count()).toBe(1);
    await page.getByLabel('Measured against predicted harvest').locator('.recharts-scatter-symbol').first().waitFor({ timeout: 10_000 });
    expect(await page.getByText('40.0 W').count()).toBeGreaterThan(0); // the measured harvest, formatted
    await page.getByLabel('Residuals by line').locator('.recharts-bar-rectangle').first().waitFor({ timeout: 10_000 });
  });

  it('when the demo line with a metered year opens, then the month × hour heat map and the harvest band show', async () => {
    const { page } = await h.newPage({ viewport: { width: 820, height: 1180 } });
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    await page.goto('/evidence');
    const withSeries = page.getByRole('row').filter({ hasText: 'readings' }).first();
    await withSeries.getByRole('link').click();
    await page.waitForURL((u) => u.pathname.startsWith('/evidence/lines/'));
    const heat = page.getByRole('figure', { name: 'Median current by month and hour of day' });
    await heat.waitFor({ timeout: 20_000 });
    expect(await heat.locator('rect').count()).toBe(12 * 24);
    await page.getByLabel(/Harvest over the day for/).locator('.recharts-area').first().waitFor({ timeout: 10_000 });
    expect(await page.getByRole('button', { name: 'Check file' }).count()).toBe(1); // safety may import series
    await page.screenshot({ path: path.join(h.dataDir, 'evidence.png'), fullPage: true });
    if (process.env.EVIDENCE_SCREENSHOT) fs.copyFileSync(path.join(h.dataDir, 'evidence.png'), process.env.EVIDENCE_SCREENSHOT);
  });
});
