import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

describe('needs a decision on the review desk', () => {
  it('when approved spans now fail a gate (the demo nest zone), then the tablet desk lists them in their own queue with the gate in words, offers suspend and return, and a return takes one out', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 }, hasTouch: true });
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    const flagged = (await (await page.request.get('/api/spans?status=approved&perchable=false&pageSize=50')).json()).items as { id: string; fromStructureLabel: string; toStructureLabel: string }[];
    expect(flagged.length).toBeGreaterThanOrEqual(1);

    const tab = page.getByRole('tab', { name: /Needs a decision/ });
    // The tab carries the count whichever queue is open.
    await expect.poll(async () => (await tab.innerText()).replace(/\s+/g, ' '), { timeout: 20_000 }).toContain(String(flagged.length));
    await tab.click();
    const queue = page.getByRole('list', { name: 'Spans in the queue' });
    await queue.waitFor();
    const items = queue.getByRole('button');
    await expect.poll(() => items.count()).toBe(flagged.length);
    expect(await items.first().innerText()).toContain('Now fails no-perch zone');

    const panel = page.getByTestId('failing-gates');
    await panel.waitFor({ timeout: 20_000 });
    expect(await panel.innerText()).toMatch(/Needs a decision: this approved span now fails this gate/);
    expect(await panel.innerText()).toContain('no-perch zone');
    expect(await panel.innerText()).toContain('no longer offered to planners');
    expect(await page.getByRole('button', { name: /^Approve/ }).count()).toBe(0);
    const suspend = page.getByRole('button', { name: /Suspend with a reason/ });
    const ret = page.getByRole('button', { name: /Return to surveyor/ });
    await suspend.waitFor();
    await ret.waitFor();
    // On the tablet the decision is on screen without scrolling.
    for (const b of [suspend, ret]) {
      const box = await b.boundingBox();
      expect(box!.y + box!.height).toBeLessThanOrEqual(1180);
    }
    const legend = await page.getByLabel('Keyboard shortcuts').innerText();
    expect(legend).toContain('return to the surveyor');

    // Planners are never offered these spans.
    const offered = (await (await page.request.get('/api/spans?status=approved&perchable=true&pageSize=200')).json()).items.map((s: { id: string }) => s.id);
    for (const s of flagged) expect(offered).not.toContain(s.id);

    // r opens the reason; Ctrl+Enter returns the span to the surveyor and it leaves the queue.
    const title = await page.locator('#review-span-title').innerText();
    await page.keyboard.press('r');
    const reason = page.getByLabel('What should the surveyor fix?');
    await reason.waitFor();
    await reason.fill('A raptor nest closes this tower; choose a span further along the line.');
    await page.keyboard.press('Control+Enter');
    await expect.poll(() => items.count(), { timeout: 20_000 }).toBe(flagged.length - 1);
    if (flagged.length > 1) await expect.poll(() => page.locator('#review-span-title').innerText()).not.toBe(title);
    else await page.getByText('Every approved span still passes its gates.').waitFor();
    await context.close();
  });
});
