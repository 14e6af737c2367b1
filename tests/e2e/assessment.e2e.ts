// The span page's assessment: gates, the factor breakdown chart and the two harvest charts, for a demo span;
// the calculators page previews as the user types and the server confirms.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

describe('span assessment panel', () => {
  it('when a planner opens a demo span, then the score breakdown chart, gates and harvest charts show', async () => {
    const { page } = await h.newPage();
    await h.signIn(page, 'planner');
    await page.waitForURL((u) => u.pathname === '/planning');
    // The demo spans are assessed by a start-up job; wait until the first one carries an assessment.
    let spanId = '';
    await expect
      .poll(
        async () => {
          const res = await page.request.get('/api/spans?pageSize=50');
          const body = await res.json();
          const s = body.items.find((x: { assessment: unknown; lineId: string }) => x.assessment);
          spanId = s?.id ?? '';
          return spanId;
        },
        { timeout: 60_000 },
      )
      .not.toBe('');
    await page.goto(`/spans/${spanId}`);
    const panel = page.getByTestId('span-assessment-panel');
    await panel.waitFor({ timeout: 20_000 });
    await expect.poll(() => page.getByTestId('factor-chart').locator('.recharts-bar-rectangle').count(), { timeout: 10_000 }).toBeGreaterThan(0);
    expect(await page.getByTestId('assessment-gates').locator('li').count()).toBe(6);
    await page.getByTestId('power-current-chart').locator('.recharts-line').first().waitFor({ timeout: 10_000 });
    expect(await page.getByTestId('power-current-chart').getByText(/saturation from/).count()).toBe(1);
    expect(await panel.getByRole('note').count()).toBeGreaterThan(0); // the caution beside the safety figures
    expect(await page.getByText('Power over the day').count()).toBe(1);
  });
});

describe('calculators', () => {
  it('when a surveyor enters the bench example, then ≈702 A and ≈84 W show and the server confirms', async () => {
    const { page } = await h.newPage();
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    await page.goto('/calculators');
    const bench = page.getByTestId('bench-preview');
    // Ampère's law (60 × 11.7 A) and Joule's law (58² / 40 Ω): common practice.
    await expect.poll(() => bench.textContent()).toMatch(/702 A/);
    expect(await bench.textContent()).toMatch(/84\.1 W/);
    await page.locator('#bench-loadOhm').fill('0');
    await expect.poll(() => page.locator('#bench-loadOhm-error').textContent()).toMatch(/above 0/);
    await page.locator('#bench-loadOhm').fill('40');
    await page.getByRole('button', { name: 'Check on the server' }).nth(2).click();
    await expect.poll(() => page.getByTestId('server-result').first().textContent()).toMatch(/702\.0 A, 84\.1 W/);
  });
});
