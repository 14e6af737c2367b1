// The import screen follows its import job: a determinate bar of rows checked (dry run) and rows saved (commit),
// then the report as before. A generated file of several thousand rows, so the bar is seen mid-way.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fs from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { startHarness, type Harness } from './harness.ts';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(() => h?.stop());

const TABLET = { width: 820, height: 1180 };
const ROWS = 6000;
const RUN = Date.now().toString(36).slice(-5).toUpperCase();

function generatedFile(): string {
  const header = 'line_name,line_owner,voltage_kv,frequency_hz,phases,load_typical_a,load_min_a,load_peak_a,from_label,from_lat,from_lon,from_kind,from_attachment_height_m,to_label,to_lat,to_lon,to_kind,to_attachment_height_m,conductor_code_word,clearance_m,terrain,survey_date';
  const lines = [header];
  for (let i = 0; i < ROWS; i++) {
    const lon = -130.6 + i * 0.0004;
    lines.push([`Progress feeder ${RUN}`, 'Harrow Vale Power Cooperative', '12.47', '60', '3', '180', '60', '260', `PF${RUN}-${i}`, '-30.3', lon, 'pole', '11', `PF${RUN}-${i + 1}`, '-30.3', lon + 0.0004, 'pole', '11', 'Penguin', '7.9', 'open-field', '2026-10-02'].join(','));
  }
  return lines.join('\n') + '\n';
}

/** Reads the named progress bars until `done` shows; answers every reading of aria-valuenow seen. */
async function watchBar(page: Page, name: string, done: () => Promise<boolean>) {
  const readings: number[] = [];
  const details = new Set<string>();
  for (let i = 0; i < 1200 && !(await done()); i++) {
    const bar = page.getByRole('progressbar', { name });
    if (await bar.count()) {
      const v = await bar.getAttribute('aria-valuenow').catch(() => null);
      if (v !== null) readings.push(Number(v));
      const row = await bar.locator('xpath=..').textContent().catch(() => null);
      if (row) details.add(row);
    }
    await page.waitForTimeout(50);
  }
  return { readings, details: [...details] };
}

describe('import progress', () => {
  it('when a surveyor checks and commits a large file, then each step shows rows done of the total and the report follows', async () => {
    const { context, page } = await h.newPage({ viewport: TABLET, hasTouch: true });
    context.setDefaultTimeout(60_000);
    const dir = fs.mkdtempSync(path.join(h.dataDir, 'import-progress-'));
    const file = path.join(dir, 'progress-feeder.csv');
    fs.writeFileSync(file, generatedFile());
    await h.signIn(page, 'surveyor');
    await page.waitForURL((u) => u.pathname === '/field');
    await page.goto('/import');
    await page.getByLabel('File (.csv, .geojson)').setInputFiles(file);
    await page.getByRole('button', { name: 'Check the file (dry run)' }).click();
    const report = page.getByRole('table', { name: 'Import report' });
    const dry = await watchBar(page, 'Checking rows', () => report.isVisible());
    await report.waitFor();
    expect(dry.readings.length, 'the bar was seen while the rows were checked').toBeGreaterThan(0);
    expect(dry.readings.every((v) => v >= 0 && v <= 100)).toBe(true);
    expect(dry.readings).toEqual([...dry.readings].sort((a, b) => a - b));
    expect(dry.details.some((d) => /of 6\D?000 rows/.test(d)), dry.details.join(' | ')).toBe(true);
    expect(await page.locator('tr[data-action="create"]').count()).toBeGreaterThan(0);

    await page.getByRole('button', { name: /^Commit/ }).click();
    const saved = page.getByText(/Saved: 6\D?000 created/);
    const commit = await watchBar(page, 'Saving rows', () => saved.isVisible());
    await saved.waitFor();
    expect(commit.readings.length, 'the saving bar was seen').toBeGreaterThan(0);
    expect(commit.readings).toEqual([...commit.readings].sort((a, b) => a - b));
    const lines = await (await page.request.get('/api/lines')).json();
    const line = lines.items.find((l: { name: string }) => l.name === `Progress feeder ${RUN}`);
    const spans = await (await page.request.get(`/api/spans?lineId=${line.id}&pageSize=1`)).json();
    expect(spans.total).toBe(ROWS);
    await context.close();
  }, 240_000);
});
