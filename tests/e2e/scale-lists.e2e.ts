// Issue 16's list journey: on an inventory of 10 000 spans (the scale seed, SEED_SCALE_SPANS), the surveyor's
// field queue and the spans table scroll through every record on an 820 × 1180 tablet: no cap, pages load as the
// reader scrolls, and only the rows on screen are in the page.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { QUEUE_GROUPS } from '../../src/features/field/queue.ts';
import { startHarness, type Harness } from './harness.ts';

const SPANS = 10_000;
let h: Harness;

beforeAll(async () => {
  h = await startHarness({ SEED_SCALE_SPANS: String(SPANS) });
}, 180_000);

afterAll(async () => {
  await h?.stop();
});

/** The record a list ends with, read from the API (the same filter and order the screen uses). */
async function lastRecord(page: Page, query: string): Promise<{ id: string; total: number }> {
  const first = await (await page.request.get(`/api/spans?${query}&page=1&pageSize=1`)).json();
  const last = await (await page.request.get(`/api/spans?${query}&page=${first.total}&pageSize=1`)).json();
  return { id: last.items[0].id, total: first.total };
}

/** Jumps to the bottom of the page until `done` holds (each jump brings the next page into reach). */
async function scrollToEnd(page: Page, done: () => Promise<boolean>) {
  for (let i = 0; i < 400 && !(await done()); i++) {
    await page.evaluate(() => window.scrollTo(0, document.documentElement.scrollHeight));
    await page.waitForTimeout(150);
  }
}

describe('10 000-span lists', () => {
  it('when a surveyor with 10 000 spans scrolls the field queue to its end, then the last record is reachable and the queue counts 10 000', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 }, hasTouch: true });
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    const me = (await (await page.request.get('/api/auth/session')).json()).user as { id: string };
    const groups = await Promise.all(QUEUE_GROUPS.map((g) => lastRecord(page, `surveyorId=${me.id}&status=${g.statuses.join(',')}&sort=-updatedAt`)));
    expect(groups.reduce((n, g) => n + g.total, 0)).toBe(SPANS);

    await page.getByTestId('queue-total').getByText('10 000 spans').waitFor({ timeout: 30_000 });
    const list = page.getByRole('list', { name: 'Your spans' });
    // Counts are written with a space between thousands (1 158), like every count on screen.
    await list.getByRole('heading', { name: `${QUEUE_GROUPS[0]!.title} (${groups[0]!.total.toLocaleString('en-US').replace(/,/g, ' ')})` }).waitFor();

    const lastId = groups.at(-1)!.id;
    await scrollToEnd(page, async () => (await page.locator(`[data-span-id="${lastId}"]`).count()) > 0 && (await page.getByText('Loading more of your spans…').count()) === 0);
    const lastCard = page.locator(`[data-span-id="${lastId}"]`);
    await lastCard.scrollIntoViewIfNeeded();
    expect(await lastCard.isVisible()).toBe(true);
    // Windowed: only the cards around the view are in the page, not 10 000.
    expect(await page.locator('[data-span-id]').count()).toBeLessThan(100);
    // The last card opens its span.
    await lastCard.click();
    await page.waitForURL((u) => u.pathname.endsWith(lastId) || u.pathname.endsWith(`${lastId}/edit`));
    await context.close();
  }, 300_000);

  it('when the spans table is scrolled to its end, then every one of the 10 000 records is reachable and the count shown is 10 000', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 }, hasTouch: true });
    await h.signIn(page, 'planner');
    await page.waitForURL((u) => u.pathname !== '/sign-in');
    const { id: lastId, total } = await lastRecord(page, 'sort=-updatedAt');
    expect(total).toBe(SPANS);

    await page.goto('/spans');
    await page.getByRole('status').getByText('10 000 spans match').waitFor({ timeout: 30_000 });
    const table = page.getByRole('table', { name: 'Spans' });
    expect(await table.getAttribute('aria-rowcount')).toBe(String(SPANS + 1));
    await scrollToEnd(page, async () => (await page.locator(`tr[data-span-id="${lastId}"]`).count()) > 0 && (await page.getByTestId('spans-loading-more').count()) === 0);
    const lastRow = page.locator(`tr[data-span-id="${lastId}"]`);
    await lastRow.scrollIntoViewIfNeeded();
    expect(await lastRow.isVisible()).toBe(true);
    expect(await lastRow.getAttribute('aria-rowindex')).toBe(String(SPANS + 1));
    expect(await page.locator('tr[data-span-id]').count()).toBeLessThan(100);
    await context.close();
  }, 300_000);
});
