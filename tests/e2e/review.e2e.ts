import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

describe('review desk journey', () => {
  it('when a submitted span fails a blocking gate, then the tablet desk names the gates, offers no approval and the a key does nothing', async () => {
    const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 }, hasTouch: true });
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    let failing: { id: string; fromStructureLabel: string; toStructureLabel: string } | undefined;
    await expect
      .poll(async () => {
        failing = (await (await page.request.get('/api/spans?status=submitted&perchable=false&pageSize=1')).json()).items[0];
        return !!failing;
      }, { timeout: 60_000 })
      .toBe(true);
    const queue = page.getByRole('list', { name: 'Spans in the queue' });
    await queue.waitFor();
    const items = queue.getByRole('button');
    const before = await items.count();
    await items.filter({ hasText: failing!.fromStructureLabel }).filter({ hasText: failing!.toStructureLabel }).first().click();
    const panel = page.getByTestId('failing-gates');
    await panel.waitFor({ timeout: 20_000 });
    expect(await panel.innerText()).toMatch(/Cannot be approved/);
    expect(await panel.locator('li').count()).toBeGreaterThan(0);
    expect(await page.getByRole('button', { name: /^Approve/ }).count()).toBe(0);
    const ret = page.getByRole('button', { name: /Return to surveyor/ });
    await ret.waitFor();
    // On the tablet the failing gates and the way out are on screen without scrolling.
    const box = await ret.boundingBox();
    expect(box!.y + box!.height).toBeLessThanOrEqual(1180);
    await page.keyboard.press('a');
    await new Promise((r) => setTimeout(r, 800));
    expect(await items.count()).toBe(before);
    // And the server refuses it whatever the screen: 409 naming the gates.
    const res = await page.request.post(`/api/spans/${failing!.id}/approve`, { headers: { Origin: h.baseUrl }, data: {} });
    expect(res.status()).toBe(409);
    await context.close();
  });

  it('when a safety officer works the queue by keyboard, then a returned span carries the reason to the surveyor', async () => {
    const { context, page } = await h.newPage();
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    const queue = page.getByRole('list', { name: 'Spans in the queue' });
    await queue.waitFor();
    const items = queue.getByRole('button');
    const before = await items.count();
    expect(before).toBeGreaterThan(1);
    // Ages are shown, and the shortcuts are on screen.
    expect(await items.first().innerText()).toMatch(/waiting \d+ (min|h|d)/);
    const legend = await page.getByLabel('Keyboard shortcuts').innerText();
    expect(legend).toContain('approve');
    expect(legend).toContain('return with a reason');

    // The first span is selected; j moves down, k back up.
    const current = () => queue.locator('[aria-current="true"]').innerText();
    const first = await current();
    await page.keyboard.press('j');
    await expect.poll(current).not.toBe(first);
    const second = await current();
    await page.keyboard.press('k');
    await expect.poll(current).toBe(first);
    await page.keyboard.press('ArrowDown');
    await expect.poll(current).toBe(second);

    // The selected span shows its sections.
    for (const name of ['Zone conflicts', 'Assessment and score', 'Photos', 'History']) await page.getByRole('heading', { name }).waitFor();
    const title = await page.locator('#review-span-title').innerText();

    // r opens the reason with the cursor in it; Ctrl+Enter sends.
    await page.keyboard.press('r');
    const reason = page.getByLabel('What should the surveyor fix?');
    await reason.waitFor();
    expect(await reason.evaluate((el) => el === document.activeElement)).toBe(true);
    const text = 'Clearance photo is of the neighbouring span; retake at the perch point';
    await page.keyboard.type(text);
    await page.keyboard.press('Control+Enter');
    await expect.poll(() => items.count(), { timeout: 10_000 }).toBe(before - 1);
    await expect.poll(() => page.locator('#review-span-title').innerText()).not.toBe(title);
    // The decision is said in words, naming the span that left the queue, with a way back to it.
    const notice = page.getByTestId('decision-notice');
    expect(await notice.innerText()).toMatch(/^Returned .+ → .+ to the surveyor with your reason\./);
    expect(await notice.getByRole('link', { name: 'Open the span' }).getAttribute('href')).toMatch(/^\/spans\/[^/]+$/);

    // a approves the span now selected: it leaves the queue, unless a zone blocks it and the desk says why.
    await page.keyboard.press('a');
    await expect
      .poll(async () => (await items.count()) === before - 2 || (await page.getByRole('alert').filter({ hasText: /zone/i }).count()) > 0 || (await page.getByTestId('failing-gates').count()) > 0, { timeout: 10_000 })
      .toBe(true);
    await context.close();

    // The span's surveyor sees the reason in their queue.
    const surveyor = await h.newPage();
    await h.signIn(surveyor.page, 'surveyor');
    await surveyor.page.waitForURL((u) => u.pathname === '/field');
    await surveyor.page.getByText(text).first().waitFor({ timeout: 15_000 });
    await surveyor.context.close();
  }, 180_000);

  it('when a submitted span harvests too little to be useful, then its queue row says so in words with the figures, before it is opened', async () => {
    const surveyor = await h.newPage({ viewport: { width: 820, height: 1180 } });
    await h.signIn(surveyor.page, 'surveyor');
    await surveyor.page.waitForURL((u) => u.pathname === '/field');
    const headers = { Origin: h.baseUrl };
    const post = async (url: string, data: object) => {
      const res = await surveyor.page.request.post(url, { data, headers });
      expect(res.status(), `${url}: ${await res.text()}`).toBeLessThan(300);
      return res.json();
    };
    // A feeder carrying 5 A: the demo harvesters' useful minimum is 10 W and 15 W (demo profiles), far above what 5 A gives.
    const line = await post('/api/lines', { name: `Lightly loaded spur ${Date.now()}`, owner: 'Harrow Vale Power Cooperative', voltageKv: 12.47, frequencyHz: 60, loadTypicalA: 5, loadMinA: 2, loadPeakA: 8 });
    const a = await post('/api/structures', { lineId: line.id, lat: -30.25, lon: -130.3, kind: 'pole', attachmentHeightM: 12 });
    const b = await post('/api/structures', { lineId: line.id, lat: -30.25, lon: -130.29885, kind: 'pole', attachmentHeightM: 12 });
    const span = await post('/api/spans', { lineId: line.id, fromStructureId: a.id, toStructureId: b.id, conductor: { codeWord: 'Penguin' }, clearanceM: 9.5, lowestClearanceM: 9.1, terrain: 'open-field', surveyDate: '2026-11-20' });
    await post(`/api/spans/${span.id}/submit`, {});
    await surveyor.context.close();

    const { context, page } = await h.newPage({ viewport: { width: 820, height: 1180 }, hasTouch: true });
    await h.signIn(page, 'safety');
    await page.waitForURL((u) => u.pathname === '/review');
    const row = page.getByRole('list', { name: 'Spans in the queue' }).locator(`[data-span-id="${span.id}"]`);
    await row.waitFor({ timeout: 30_000 });
    const mark = row.getByTestId('low-harvest-mark');
    await mark.waitFor();
    expect(await mark.innerText()).toMatch(/Harvest too low to be useful: \d+(\.\d+)? W at typical load 5 A; useful minimum \d+(\.\d+)? W/);
    await context.close();
  }, 180_000);
});
