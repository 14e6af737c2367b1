// Load series: import (dry run or an all-or-nothing commit) and what a line's metered currents yield.
import type { Readable } from 'node:stream';
import type { EntityManager } from '@mikro-orm/core';
import Papa from 'papaparse';
import type { HarvestHour, LoadEvidenceView, LoadProfileHour, LoadProfileView, LoadSeriesReport } from '#shared/schemas/load-evidence.ts';
import { p10p50p90 } from '#shared/engineering/percentiles.ts';
import { harvestPowerW } from '#shared/engineering/ct-harvester.ts';
import { AppError } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import type { User } from '../auth/user.entity.ts';
import { Line } from '../inventory/line.entity.ts';
import { Span } from '../inventory/span.entity.ts';
import { Assessment } from '../assessment/assessment.entity.ts';
import { activeHarvesters, harvesterModel } from '../assessment/profiles.service.ts';
import { LoadSeries, LoadSeriesDay } from './load-series.entity.ts';
import { PerchEvent } from './flight-record.entity.ts';
import { isoAt, LoadSeriesReader, localHour, unpackReadings, type Reading } from './load-series.parse.ts';

const isoAtReading = (r: Reading) => isoAt(r.epochS, r.offsetMin);

export class LoadSeriesRefusedError extends AppError {
  constructor(readonly report: LoadSeriesReport) {
    super(400, 'bad_request', `The series has ${report.problems.filter((p) => p.kind !== 'gap' && p.kind !== 'dst-repeat').length + report.moreProblems} rows with errors: nothing was stored`);
  }
}

async function lineOr404(em: EntityManager, id: string): Promise<Line> {
  const line = await em.findOne(Line, { id });
  if (!line) throw AppError.notFound('Line');
  return line;
}

/** Reads the CSV as it streams in; the rows are checked one by one and only the packed days are kept. */
export function readLoadSeries(input: Readable, timeZone?: string): Promise<ReturnType<LoadSeriesReader['finish']>> {
  const reader = new LoadSeriesReader(timeZone);
  return new Promise((resolve, reject) => {
    let headerError: string | null = null;
    const parser = Papa.parse(Papa.NODE_STREAM_INPUT, { skipEmptyLines: 'greedy' });
    parser.on('data', (cells: string[]) => {
      if (headerError) return;
      if (!reader.hasHeader) {
        headerError = reader.header(cells);
        return;
      }
      reader.row(cells);
    });
    parser.on('end', () => {
      if (headerError) return reject(AppError.field('timestamp', headerError));
      if (!reader.hasHeader) return reject(AppError.field('body', 'The file is empty: send a CSV with a header row "timestamp,current_a"'));
      resolve(reader.finish());
    });
    parser.on('error', reject);
    input.on('error', reject);
    input.pipe(parser);
  });
}

/** Dry run: the report. Commit: the days the file covers are replaced in one transaction, or nothing when any row fails. */
export async function importLoadSeries(em: EntityManager, user: User, lineId: string, input: Readable, mode: 'dry-run' | 'commit', timeZone?: string): Promise<LoadSeriesReport> {
  const line = await lineOr404(em, lineId);
  const { report, days } = await readLoadSeries(input, timeZone);
  const hasErrors = report.accepted < report.rows;
  const full: LoadSeriesReport = { ...report, committed: false };
  if (mode === 'dry-run') return full;
  if (hasErrors) throw new LoadSeriesRefusedError(full);
  if (report.accepted === 0) throw AppError.field('body', 'The file has no readings');
  const dayKeys = [...days.keys()].sort();
  await em.transactional(async (tem) => {
    await tem.nativeDelete(LoadSeriesDay, { lineId, day: { $gte: dayKeys[0], $lte: dayKeys[dayKeys.length - 1] } });
    const rows = dayKeys.map((day) => ({ lineId, day, readingCount: days.get(day)!.length / 12, readings: days.get(day)! }));
    for (let i = 0; i < rows.length; i += 400) await tem.insertMany(LoadSeriesDay, rows.slice(i, i + 400));
    const counts = await tem.find(LoadSeriesDay, { lineId }, { fields: ['readingCount'] });
    const stats = { n: counts.reduce((s, d) => s + d.readingCount, 0), d: counts.length };
    const firstDay = await tem.findOne(LoadSeriesDay, { lineId }, { orderBy: { day: 'asc' } });
    const lastDay = await tem.findOne(LoadSeriesDay, { lineId }, { orderBy: { day: 'desc' } });
    const firstR = firstDay ? unpackReadings(firstDay.readings)[0] : null;
    const lastList = lastDay ? unpackReadings(lastDay.readings) : [];
    const lastR = lastList[lastList.length - 1] ?? null;
    const existing = await tem.findOne(LoadSeries, { lineId });
    const summary = {
      lineId,
      firstAt: firstR ? isoAtReading(firstR) : report.firstAt!,
      lastAt: lastR ? isoAtReading(lastR) : report.lastAt!,
      readingCount: Number(stats.n),
      dayCount: Number(stats.d),
      importedById: user.id,
      importedAt: new Date(),
    };
    if (existing) tem.assign(existing, summary);
    else tem.create(LoadSeries, summary);
    audit(tem, {
      actorId: user.id,
      action: 'line.load-series',
      recordType: 'line',
      recordId: line.id,
      before: null,
      after: { readings: report.accepted, from: report.firstAt, to: report.lastAt, days: report.days },
    });
    await tem.flush();
  });
  return { ...full, committed: true };
}

function nextMonth(month: string): string {
  const [y, m] = month.split('-').map(Number);
  return m === 12 ? `${y + 1}-01` : `${y}-${String(m + 1).padStart(2, '0')}`;
}

async function readingsOfMonth(em: EntityManager, lineId: string, month: string): Promise<Reading[]> {
  const days = await em.find(LoadSeriesDay, { lineId, day: { $gte: `${month}-01`, $lt: `${nextMonth(month)}-01` } }, { orderBy: { day: 'asc' } });
  return days.flatMap((d) => unpackReadings(d.readings));
}

/** Hourly currents by hour of day as written: the readings' percentiles, or the line's estimate when none. */
export function profileFromReadings(readings: Reading[]): LoadProfileHour[] {
  const byHour: number[][] = Array.from({ length: 24 }, () => []);
  for (const r of readings) byHour[localHour(r)].push(r.currentA);
  return byHour.map((values, hour) => {
    if (values.length === 0) return { hour, p10A: NaN, p50A: NaN, p90A: NaN, n: 0 };
    const q = p10p50p90(values);
    return { hour, p10A: q.p10, p50A: q.p50, p90A: q.p90, n: values.length };
  });
}

export function estimateProfile(line: Pick<Line, 'loadProfileA' | 'loadTypicalA'>): LoadProfileHour[] {
  return Array.from({ length: 24 }, (_, hour) => {
    const a = Array.isArray(line.loadProfileA) && line.loadProfileA.length === 24 ? line.loadProfileA[hour] : line.loadTypicalA;
    return { hour, p10A: a, p50A: a, p90A: a, n: 0 };
  });
}

/** The month's profile from the series when it has readings in that month, else the estimate (`source` says which). */
export async function loadProfile(em: EntityManager, lineId: string, month: string): Promise<LoadProfileView> {
  const line = await lineOr404(em, lineId);
  const readings = await readingsOfMonth(em, lineId, month);
  if (readings.length === 0) return { month, source: 'estimate', hours: estimateProfile(line) };
  const hours = profileFromReadings(readings);
  // An hour without readings in a month that has some takes the estimate's value, marked by n = 0.
  const est = estimateProfile(line);
  return { month, source: 'series', hours: hours.map((h, i) => (h.n === 0 ? est[i] : h)) };
}

/** Profiles of many lines for one month in one query (assessment and planning). */
export async function seriesProfiles(em: EntityManager, lineIds: readonly string[], month: string): Promise<Map<string, LoadProfileHour[]>> {
  const out = new Map<string, LoadProfileHour[]>();
  if (lineIds.length === 0) return out;
  const days = await em.find(LoadSeriesDay, { lineId: { $in: [...lineIds] }, day: { $gte: `${month}-01`, $lt: `${nextMonth(month)}-01` } });
  const byLine = new Map<string, Reading[]>();
  for (const d of days) byLine.set(d.lineId, [...(byLine.get(d.lineId) ?? []), ...unpackReadings(d.readings)]);
  for (const [id, readings] of byLine) out.set(id, profileFromReadings(readings));
  return out;
}

export function currentMonth(now = new Date()): string {
  return now.toISOString().slice(0, 7);
}

/** The line page: series summary, month × hour medians, peak against ampacity, harvest percentiles per harvester. */
export async function loadEvidence(em: EntityManager, lineId: string, month?: string): Promise<LoadEvidenceView> {
  const line = await lineOr404(em, lineId);
  const series = await em.findOne(LoadSeries, { lineId });
  const months: LoadEvidenceView['months'] = [];
  if (series) {
    const days = await em.find(LoadSeriesDay, { lineId }, { orderBy: { day: 'asc' } });
    const byMonth = new Map<string, Reading[]>();
    for (const d of days) {
      const m = d.day.slice(0, 7);
      const list = byMonth.get(m) ?? [];
      for (const r of unpackReadings(d.readings)) list.push(r);
      byMonth.set(m, list);
    }
    for (const [m, readings] of byMonth) {
      let peak = readings[0];
      for (const r of readings) if (r.currentA > peak.currentA) peak = r;
      months.push({ month: m, peakA: peak.currentA, peakAt: isoAtReading(peak), hoursP50A: profileFromReadings(readings).map((h) => (h.n ? h.p50A : null)) });
    }
  }
  const chosen = month ?? (months.length ? months[months.length - 1].month : currentMonth());
  const profile = await loadProfile(em, lineId, chosen);
  const spanIds = (await em.find(Span, { lineId }, { fields: ['id'] })).map((s) => s.id);
  let ampacityA: number | null = null;
  if (spanIds.length) {
    const rows = await em.find(Assessment, { spanId: { $in: spanIds } }, { fields: ['ampacityA'], orderBy: { ampacityA: 'asc' }, limit: 1 });
    ampacityA = rows[0]?.ampacityA ?? null;
  }
  const harvest = (await activeHarvesters(em)).map((h) => {
    const model = harvesterModel(h);
    // Power rises with current, so the percentiles of the harvest are the harvest at the current's percentiles.
    const hours: HarvestHour[] = profile.hours.map((p) => ({
      hour: p.hour,
      p10W: harvestPowerW(model, p.p10A, line.frequencyHz),
      p50W: harvestPowerW(model, p.p50A, line.frequencyHz),
      p90W: harvestPowerW(model, p.p90A, line.frequencyHz),
    }));
    return { harvesterId: h.id, harvesterName: h.name, hours, energyPerDayP50Wh: hours.reduce((s, x) => s + x.p50W, 0) };
  });
  return {
    lineId,
    series: series ? { firstAt: series.firstAt, lastAt: series.lastAt, readingCount: series.readingCount, dayCount: series.dayCount, importedAt: series.importedAt.toISOString() } : null,
    months,
    ampacityA,
    month: chosen,
    profile,
    harvest,
  };
}

/** What each line's series holds, for the list of lines. */
export async function seriesSummaries(em: EntityManager) {
  return (await em.find(LoadSeries, {})).map((s) => ({
    lineId: s.lineId,
    firstAt: s.firstAt,
    lastAt: s.lastAt,
    readingCount: s.readingCount,
    dayCount: s.dayCount,
    importedAt: s.importedAt.toISOString(),
  }));
}

/**
 * A load estimate from evidence: from the whole metered series (P10 as the minimum, the median as typical, the highest
 * reading as the peak, hourly medians as the profile), or from flight records (the estimate scaled by the median ratio
 * of implied to predicted line current over the line's perches).
 */
export async function estimateFromEvidence(em: EntityManager, lineId: string, source: 'series' | 'flights') {
  const line = await lineOr404(em, lineId);
  if (source === 'series') {
    const days = await em.find(LoadSeriesDay, { lineId }, { orderBy: { day: 'asc' } });
    const readings = days.flatMap((d) => unpackReadings(d.readings));
    if (readings.length === 0) throw AppError.field('source', 'this line has no metered series');
    const all = p10p50p90(readings.map((r) => r.currentA));
    const peak = readings.reduce((m, r) => Math.max(m, r.currentA), 0);
    const hours = profileFromReadings(readings);
    const r1 = (v: number) => Math.round(v * 10) / 10;
    return { loadMinA: r1(all.p10), loadTypicalA: r1(all.p50), loadPeakA: r1(peak), loadProfileA: hours.map((h) => r1(h.n ? h.p50A : all.p50)) };
  }
  const events = await em.find(PerchEvent, { lineId, kind: 'perch', impliedCurrentA: { $ne: null }, lineCurrentA: { $gt: 0 } });
  if (events.length === 0) throw AppError.field('source', 'no perch on this line has a measured harvest yet');
  const ratios = events.map((e) => e.impliedCurrentA! / e.lineCurrentA!);
  const k = p10p50p90(ratios).p50;
  const r1 = (v: number) => Math.round(v * k * 10) / 10;
  return {
    loadMinA: r1(line.loadMinA),
    loadTypicalA: r1(line.loadTypicalA),
    loadPeakA: r1(line.loadPeakA),
    loadProfileA: Array.isArray(line.loadProfileA) ? line.loadProfileA.map(r1) : null,
  };
}

/** A line whose load figures come from its metered series for one month (a detached copy: never flushed). */
export type MeasuredLine = Line & { measuredMonth?: string };

/**
 * The lines with their load estimate replaced, for the assessment, by the metered month when the series has it:
 * P10 as the minimum, the median as typical, the highest hourly P90 as the peak, and the hourly medians as the profile.
 */
export async function withMeasuredLoad(em: EntityManager, lines: Line[], when: Date | string = new Date()): Promise<MeasuredLine[]> {
  if (lines.length === 0) return lines;
  // A month as written (YYYY-MM, e.g. a departure's local month), or the UTC month of an instant.
  const month = typeof when === 'string' ? when : currentMonth(when);
  const profiles = await seriesProfiles(em, lines.map((l) => l.id), month);
  return lines.map((l) => {
    const hours = profiles.get(l.id);
    if (!hours || hours.every((h) => h.n === 0)) return l;
    const have = hours.filter((h) => h.n > 0);
    const p50 = have.map((h) => h.p50A).sort((a, b) => a - b);
    const copy: MeasuredLine = Object.assign(Object.create(Object.getPrototypeOf(l)), l, {
      loadMinA: Math.min(...have.map((h) => h.p10A)),
      loadTypicalA: p50[Math.floor(p50.length / 2)],
      loadPeakA: Math.max(...have.map((h) => h.p90A)),
      loadProfileA: hours.map((h) => (h.n > 0 ? h.p50A : p50[Math.floor(p50.length / 2)])),
      measuredMonth: month,
    });
    return copy;
  });
}
