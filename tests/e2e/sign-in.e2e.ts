import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

const HOMES = [
  { role: 'surveyor', path: '/field', heading: 'Field queue' },
  { role: 'safety', path: '/review', heading: 'Review desk' },
  { role: 'planner', path: '/planning', heading: 'Planning' },
  { role: 'admin', path: '/admin', heading: 'Admin' },
];

describe('sign-in journeys', () => {
  it.each(HOMES)('when the $role signs in through the page, then they land on $path', async ({ role, path, heading }) => {
    const { context, page } = await h.newPage();
    await h.signIn(page, role);
    await page.waitForURL((u) => u.pathname === path);
    const title = page.getByRole('heading', { level: 1, name: heading });
    await title.waitFor();
    expect(await title.innerText()).toBe(heading);
    // Navigation shows only what the role may do.
    const nav = await page.getByRole('navigation', { name: 'Main' }).innerText();
    for (const other of HOMES.filter((x) => x.role !== role)) {
      expect(nav).not.toContain(other.heading === 'Field queue' ? 'My spans' : other.heading);
    }
    await page.getByTestId('who').click();
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL((u) => u.pathname === '/sign-in');
    await context.close();
  });

  it('when the password is wrong, then the page shows the error and stays on sign-in', async () => {
    const { context, page } = await h.newPage();
    await h.signIn(page, 'planner', 'not-the-password');
    const alert = page.getByRole('alert');
    await alert.waitFor();
    expect(await alert.innerText()).toContain('E-mail or password is incorrect');
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    await context.close();
  });

  it('when a signed-out visitor opens a deep link, then sign-in brings them back to it', async () => {
    const { context, page } = await h.newPage();
    await page.goto('/account');
    await page.waitForURL((u) => u.pathname === '/sign-in');
    await page.getByLabel('E-mail').fill('planner@roostline.test');
    await page.getByLabel('Password').fill('roostline-demo');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => u.pathname === '/account');
    await page.goto('/no-such-page');
    await page.getByText('That page does not exist.').waitFor();
    await context.close();
  });
});

describe('planning home', () => {
  it('when the planner lands, then approved spans are listed by harvestable power, highest first, with a chart', async () => {
    const { context, page } = await h.newPage();
    await h.signIn(page, 'planner');
    await page.waitForURL((u) => u.pathname === '/planning');
    const rows = page.locator('section[aria-labelledby="top-spans"] tbody tr');
    await rows.first().waitFor({ timeout: 60_000 });
    const watts = (await rows.locator('td:nth-child(3)').allInnerTexts()).map((t) => parseFloat(t));
    expect(watts.length).toBeGreaterThan(1);
    expect(watts.every((w) => w >= 20)).toBe(true);
    expect([...watts].sort((a, b) => b - a)).toEqual(watts);
    // Only spans that pass every blocking gate are offered: none of the listed ones may fail one.
    const ids = (await rows.locator('td:first-child a').evaluateAll((as) => as.map((a) => (a as HTMLAnchorElement).pathname.split('/').pop()!)));
    for (const id of ids) {
      const span = await (await page.request.get(`/api/spans/${id}`)).json();
      expect(span.status).toBe('approved');
      expect(span.perchable).toBe(true);
    }
    expect(await page.locator('[aria-label="Harvest power of the best spans"] svg').count()).toBeGreaterThan(0);
    // A minimum above anything the demo harvests empties the list.
    await page.getByLabel('Minimum harvest (W)').fill('100000');
    await page.getByText('No approved span harvests at least 100000 W').waitFor();
    await context.close();
  });
});
