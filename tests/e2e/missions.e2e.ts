import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

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
});
