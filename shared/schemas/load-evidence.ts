// Load evidence: a line's metered currents (load series) and what they yield. SI units (A, W, Wh).
import { z } from 'zod';
import { harvesterCoreSchema } from './calc.ts';

/** Problems a load-series row can have: the first five refuse a commit, the rest are warnings. */
export const LOAD_SERIES_ERROR_KINDS = ['unparseable', 'duplicate', 'out-of-order', 'negative', 'implausible'] as const;
export const LOAD_SERIES_WARNING_KINDS = ['gap', 'dst-repeat'] as const;
export type LoadSeriesProblemKind = (typeof LOAD_SERIES_ERROR_KINDS)[number] | (typeof LOAD_SERIES_WARNING_KINDS)[number];

export const LOAD_SERIES_PROBLEM_LABELS: Record<LoadSeriesProblemKind, string> = {
  unparseable: 'Cannot be read',
  duplicate: 'Repeats an earlier time',
  'out-of-order': 'Earlier than the row before',
  negative: 'Negative current',
  implausible: 'Current beyond any overhead line',
  gap: 'Gap in the readings',
  'dst-repeat': 'Clock-change repeat',
};

export interface LoadSeriesProblem {
  /** Data row, counted from 1 (the header is row 0). */
  row: number;
  kind: LoadSeriesProblemKind;
  message: string;
}

export interface LoadSeriesReport {
  rows: number;
  accepted: number;
  problems: LoadSeriesProblem[];
  /** Problems beyond the listed ones (the list stops at a limit). */
  moreProblems: number;
  firstAt: string | null;
  lastAt: string | null;
  /** Typical interval between readings, s (median). */
  intervalS: number | null;
  days: number;
  committed: boolean;
}

export const loadSeriesQuerySchema = z.object({
  mode: z.enum(['dry-run', 'commit'], { error: 'mode must be "dry-run" or "commit"' }).default('dry-run'),
  timeZone: z
    .string()
    .max(64)
    .refine((tz) => {
      try {
        new Intl.DateTimeFormat('en', { timeZone: tz });
        return true;
      } catch {
        return false;
      }
    }, 'Give a time zone such as "Pacific/Auckland" or "UTC"')
    .optional(),
});

export const monthSchema = z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, 'Give the month as YYYY-MM');
export const loadProfileQuerySchema = z.object({ month: monthSchema.optional() });

export interface LoadProfileHour {
  hour: number;
  p10A: number;
  p50A: number;
  p90A: number;
  n: number;
}

export interface LoadProfileView {
  month: string;
  source: 'series' | 'estimate';
  hours: LoadProfileHour[];
}

export interface HarvestHour {
  hour: number;
  p10W: number;
  p50W: number;
  p90W: number;
}

export interface LoadEvidenceView {
  lineId: string;
  series: { firstAt: string; lastAt: string; readingCount: number; dayCount: number; importedAt: string } | null;
  /** Month × hour median current, for the heat map. */
  months: { month: string; peakA: number; peakAt: string; hoursP50A: (number | null)[] }[];
  /** The lowest ampacity among the line's assessed spans at the design weather (IEEE 738), A. */
  ampacityA: number | null;
  month: string;
  profile: LoadProfileView;
  harvest: { harvesterId: string; harvesterName: string; hours: HarvestHour[]; energyPerDayP50Wh: number }[];
}

export const impliedCurrentSchema = z.object({
  harvester: harvesterCoreSchema,
  frequencyHz: z.number({ message: 'Enter the frequency as a number' }).gt(0, 'Frequency must be above 0').max(100_000, 'Frequency must be at most 100000'),
  powerW: z.number({ message: 'Enter the power as a number' }).min(0, 'Power must be 0 or more').max(1e7, 'Power must be at most 10000000'),
});
