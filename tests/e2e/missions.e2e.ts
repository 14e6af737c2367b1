import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_MISSION } from '../../server/seeders/demo-missions.ts';
import { DEMO_LINES } from '../../server/seeders/demo-inventory.ts';

// Mission screens in Chromium against the real server: placing the base and the target on the plan map,
// the drone energy fields on the profile page, and the lines' permission pages.
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
}, 240_000);
afterAll(() => h?.stop());

async function signedIn(page: Page, role: string) {
  page.setDefaultTimeout(120_000);
  await h.signIn(page, role);
  await page.waitForURL((u) => u.pathname !== '/sign-in');
}

describe('mission screens', () => {
  it('when a planner clicks the plan map twice, then the base and then the target are placed and their coordinates fill the typed fields', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 1280, height: 1000 } });
    await signedIn(page, 'planner');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Missions' }).click();
    await page.getByRole('link', { name: 'Plan a mission' }).click();
    await page.getByRole('heading', { level: 1, name: 'Plan a mission' }).waitFor();
    await expect(page.getByRole('note').first().textContent()).resolves.toContain('airspace rules');
    await page.locator('[data-testid="plan-map"][data-map-ready="true"]').waitFor({ timeout: 150_000 });
    const box = (await page.locator('[data-testid="plan-map"]').boundingBox())!;
    await page.mouse.click(box.x + box.width * 0.3, box.y + box.height * 0.6);
    await page.getByTestId('pin-base').waitFor();
    await page.mouse.click(box.x + box.width * 0.7, box.y + box.height * 0.35);
    await page.getByTestId('pin-target').waitFor();
    const baseLat = Number(await page.getByLabel('Base latitude (°)').inputValue());
    const targetLat = Number(await page.getByLabel('Target latitude (°)').inputValue());
    const baseLon = Number(await page.getByLabel('Base longitude (°)').inputValue());
    const targetLon = Number(await page.getByLabel('Target longitude (°)').inputValue());
    // The second click was higher and further right on a north-up map: north and east of the base.
    expect(targetLat).toBeGreaterThan(baseLat);
    expect(targetLon).toBeGreaterThan(baseLon);
    // Typing a coordinate moves the marker's field value, and the plan button is ready.
    await page.getByLabel('Base latitude (°)').fill(String(baseLat - 0.01));
    expect(await page.getByRole('button', { name: 'Plan the route' }).isEnabled()).toBe(true);
    await context.close();
  });

  it('when an admin saves a drone profile’s mission energy fields, then every stored value shows when the form reopens', async () => {
    const { context, page } = await h.newPage();
    await signedIn(page, 'admin');
    await page.goto('/admin/profiles');
    await page.getByRole('heading', { name: 'Drone profiles' }).waitFor();
    const drones = page.locator('section[aria-labelledby="drones-title"]');
    await drones.getByRole('button', { name: 'Edit' }).first().click();
    const values: Record<string, string> = { cruisePowerW: '321', perchManoeuvreWh: '4.5', chargeEfficiency: '0.93', chargeToPercent: '95' };
    for (const [key, v] of Object.entries(values)) await page.locator(`#drone-${key}`).fill(v);
    await page.getByRole('button', { name: /Save as version/ }).click();
    // The list shows the saved version's cruise power once the profiles are read again.
    await drones.getByText('cruise 321.0 W').or(drones.getByText('cruise 321 W')).first().waitFor();
    await drones.getByRole('button', { name: 'Edit' }).first().click();
    for (const [key, v] of Object.entries(values)) expect(await page.locator(`#drone-${key}`).inputValue()).toBe(v);
    await context.close();
  });

  it('when safety opens a line, then its permission list and the form to add one show', async () => {
    const { context, page } = await h.newPage();
    await signedIn(page, 'safety');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Lines' }).click();
    await page.getByRole('heading', { level: 1, name: 'Lines' }).waitFor();
    await page.locator('main ul a').first().click();
    await page.getByRole('heading', { name: /permissions to perch/ }).waitFor();
    await page.getByRole('form', { name: 'Add a permission' }).waitFor();
    await page.getByRole('button', { name: 'Add permission' }).click();
    await page.getByText('Enter the owner’s reference').waitFor();
    await context.close();
  });

  it('when safety enters a permission with the owner’s PDF, then it is listed with its document; the demo feeder’s old one shows as expired', async () => {
    const { context, page } = await h.newPage();
    page.setDefaultTimeout(60_000);
    await signedIn(page, 'safety');
    await page.goto('/lines');
    await page.getByRole('heading', { level: 1, name: 'Lines' }).waitFor();
    // The demo's third line holds only a permission that ended last year.
    await page.getByRole('link', { name: DEMO_LINES[2]!.name }).click();
    const list = page.getByTestId('permissions');
    await list.getByText('Expired').waitFor();
    await page.goto('/lines');
    await page.getByRole('link', { name: DEMO_LINES[1]!.name }).click();
    await page.getByRole('heading', { name: /permissions to perch/ }).waitFor();
    const year = new Date().getUTCFullYear();
    await page.getByLabel('Owner’s reference').fill('JOURNEY-PERCH-1');
    await page.getByLabel('Valid from').fill(`${year}-01-01`);
    await page.getByLabel('Valid to').fill(`${year + 1}-06-30`);
    await page.getByLabel('Conditions').fill('Daylight only.');
    // A hand-made one-page PDF: header, objects and the end-of-file marker.
    const pdf = Buffer.from('%PDF-1.4\n1 0 obj\n<< /Type /Catalog /Pages 2 0 R >>\nendobj\n2 0 obj\n<< /Type /Pages /Kids [] /Count 0 >>\nendobj\ntrailer\n<< /Root 1 0 R >>\n%%EOF\n', 'latin1');
    await page.getByLabel(/Document \(PDF or image\)/).setInputFiles({ name: 'owner-letter.pdf', mimeType: 'application/pdf', buffer: pdf });
    await page.getByRole('button', { name: 'Add permission' }).click();
    const item = list.locator('li', { hasText: 'JOURNEY-PERCH-1' });
    await item.getByRole('link', { name: 'owner-letter.pdf' }).waitFor();
    expect(await item.textContent()).toContain(`1 Jan ${year}`);
    expect(await item.textContent()).toContain('Conditions: Daylight only.');
    expect(await item.getByText('Expired').count()).toBe(0);
    const href = (await item.getByRole('link', { name: 'owner-letter.pdf' }).getAttribute('href'))!;
    const res = await page.request.get(href);
    expect(res.status()).toBe(200);
    expect(res.headers()['content-type']).toBe('application/pdf');
    expect(Buffer.compare(await res.body(), pdf)).toBe(0);
    await context.close();
  });
});

const haveXmllint = spawnSync('xmllint', ['--version']).status === 0;
if (!haveXmllint) console.log('The missions journey skips its GPX schema check: no xmllint (apt-get install -y libxml2-utils).');

describe('the demo mission end to end', () => {
  it('when a planner plans the demo route on the map, saves it and exports GPX, safety authorises it, and a perch span is suspended, then the mission is marked for a new plan', async () => {
    // ---- the planner plans on the map ----
    const planner = await h.newPage({ viewport: { width: 1280, height: 1000 } });
    const page = planner.page;
    const t0 = Date.now();
    const step = (what: string) => console.log(`[missions journey] ${Math.round((Date.now() - t0) / 1000)} s: ${what}`);
    page.on('pageerror', (e) => console.log('[page error]', e.message));
    try {
      await signedIn(page, 'planner');
      page.setDefaultTimeout(60_000);
      await page.goto('/missions/new');
      await page.getByRole('heading', { level: 1, name: 'Plan a mission' }).waitFor();
      await page.locator('[data-testid="plan-map"][data-map-ready="true"]').waitFor({ timeout: 150_000 });
      const box = (await page.locator('[data-testid="plan-map"]').boundingBox())!;
      await page.mouse.click(box.x + box.width * 0.3, box.y + box.height * 0.4);
      await page.getByTestId('pin-base').waitFor();
      await page.mouse.click(box.x + box.width * 0.6, box.y + box.height * 0.6);
      await page.getByTestId('pin-target').waitFor();
      // The demo depot and job site, typed to the metre after the clicks.
      await page.getByLabel('Base latitude (°)').fill(String(DEMO_MISSION.base.lat));
      await page.getByLabel('Base longitude (°)').fill(String(DEMO_MISSION.base.lon));
      await page.getByLabel('Target latitude (°)').fill(String(DEMO_MISSION.target.lat));
      await page.getByLabel('Target longitude (°)').fill(String(DEMO_MISSION.target.lon));
      step('typed the demo route');
      await page.getByRole('button', { name: 'Plan the route' }).click();
      const planView = page.getByRole('region', { name: 'The plan' });
      await planView.waitFor();
      // The charge chart is drawn (an SVG line from recharts), from 100 % at departure.
      const chart = planView.getByTestId('charge-chart');
      await chart.locator('svg path.recharts-curve').first().waitFor();
      expect(await chart.getByRole('img').getAttribute('aria-label')).toMatch(/^Battery charge from 100/);
      const perchRows = planView.getByTestId('perch-table').locator('tbody tr');
      expect(await perchRows.count()).toBeGreaterThanOrEqual(2);
      // Every plan view carries the mission caution: the page's and the plan's own.
      expect(await planView.getByRole('note').textContent()).toContain("pilot's own judgement");
      expect(await page.getByRole('note').first().textContent()).toContain('airspace rules');
      // The route is on the map with a marker per perch.
      expect(await page.locator('[data-testid="plan-map"] [title^="Perch"]').count()).toBeGreaterThanOrEqual(2);

      // ---- moves a perch point off mid-span, then back ----
      step('moves a perch point');
      const firstPoint = planView.getByTestId('perch-point').first();
      expect(await firstPoint.innerText()).toMatch(/^Mid-span: /);
      const move = planView.getByRole('form', { name: 'Move a perch point' });
      await move.getByLabel(/^Distance from /).fill('30');
      await move.getByRole('button', { name: 'Move and plan again' }).click();
      await expect.poll(() => planView.getByTestId('perch-point').first().innerText(), { timeout: 15_000 }).toMatch(/^Moved by the planner: 30(\.0)? (m|ft) from /);
      await move.getByRole('button', { name: 'Back to mid-span' }).click();
      await expect.poll(() => planView.getByTestId('perch-point').first().innerText(), { timeout: 15_000 }).toMatch(/^Mid-span: /);

      // ---- saves ----
      step('saves');
      await page.getByLabel('Mission name').fill('Journey: depot to yard');
      await page.getByRole('button', { name: 'Save as a mission' }).click();
      await page.waitForURL(/\/missions\/(?!new)[^/]+$/);
      const missionUrl = new URL(page.url()).pathname;
      const record = page.getByRole('region', { name: 'Mission record' });
      await record.getByText('Awaiting authorisation').waitFor();

      // ---- exports GPX ----
      step('exports GPX');
      const [download] = await Promise.all([page.waitForEvent('download'), record.getByRole('link', { name: 'Export GPX' }).click()]);
      expect(download.suggestedFilename()).toMatch(/\.gpx$/);
      const file = path.join(h.dataDir, 'journey.gpx');
      await download.saveAs(file);
      const gpx = fs.readFileSync(file, 'utf8');
      expect(gpx).toContain('<gpx version="1.1"');
      // One rtept per base, perch and job site (api.md "Missions").
      expect(gpx.match(/<rtept /g)?.length).toBe((await perchRows.count()) + 2);
      if (haveXmllint) {
        const r = spawnSync('xmllint', ['--noout', '--nonet', '--schema', path.resolve('tests/fixtures/gpx/gpx-1.1.xsd'), file], { encoding: 'utf8' });
        expect(r.status, r.stderr).toBe(0);
      }

      // ---- the brief, printable on A4 and Letter ----
      step('the brief, printable on A4 and Letter');
      await record.getByRole('link', { name: 'Mission brief' }).click();
      await page.getByRole('heading', { level: 1, name: 'Journey: depot to yard' }).waitFor();
      expect(await page.getByRole('note').first().textContent()).toContain('airspace rules');
      await page.getByRole('heading', { name: 'Line owners\u2019 permissions' }).or(page.getByRole('heading', { name: "Line owners' permissions" })).waitFor();
      await page.getByText('covers the departure day').first().waitFor();
      for (const paper of ['a4', 'letter'] as const) {
        await page.emulateMedia({ media: 'screen' });
        await page.getByRole('combobox').selectOption(paper);
        await page.emulateMedia({ media: 'print' });
        // Printed: the app's header and the brief's own buttons are left off, the sign-off lines stay; the named @page sets the sheet.
        expect(await page.locator('.brief-no-print').isVisible()).toBe(false);
        expect(await page.getByRole('region', { name: 'Sign-off' }).isVisible()).toBe(true);
        expect(await page.locator('.brief').evaluate((el) => getComputedStyle(el).getPropertyValue('page'))).toBe(paper);
        const pdf = await page.pdf({ preferCSSPageSize: true });
        expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
        // ISO 216 A4 is 595 × 842 pt; US Letter 612 × 792 pt (the PDF's MediaBox).
        const box = /\/MediaBox\s*\[\s*0 0 ([\d.]+) ([\d.]+)\s*\]/.exec(pdf.toString('latin1'));
        expect(box && [Math.round(Number(box[1])), Math.round(Number(box[2]))]).toEqual(paper === 'a4' ? [595, 842] : [612, 792]);
      }
      await page.emulateMedia({ media: 'screen' });

      // ---- safety authorises ----
      step('safety authorises');
      const safety = await h.newPage({ viewport: { width: 1280, height: 1000 } });
      await signedIn(safety.page, 'safety');
      safety.page.setDefaultTimeout(60_000);
      await safety.page.goto(missionUrl);
      const safetyRecord = safety.page.getByRole('region', { name: 'Mission record' });
      await safetyRecord.getByRole('button', { name: 'Authorise' }).click();
      await safetyRecord.getByText('Authorised', { exact: false }).first().waitFor();
      expect(await safetyRecord.getByText('✓ Authorised').count()).toBe(1);

      // ---- a suspension of a perch span marks the mission for a new plan ----
      step('a suspension of a perch span marks the mission for a new plan');
      await safety.page.getByTestId('perch-table').locator('tbody tr').first().getByRole('link').first().click();
      await safety.page.waitForURL(/\/spans\/[^/]+$/);
      await safety.page.getByRole('button', { name: 'Suspend…' }).click();
      await safety.page.getByLabel('Why is this span suspended?').fill('Crossing works below this span from tomorrow.');
      await safety.page.getByRole('button', { name: 'Suspend this span' }).click();
      await safety.page.getByRole('status').getByText('Suspended.').waitFor();

      await page.goto(missionUrl);
      await page.getByTestId('stale-badge').waitFor();
      const reasons = await page.getByTestId('stale-reasons').textContent();
      expect(reasons).toMatch(/suspended/);
      // The history says so in words, after the save and the authorisation.
      const history = page.getByRole('region', { name: 'Mission record' }).locator('details');
      await history.getByText('Marked for a new plan', { exact: false }).waitFor({ state: 'attached' });
      expect(await history.textContent()).toMatch(/Saved.*Authorised.*Marked for a new plan/s);
      // The planner sees no authorise button and the safety officer cannot authorise a plan that no longer holds.
      await safety.page.goto(missionUrl);
      await safety.page.getByTestId('stale-badge').waitFor();
      const authorise = safety.page.getByRole('region', { name: 'Mission record' }).getByRole('button', { name: 'Authorise' });
      expect((await authorise.count()) === 0 || (await authorise.isDisabled())).toBe(true);
      await planner.context.close();
      await safety.context.close();
    } catch (err) {
      await page.screenshot({ path: path.join(os.tmpdir(), 'missions-journey-failure.png') }).catch(() => undefined);
      throw err;
    }
  }, 400_000);
});
