// Bench checks of a harvester on a multi-turn fixture, and fitting the effective air gap to measurements.
import { harvest, type HarvesterCore } from './ct-harvester.ts';

export interface BenchTestInput {
  fixtureTurns: number;
  fixtureCurrentA: number;
  loadVoltageRmsV: number;
  loadOhm: number;
}

export interface BenchTestResult {
  equivalentLineCurrentA: number;
  powerW: number;
}

// Ampère's law: a fixture of n turns at I encloses n·I ampere-turns; load power P = V²/R (Joule's law).
export function benchTest(input: BenchTestInput): BenchTestResult {
  if (!(input.loadOhm > 0)) throw new RangeError('loadOhm must be positive');
  return {
    equivalentLineCurrentA: input.fixtureTurns * input.fixtureCurrentA,
    powerW: input.loadVoltageRmsV ** 2 / input.loadOhm,
  };
}

export interface BenchPoint {
  /** Equivalent line current (fixture ampere-turns), A. */
  currentA: number;
  frequencyHz: number;
  loadOhm: number;
  powerW: number;
}

export interface AirGapFit {
  airGapMm: number;
  /** Root-mean-square power error of the fit, W. */
  rmsErrorW: number;
}

// Least squares: the total air gap that minimises Σ(P_model − P_measured)² for the CT harvester model
// (log-spaced scan, then golden-section refinement on log gap).
export function fitAirGap(profile: HarvesterCore, points: readonly BenchPoint[], range: { minMm?: number; maxMm?: number } = {}): AirGapFit {
  if (points.length === 0) throw new RangeError('at least one bench point is needed');
  const sse = (gapMm: number) =>
    points.reduce((sum, p) => {
      const model = harvest({ currentA: p.currentA, frequencyHz: p.frequencyHz, loadOhm: p.loadOhm, harvester: { ...profile, airGapMm: gapMm } }).powerW;
      return sum + (model - p.powerW) ** 2;
    }, 0);
  const lo = Math.log(range.minMm ?? 1e-4);
  const hi = Math.log(range.maxMm ?? 100);
  const n = 200;
  let best = 0;
  let bestVal = Infinity;
  for (let i = 0; i <= n; i++) {
    const v = sse(Math.exp(lo + ((hi - lo) * i) / n));
    if (v < bestVal) {
      bestVal = v;
      best = i;
    }
  }
  let a = lo + ((hi - lo) * Math.max(0, best - 1)) / n;
  let b = lo + ((hi - lo) * Math.min(n, best + 1)) / n;
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = sse(Math.exp(c));
  let fd = sse(Math.exp(d));
  for (let i = 0; i < 100 && b - a > 1e-10; i++) {
    if (fc < fd) {
      b = d; d = c; fd = fc; c = b - g * (b - a); fc = sse(Math.exp(c));
    } else {
      a = c; c = d; fc = fd; d = a + g * (b - a); fd = sse(Math.exp(d));
    }
  }
  const airGapMm = Math.exp((a + b) / 2);
  return { airGapMm, rmsErrorW: Math.sqrt(sse(airGapMm) / points.length) };
}
