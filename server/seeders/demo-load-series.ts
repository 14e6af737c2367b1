// Demo evidence: a year of 15-minute metered currents for the first demo line, generated from its load estimate
// with a seasonal swing and noise from the seeded PRNG, so every machine gets the same readings.
import type { EntityManager } from '@mikro-orm/core';
import { prng } from '#shared/prng.ts';
import { Line } from '../modules/inventory/line.entity.ts';
import { User } from '../modules/auth/user.entity.ts';
import { LoadSeries, LoadSeriesDay } from '../modules/evidence/load-series.entity.ts';
import { isoAt, packReadings, type Reading } from '../modules/evidence/load-series.parse.ts';
import { DEMO_LINES } from './demo-inventory.ts';

/** The invented region keeps UTC−09:00 all year (no clock changes). */
export const DEMO_SERIES_OFFSET_MIN = -9 * 60;
export const DEMO_SERIES_YEAR = 2026;

export async function seedDemoLoadSeries(em: EntityManager): Promise<void> {
  const line = await em.findOne(Line, { name: DEMO_LINES[0].name });
  const importer = await em.findOne(User, { email: 'admin@roostline.test' });
  if (!line || !importer || !line.loadProfileA) return;
  const rnd = prng(738);
  const start = Date.UTC(DEMO_SERIES_YEAR, 0, 1) / 1000 - DEMO_SERIES_OFFSET_MIN * 60;
  const days: LoadSeriesDay[] = [];
  let total = 0;
  for (let d = 0; d < 365; d++) {
    const list: Reading[] = [];
    // Winter evenings and summer afternoons load the line most: ±15 % over the year, peaking in mid-January and mid-July.
    const season = 1 + 0.15 * Math.cos((4 * Math.PI * (d - 14)) / 365);
    const dayNoise = 0.92 + 0.16 * rnd();
    for (let q = 0; q < 96; q++) {
      const hour = Math.floor(q / 4);
      const a = line.loadProfileA[hour] * season * dayNoise * (0.96 + 0.08 * rnd());
      list.push({ epochS: start + d * 86_400 + q * 900, offsetMin: DEMO_SERIES_OFFSET_MIN, currentA: Math.round(a * 10) / 10 });
    }
    const day = new Date((start + d * 86_400 + DEMO_SERIES_OFFSET_MIN * 60) * 1000).toISOString().slice(0, 10);
    days.push(em.create(LoadSeriesDay, { lineId: line.id, day, readingCount: list.length, readings: packReadings(list) }));
    total += list.length;
  }
  em.create(LoadSeries, {
    lineId: line.id,
    firstAt: isoAt(start, DEMO_SERIES_OFFSET_MIN),
    lastAt: isoAt(start + 365 * 86_400 - 900, DEMO_SERIES_OFFSET_MIN),
    readingCount: total,
    dayCount: days.length,
    importedById: importer.id,
    importedAt: new Date(Date.UTC(DEMO_SERIES_YEAR, 11, 1)),
  });
  await em.flush();
}
