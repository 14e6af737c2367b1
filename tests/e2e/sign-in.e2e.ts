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

describe('a session that ends while the app is open', () => {
  it('when the session is ended from elsewhere and the user acts, then the sign-in page says so, and signing in returns to the same page', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 }, hasTouch: true });
    const consoleErrors: string[] = [];
    let watching = false;
    page.on('console', (m) => {
      if (watching && m.type() === 'error') consoleErrors.push(m.text());
    });
    page.on('pageerror', (e) => {
      if (watching) consoleErrors.push(e.message);
    });
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    await page.goto('/spans?status=approved&sort=-harvestW');
    await page.getByRole('table', { name: 'Spans' }).waitFor();

    // Ended from another place with the same cookie (as signing out on another tab or device does).
    const cookie = (await context.cookies()).map((c) => `${c.name}=${c.value}`).join('; ');
    const out = await fetch(`${h.baseUrl}/api/auth/sign-out`, { method: 'POST', headers: { Cookie: cookie, Origin: h.baseUrl, 'Content-Type': 'application/json' }, body: '{}' });
    expect(out.status).toBe(204);

    // The next action asks the server, which answers 401.
    await page.locator('#f-status').selectOption('submitted');
    await page.waitForURL((u) => u.pathname === '/sign-in', { timeout: 20_000 });
    const next = new URL(page.url()).searchParams.get('next')!;
    expect(next.startsWith('/spans?')).toBe(true);
    expect(new URLSearchParams(next.split('?')[1]).get('status')).toBe('submitted');
    expect(new URLSearchParams(next.split('?')[1]).get('sort')).toBe('-harvestW');
    const notice = page.getByTestId('session-ended');
    await notice.waitFor();
    expect(await notice.innerText()).toContain('Your session ended — sign in again');

    // A fresh load of the sign-in page logs nothing in the console (its "who is signed in?" probe answers 200).
    watching = true;
    await page.reload();
    await page.getByTestId('session-ended').waitFor();
    await page.getByLabel('E-mail').fill('safety@roostline.test');
    await page.getByLabel('Password').fill('roostline-demo');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => u.pathname + u.search === next, { timeout: 20_000 });
    watching = false;
    await page.getByRole('table', { name: 'Spans' }).waitFor();
    expect(await page.locator('#f-status').inputValue()).toBe('submitted');
    expect(consoleErrors).toEqual([]);
    await context.close();
  });

  it('when a visitor opens the sign-in page without a session, then the console shows no error', async () => {
    const { context, page } = await h.newPage();
    const errors: string[] = [];
    page.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto('/sign-in');
    await page.getByRole('button', { name: 'Sign in' }).waitFor();
    await page.goto('/');
    await page.waitForURL((u) => u.pathname === '/sign-in');
    await page.getByRole('button', { name: 'Sign in' }).waitFor();
    await new Promise((r) => setTimeout(r, 500));
    expect(errors).toEqual([]);
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
