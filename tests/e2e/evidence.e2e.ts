// Load evidence: a planner uploads a flight record that perches on an approved demo span and sees the perch on the
// track, its predicted and measured harvest, and the measured-vs-predicted chart; the demo line shows its heat map.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from './harness.ts';
import { DEMO_TOWNS } from '../../shared/demo-region.ts';
import { CLAMP_S, LIGHT_QUAD } from '../../shared/engineering/demo-profiles.ts';

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

    // On the tablet the place sits in the navigation's "More" menu.
    const inBar = page.getByRole('navigation').getByRole('link', { name: 'Load evidence' });
    if (!(await inBar.first().isVisible())) await page.getByRole('button', { name: 'More' }).click();
    await page.getByRole('link', { name: 'Load evidence' }).filter({ visible: true }).first().click();
    await page.waitForURL((u) => u.pathname === '/evidence');
    await page.getByLabel('Upload a flight record').setInputFiles(file);
    const status = page.getByRole('status').filter({ hasText: 'demo-flight.csv' });
    await status.waitFor({ timeout: 30_000 });
    await expect.poll(() => status.textContent()).toMatch(/1 perch\(es\), 0 hover\(s\)/);
    // The track and its stops on the app's map: the perch is drawn, and so is the span it matched.
    await page.locator('[data-testid="flight-map"][data-map-ready="true"]').waitFor({ timeout: 30_000 });
    const drawn = await page.waitForFunction(
      () => {
        const m = (window as unknown as { __roostlineFlightMap?: { queryRenderedFeatures: (o: object) => { properties: Record<string, unknown> }[]; areTilesLoaded: () => boolean } }).__roostlineFlightMap;
        if (!m || !m.areTilesLoaded()) return null;
        const stops = m.queryRenderedFeatures({ layers: ['flight-stops'] }).map((f) => f.properties.label);
        const spans = m.queryRenderedFeatures({ layers: ['flight-matched-spans'] }).map((f) => f.properties.id);
        const track = m.queryRenderedFeatures({ layers: ['flight-track'] }).length;
        return stops.length && spans.length && track ? { stops, spans } : null;
      },
      undefined,
      { timeout: 20_000 },
    );
    const features = (await drawn.jsonValue()) as { stops: string[]; spans: string[] };
    expect([...new Set(features.stops)]).toEqual(['Perch 1']);
    expect(new Set(features.spans)).toEqual(new Set([span.id]));
    expect(await page.getByRole('list', { name: 'Flight map legend' }).getByText('Span a perch matched').count()).toBe(1);
    // A click on the perch names its span and the distance, with a link to the span.
    const onScreen = await page.evaluate(({ lon, lat }) => {
      const m = (window as unknown as { __roostlineFlightMap: { project: (c: [number, number]) => { x: number; y: number }; getCanvas: () => HTMLCanvasElement } }).__roostlineFlightMap;
      const p = m.project([lon, lat]);
      const r = m.getCanvas().getBoundingClientRect();
      return { x: r.left + p.x, y: r.top + p.y };
    }, mid);
    await page.mouse.click(onScreen.x, onScreen.y);
    const popup = page.getByTestId('flight-stop-popup');
    await popup.waitFor({ timeout: 10_000 });
    expect(await popup.textContent()).toMatch(/Perch 1.*m from span .+ → .+40\.0 W measured/);
    expect(await popup.getByRole('link').getAttribute('href')).toBe(`/spans/${span.id}`);
    if (process.env.EVIDENCE_SCREENSHOT) await page.getByTestId('flight-map').screenshot({ path: process.env.EVIDENCE_SCREENSHOT.replace(/\.png$/, '-flight-map.png') });
    await page.getByLabel('Measured against predicted harvest').locator('.recharts-scatter-symbol').first().waitFor({ timeout: 10_000 });
    expect(await page.getByText('40.0 W').count()).toBeGreaterThan(0); // the measured harvest, formatted
    await page.getByLabel('Residuals by line').locator('.recharts-bar-rectangle').first().waitFor({ timeout: 10_000 });
  });

  it('when a flight measured less than half the predicted harvest on a span, then the review desk and the span page flag it and link to the flight', async () => {
    const { page } = await h.newPage({ viewport: { width: 820, height: 1180 } });
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    // A span of the desk's approved queue (the queue shows the longest-waiting ones).
    await page.getByRole('tab', { name: 'Approved' }).click();
    await page.getByRole('heading', { name: /^Approved · \d+ spans?/ }).waitFor({ timeout: 15_000 });
    // The previous queue's rows may stay on screen until the approved queue arrives: take a row once it is approved.
    let found: { id: string; status: string; lineId: string; fromStructureId: string; toStructureId: string } | undefined;
    await expect
      .poll(async () => {
        const id = await page.locator('[data-span-id]').nth(1).getAttribute('data-span-id');
        found = id ? await (await page.request.get(`/api/spans/${id}`)).json() : undefined;
        return found?.status;
      }, { timeout: 15_000 })
      .toBe('approved');
    const span = found!;
    const structures = await (await page.request.get(`/api/structures?lineId=${span.lineId}`)).json();
    const a = structures.items.find((s: { id: string }) => s.id === span.fromStructureId);
    const b = structures.items.find((s: { id: string }) => s.id === span.toStructureId);
    const mid = { lat: (a.lat + b.lat) / 2, lon: (a.lon + b.lon) / 2 };
    const rows = ['time,lat,lon,altitude_m,battery_pct,harvest_w'];
    const t0 = Date.parse('2026-06-02T19:00:00Z');
    const at = (s: number) => new Date(t0 + s * 1000).toISOString().slice(0, 19) + '+00:00';
    let s = 0;
    for (let k = 10; k > 0; k--, s += 5) rows.push(`${at(s)},${mid.lat},${(mid.lon - k * 0.0006).toFixed(6)},30,70,`);
    for (let k = 0; k < 40; k++, s += 5) rows.push(`${at(s)},${mid.lat},${mid.lon.toFixed(6)},20,${(70 + k * 0.01).toFixed(2)},0.5`);
    for (let k = 1; k <= 10; k++, s += 5) rows.push(`${at(s)},${mid.lat},${(mid.lon + k * 0.0006).toFixed(6)},30,71,`);
    const up = await page.request.post('/api/flight-records', {
      headers: { Origin: h.baseUrl },
      multipart: { file: { name: 'weak-perch.csv', mimeType: 'text/csv', buffer: Buffer.from(rows.join('\n')) } },
    });
    expect(up.status()).toBe(201);
    const upBody = await up.json();
    const perch = upBody.events.find((e: { kind: string }) => e.kind === 'perch');
    expect(perch.spanId).toBe(span.id);
    expect(perch.lowHarvest).toBe(true);

    // The review desk: that span; the flag sits beside the decision.
    await page.locator(`[data-span-id="${span.id}"]`).click();
    const flag = page.getByTestId('harvest-evidence-flag');
    await flag.waitFor({ timeout: 15_000 });
    expect(await flag.textContent()).toMatch(/Measured harvest below half the prediction.*1 of 1 perch on this span harvested less than 50 %/);
    expect(await flag.getByRole('link', { name: /Load evidence for/ }).getAttribute('href')).toBe(`/evidence/lines/${span.lineId}`);
    if (process.env.EVIDENCE_SCREENSHOT) await page.screenshot({ path: process.env.EVIDENCE_SCREENSHOT.replace(/\.png$/, '-desk.png') });

    // The span page: the same flag, and each harvest figure names the load it rests on.
    await page.goto(`/spans/${span.id}`);
    await page.getByTestId('harvest-evidence-flag').waitFor({ timeout: 15_000 });
    const pairs = await (await page.request.get(`/api/spans/${span.id}/assessments`)).json();
    const src = pairs.items[0].loadSource;
    const months = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
    const expected = src.kind === 'measured' ? `load: measured, ${months[Number(src.month.slice(5)) - 1]} ${src.month.slice(0, 4)}` : src.kind === 'span-estimate' ? "load: typed estimate (this span's)" : "load: typed estimate (the line's)";
    const labels = page.getByTestId('harvest-load-source');
    await labels.first().waitFor({ timeout: 15_000 });
    expect(await labels.count()).toBe(4); // typical, charge time, minimum, peak
    for (const t of await labels.allTextContents()) expect(t).toBe(expected);
    if (process.env.EVIDENCE_SCREENSHOT) await page.screenshot({ path: process.env.EVIDENCE_SCREENSHOT.replace(/\.png$/, '-span.png'), fullPage: true });

    // The flag's link opens the flight record with the perch.
    await page.getByTestId('harvest-evidence-flag').getByRole('link', { name: 'Latest flight record' }).click();
    await page.waitForURL((u) => u.pathname.startsWith('/evidence/flights/'));
    await page.getByRole('status').filter({ hasText: 'weak-perch.csv' }).waitFor({ timeout: 15_000 });
    expect(await page.getByText('below half').count()).toBeGreaterThan(0);
  });

  it('when a flight record is uploaded on a saved mission\'s page, then the planned and flown timeline shows each perch against the plan', async () => {
    const { page } = await h.newPage({ viewport: { width: 820, height: 1180 } });
    await h.signIn(page, 'planner');
    await page.waitForURL((u) => u.pathname === '/planning');
    // The demo route (depot to yard, as the demo mission), departing 09:00 at UTC−09:00 tomorrow.
    const town = (id: string) => DEMO_TOWNS.find((x) => x.id === id)!;
    const base = { lat: town('skelloway-end').lat, lon: town('skelloway-end').lon };
    const target = { lat: town('wendlecross').lat, lon: town('wendlecross').lon };
    const local = new Date(Date.now() - 9 * 3_600_000 + 86_400_000);
    const departAt = `${local.toISOString().slice(0, 10)}T09:00:00-09:00`;
    const saved = await page.request.post('/api/missions', {
      headers: { Origin: h.baseUrl },
      data: { name: 'Flown check', droneProfileId: LIGHT_QUAD.id, harvesterProfileId: CLAMP_S.id, base, target, departAt },
    });
    expect(saved.status()).toBe(201);
    const mission = await saved.json();
    const plan = mission.plan;
    expect(plan.feasible).toBe(true);
    expect(plan.perches.length).toBeGreaterThan(0);

    // The flight as flown: off 4 min late, along each leg (a point every 30 s), 90 % of each planned dwell on its span.
    const rows = ['time,lat,lon,altitude_m,battery_pct,harvest_w'];
    let t = Date.parse(departAt) + 240_000;
    const stamp = (ms: number) => new Date(ms).toISOString().slice(0, 19) + '+00:00';
    const stops = [base, ...plan.perches.map((p: { lat: number; lon: number }) => ({ lat: p.lat, lon: p.lon })), target];
    plan.legs.forEach((leg: { durationS: number }, i: number) => {
      const a = stops[i];
      const b = stops[i + 1];
      const n = Math.max(2, Math.round(leg.durationS / 30));
      for (let k = 0; k < n; k++, t += (leg.durationS * 1000) / n) rows.push(`${stamp(t)},${(a.lat + ((b.lat - a.lat) * k) / n).toFixed(6)},${(a.lon + ((b.lon - a.lon) * k) / n).toFixed(6)},40,60,`);
      const p = plan.perches[i];
      if (p && i < plan.perches.length) {
        const end = t + p.dwellS * 900;
        for (; t < end; t += 30_000) rows.push(`${stamp(t)},${b.lat.toFixed(6)},${b.lon.toFixed(6)},20,70,40`);
      }
    });
    rows.push(`${stamp(t)},${target.lat},${target.lon},0,50,`);
    const file = path.join(h.dataDir, 'mission-flight.csv');
    fs.writeFileSync(file, rows.join('\n'));

    await page.goto(`/missions/${mission.id}`);
    const section = page.getByTestId('mission-flown');
    await section.waitFor({ timeout: 30_000 });
    await section.getByLabel("Upload this mission's flight record (CSV or GPX)").setInputFiles(file);
    const status = section.getByRole('status');
    await status.waitFor({ timeout: 30_000 });
    const n = plan.perches.length;
    expect(await status.textContent()).toMatch(new RegExp(`Took off 4 min late .*; ${n} of ${n} planned perches flown`));
    const figure = page.getByRole('figure', { name: 'Planned and flown timeline' });
    const segments = figure.locator('.timeline-segment .recharts-bar-rectangle');
    await segments.first().waitFor({ timeout: 10_000 });
    // Planned and flown: legs + dwells each (2n + 1 segments per row).
    expect(await segments.count()).toBe(2 * (2 * n + 1));
    const cells = await section.locator('tbody tr').allTextContents();
    expect(cells).toHaveLength(n);
    for (const row of cells) expect(row).not.toMatch(/not flown/);
    if (process.env.EVIDENCE_SCREENSHOT) await section.screenshot({ path: process.env.EVIDENCE_SCREENSHOT.replace(/\.png$/, '-flown.png') });
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
