// On the 820 × 1180 tablet: one-row navigation, the map beside its filters, harvest and score in the spans table,
// admin decisions that keep rows still and can be undone; and nothing raw (codes, JSON, ids, long decimals)
// on the span page and the audit log, with a US-units reader seeing feet and °F in every gate detail.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { startHarness, type Harness } from './harness.ts';

const TABLET = { width: 820, height: 1180 };
let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

const within = (box: { x: number; y: number; width: number; height: number } | null) => {
  expect(box).not.toBeNull();
  expect(box!.x).toBeGreaterThanOrEqual(0);
  expect(box!.y).toBeGreaterThanOrEqual(0);
  expect(box!.x + box!.width).toBeLessThanOrEqual(TABLET.width);
  expect(box!.y + box!.height).toBeLessThanOrEqual(TABLET.height);
};

/** English words that carry a hyphen on these screens; any other lower-case-hyphen-lower-case run is an internal code. */
const HYPHENATED_WORDS = new Set(['no-perch', 'e-mail', 'sign-in', 're-measure', 'built-up', 'from-structure', 'to-structure', 'least-squares', 'data-quality', 'span-related']);

async function rawOnScreen(page: Page): Promise<string[]> {
  const text = await page.locator('main').innerText();
  const found: string[] = [];
  for (const m of text.matchAll(/\b[a-z]+(?:-[a-z]+)+\b/g)) if (!HYPHENATED_WORDS.has(m[0])) found.push(`code "${m[0]}"`);
  for (const m of text.matchAll(/[{}]|"\w+":/g)) found.push(`JSON "${m[0]}"`);
  // A coordinate keeps up to five decimals (about a metre) and carries its degree sign; any other long decimal is raw.
  for (const m of text.matchAll(/\b\d+\.\d{4,}\b(?!°)/g)) found.push(`long decimal "${m[0]}"`);
  for (const m of text.matchAll(/\b[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}\b|\b[0-9A-HJKMNP-TV-Z]{26}\b/gi)) found.push(`id "${m[0]}"`);
  for (const m of text.matchAll(/\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/g)) found.push(`raw time "${m[0]}"`);
  for (const m of text.matchAll(/\b\d{3,} min\b/g)) found.push(`minutes "${m[0]}"`);
  return found;
}

describe('tablet layouts', () => {
  it.each(['surveyor', 'safety', 'planner', 'admin'])('when the %s opens the app on the tablet, then the navigation is one row inside the screen', async (role) => {
    const { context, page } = await h.newPage({ viewport: TABLET, hasTouch: true });
    await h.signIn(page, role);
    await page.waitForURL((u) => u.pathname !== '/sign-in');
    const bar = page.getByTestId('app-bar');
    await bar.waitFor();
    const barBox = await bar.boundingBox();
    within(barBox);
    const links = page.getByRole('navigation', { name: 'Main' }).getByRole('link');
    const boxes = (await Promise.all((await links.all()).map((l) => l.boundingBox()))).filter((b) => b !== null);
    expect(boxes.length).toBeGreaterThanOrEqual(3);
    // One row: every visible entry shares the first one's line, and the bar is no taller than one entry plus its padding.
    for (const b of boxes) {
      within(b);
      expect(Math.abs(b.y - boxes[0].y)).toBeLessThan(2);
    }
    expect(barBox!.height).toBeLessThan(boxes[0].height * 2);
    // The rest are one tap away.
    const more = page.getByRole('button', { name: 'More' });
    if (await more.count()) {
      await more.click();
      const list = page.getByRole('list', { name: 'More places' });
      await list.waitFor();
      within(await list.boundingBox());
      expect(await list.getByRole('link').count()).toBeGreaterThan(0);
    }
    await context.close();
  }, 60_000);

  it('when the admin (the longest menu) opens the app on a 1280 px screen, then the bar is still one row inside the screen', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 1280, height: 900 } });
    await h.signIn(page, 'admin');
    await page.waitForURL((u) => u.pathname === '/admin');
    const bar = await page.getByTestId('app-bar').boundingBox();
    const links = page.getByRole('navigation', { name: 'Main' }).getByRole('link');
    const boxes = (await Promise.all((await links.all()).map((l) => l.boundingBox()))).filter((b) => b !== null);
    expect(boxes.length).toBe(8);
    for (const b of boxes) {
      expect(b.x + b.width).toBeLessThanOrEqual(1280);
      expect(Math.abs(b.y - boxes[0].y)).toBeLessThan(2);
    }
    const who = await page.getByTestId('who').boundingBox();
    expect(who!.x + who!.width).toBeLessThanOrEqual(1280);
    expect(bar!.height).toBeLessThan(boxes[0].height * 2);
    await context.close();
  }, 60_000);

  it('when a planner opens the map on the tablet, then the map sits beside the filters, inside the screen', async () => {
    const { context, page } = await h.newPage({ viewport: TABLET, hasTouch: true });
    await h.signIn(page, 'planner');
    await page.waitForURL((u) => u.pathname === '/planning');
    await page.goto('/map');
    const map = page.getByTestId('map');
    await map.waitFor();
    const filters = page.getByRole('region', { name: 'Filters' }).or(page.locator('section[aria-label="Filters"]')).first();
    const mapBox = await map.boundingBox();
    const filterBox = await filters.boundingBox();
    within(mapBox);
    // Beside: the map starts right of the filters and at the same height, not below them.
    expect(mapBox!.x).toBeGreaterThanOrEqual(filterBox!.x + filterBox!.width - 1);
    expect(mapBox!.y).toBeLessThan(filterBox!.y + filterBox!.height);
    expect(mapBox!.width).toBeGreaterThan(400);
    await context.close();
  }, 60_000);

  it('when a surveyor opens the spans table on the tablet, then harvest and score show without scrolling', async () => {
    const { context, page } = await h.newPage({ viewport: TABLET, hasTouch: true });
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    await page.goto('/spans');
    const table = page.getByRole('table', { name: 'Spans' });
    await table.locator('tbody tr[data-span-id]').first().waitFor();
    for (const name of ['Span', 'Status', 'Harvest', 'Score']) {
      const header = table.getByRole('columnheader', { name: new RegExp(`^${name}`) });
      const box = await header.boundingBox();
      expect(box, name).not.toBeNull();
      expect(box!.x + box!.width, `${name} inside the screen`).toBeLessThanOrEqual(TABLET.width);
    }
    // The table itself needs no sideways scrolling at this width.
    const wrapper = await table.evaluate((t) => ({ scroll: t.parentElement!.scrollWidth, client: t.parentElement!.clientWidth }));
    expect(wrapper.scroll).toBeLessThanOrEqual(wrapper.client + 1);
    await context.close();
  }, 60_000);
});

describe('admin decisions', () => {
  it('when the admin deactivates someone on the tablet, then it asks in place, the rows keep still, and Undo brings the account back', async () => {
    const { context, page } = await h.newPage({ viewport: TABLET, hasTouch: true });
    await h.signIn(page, 'admin');
    await page.waitForURL((u) => u.pathname === '/admin');
    const rows = page.locator('tr[data-user-id]');
    await expect.poll(() => rows.count(), { timeout: 20_000 }).toBeGreaterThan(2);
    // The first row with a deactivate button that has another such row below it.
    const buttons = page.getByRole('button', { name: /^Deactivate / });
    const name = (await buttons.nth(0).getAttribute('aria-label'))!.replace(/^Deactivate /, '');
    const nextName = (await buttons.nth(1).getAttribute('aria-label'))!;
    const first = page.getByRole('button', { name: `Deactivate ${name}`, exact: true });
    // The next row's button, by its own name (the first one's words change).
    const next = page.getByRole('button', { name: nextName, exact: true });
    const target = (await (await page.request.get(`/api/admin/users?q=${encodeURIComponent(name)}`)).json()).items[0];
    try {
    const nextBefore = await next.boundingBox();
    const firstBefore = await first.boundingBox();
    within(firstBefore);
    within(nextBefore);

    await first.click();
    const confirm = page.getByRole('button', { name: `Confirm: deactivate ${name}` });
    await confirm.waitFor();
    // The confirmation is where the pointer already is.
    expect(await confirm.boundingBox()).toEqual(firstBefore);
    await confirm.click();
    const notice = page.getByTestId('admin-notice');
    await notice.getByText(`${name} is deactivated`).waitFor();
    const reactivate = page.getByRole('button', { name: `Reactivate ${name}` });
    await reactivate.waitFor();
    // The deactivated row stays in its place under the "Active" filter, so the next row's button has not moved.
    expect(await reactivate.boundingBox()).toEqual(firstBefore);
    expect(await next.boundingBox()).toEqual(nextBefore);
    const users = await (await page.request.get(`/api/admin/users?q=${encodeURIComponent(name)}`)).json();
    expect(users.items[0].active).toBe(false);

    await notice.getByRole('button', { name: 'Undo' }).click();
    await page.getByRole('button', { name: `Deactivate ${name}` }).waitFor();
    const after = await (await page.request.get(`/api/admin/users?q=${encodeURIComponent(name)}`)).json();
    expect(after.items[0].active).toBe(true);
    expect(await next.boundingBox()).toEqual(nextBefore);
    } finally {
      // Whatever happened above, the later journeys need every demo account active.
      await page.request.post(`/api/admin/users/${target.id}/reactivate`, { headers: { Origin: h.baseUrl } });
    }
    await context.close();
  }, 90_000);

  it('when the admin changes someone\'s roles, then the change is said in words and Undo puts them back', async () => {
    const { context, page } = await h.newPage({ viewport: TABLET, hasTouch: true });
    await h.signIn(page, 'admin');
    await page.waitForURL((u) => u.pathname === '/admin');
    await page.getByLabel('Search').fill('planner@roostline.test');
    const edit = page.getByRole('button', { name: /^Edit / });
    await expect.poll(() => edit.count(), { timeout: 20_000 }).toBe(1);
    const before = (await (await page.request.get('/api/admin/users?q=planner%40roostline.test')).json()).items[0];
    await edit.click();
    await page.locator('tr[data-editing]').getByRole('checkbox', { name: 'Field surveyor' }).check();
    await page.getByRole('button', { name: 'Save' }).click();
    const notice = page.getByTestId('admin-notice');
    await notice.getByText(/roles Mission planner → Mission planner, Field surveyor|roles .*Field surveyor/).waitFor();
    await notice.getByRole('button', { name: 'Undo' }).click();
    await notice.getByText('is back as before').waitFor();
    const after = (await (await page.request.get('/api/admin/users?q=planner%40roostline.test')).json()).items[0];
    expect(after.roles).toEqual(before.roles);
    await context.close();
  }, 90_000);
});

describe('nothing raw on screen', () => {
  it('when a US-units safety officer opens an edited span and the audit log, then history and gate details read in words, feet and °F', async () => {
    // A surveyor edits a draft span so it has a history with a clearance, a terrain code and a version.
    const surveyor = await h.newPage({ viewport: TABLET });
    await h.signIn(surveyor.page, 'surveyor');
    await surveyor.page.waitForURL((u) => u.pathname === '/field');
    const draft = (await (await surveyor.page.request.get('/api/spans?status=draft&pageSize=1')).json()).items[0];
    expect(draft, 'a demo draft span').toBeTruthy();
    const clearanceM = Math.max(draft.clearanceM ?? 0, draft.lowestClearanceM ?? 0, 9.4) + 0.2;
    const patched = await surveyor.page.request.patch(`/api/spans/${draft.id}`, {
      headers: { Origin: h.baseUrl },
      data: { version: draft.version, clearanceM, terrain: draft.terrain === 'open-field' ? 'road' : 'open-field' },
    });
    expect(patched.status(), await patched.text()).toBe(200);
    await surveyor.context.close();

    const { context, page } = await h.newPage({ viewport: TABLET, hasTouch: true });
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    const me = await page.request.patch('/api/me', { headers: { Origin: h.baseUrl }, data: { unitSystem: 'us' } });
    expect(me.status()).toBe(200);
    await page.goto(`/spans/${draft.id}`);
    const history = page.getByRole('list', { name: 'Span history' });
    await history.waitFor({ timeout: 20_000 });
    const historyText = await history.innerText();
    // 1 ft = 0.3048 m exactly (international foot, 1959).
    expect(historyText).toContain(`${(clearanceM / 0.3048).toFixed(1)} ft`);
    expect(historyText).toContain('Open field');
    const gates = page.getByTestId('assessment-gates');
    await gates.waitFor({ timeout: 20_000 });
    const gateText = await gates.innerText();
    expect(gateText).toMatch(/\d ft/);
    expect(gateText).toMatch(/°F/);
    expect(gateText).toMatch(/ in\b/);
    expect(gateText).not.toMatch(/\d m\b|°C|\d mm\b/);
    expect(await rawOnScreen(page)).toEqual([]);

    // A submitted span that fails a gate: the span page names the gates in feet and °F, offers no approval.
    const failing = (await (await page.request.get('/api/spans?status=submitted&perchable=false&pageSize=1')).json()).items[0];
    if (failing) {
      await page.goto(`/spans/${failing.id}`);
      const panel = page.getByTestId('span-failing-gates');
      await panel.waitFor({ timeout: 20_000 });
      expect(await panel.locator('li').count()).toBeGreaterThan(0);
      expect(await panel.innerText()).not.toMatch(/\d m\b|°C|\d mm\b/);
      expect(await page.getByRole('button', { name: /^Approve/ }).count()).toBe(0);
      expect(await rawOnScreen(page)).toEqual([]);
    }

    // The audit log (the safety role's span-related part) reads the same way.
    await page.goto('/admin/audit');
    const entries = page.getByRole('list', { name: 'Audit entries' });
    await entries.locator('li').first().waitFor({ timeout: 20_000 });
    expect(await entries.innerText()).toMatch(/Edited the span/);
    expect(await rawOnScreen(page)).toEqual([]);
    expect(errors).toEqual([]);
    await context.close();
  }, 120_000);

  it('when the admin reads the whole audit log, then no entry shows a code, JSON or an id', async () => {
    const { context, page } = await h.newPage({ viewport: TABLET, hasTouch: true });
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await h.signIn(page, 'admin');
    await page.waitForURL((u) => u.pathname === '/admin');
    await page.goto('/admin/audit');
    await page.getByRole('heading', { name: 'Audit log' }).waitFor();
    await expect.poll(() => errors).toEqual([]);
    const entries = page.getByRole('list', { name: 'Audit entries' });
    await entries.locator('li').first().waitFor({ timeout: 20_000 });
    expect(await rawOnScreen(page)).toEqual([]);
    await context.close();
  }, 60_000);
});
