// Route search through perches: time-dependent A* over departure states (see README "Missions").
// Under the charge-to policy every perch departure has a fixed state of charge, so a state is a perch (and a
// phase: outbound or homebound); the dwell depends on the arrival instant, and arriving later never lets the
// drone leave earlier (harvest ≥ 0), so the edge functions are FIFO and a label-setting search is exact.
import KDBush from 'kdbush';
import { around } from 'geokdbush';
import FlatQueue from 'flatqueue';
import { geodesicInverse } from '#shared/engineering/geodesic.ts';
import { evaluateLeg, type LegFigures, type Wind } from '#shared/engineering/mission-leg.ts';
import { dwellS, usableWh, type MissionDrone } from '#shared/engineering/mission-energy.ts';
import { maxGroundSpeedMps } from '#shared/engineering/wind-triangle.ts';

export interface Point { lat: number; lon: number }
export interface SearchPerch extends Point { hourlyHarvestW: readonly number[] }
export interface SearchInput {
  drone: MissionDrone;
  base: Point;
  target: Point;
  departAtMs: number;
  utcOffsetMin: number;
  wind: Wind;
  returnToBase: boolean;
  objective: 'time' | 'fewest-perches';
  perches: readonly SearchPerch[];
  index?: KDBush;
  /** The exclude zone a straight leg would cross, or null. */
  blocked?: (a: Point, b: Point) => string | null;
}
export interface Stop { kind: 'base' | 'perch' | 'target'; perch: number; lat: number; lon: number }
export interface SearchLeg extends LegFigures { from: Stop; to: Stop; departMs: number; arriveMs: number }
export interface SearchVisit { perch: number; arriveMs: number; departMs: number; dwellS: number; harvestW: number; socArrivePct: number; socDepartPct: number }
export type SearchResult =
  | { found: true; legs: SearchLeg[]; visits: SearchVisit[]; totalDistanceM: number; totalDurationS: number; expansions: number }
  | { found: false; expansions: number; zoneCuts: string[]; unflyable: string[]; nearestToTargetM: number; nearest: Point };

export function buildIndex(perches: readonly Point[]): KDBush {
  const idx = new KDBush(Math.max(1, perches.length));
  for (const p of perches) idx.add(p.lon, p.lat);
  if (perches.length === 0) idx.add(0, 0);
  return idx.finish();
}

const COUNT = 1e9;
const RAD = Math.PI / 180; // fewest-perches: perch count first, then time (s)

/** The time-dependent A* (heuristic: remaining distance at the best ground speed, plus the least dwell the
 * remaining energy needs at the best harvest anywhere; admissible and consistent). */
export function searchRoute(input: SearchInput): SearchResult {
  const { drone, wind, perches } = input;
  const n = perches.length;
  const index = input.index ?? buildIndex(perches);
  // States: 0 base; 1..n outbound perch; n+1..2n homebound perch; 2n+1+k target reached from state k (k ≤ n); goal.
  const T0 = 2 * n + 1;
  const GOAL = 3 * n + 2;
  const total = GOAL + 1;
  const g = new Float64Array(total).fill(Infinity);
  const key = new Float64Array(total).fill(Infinity);
  const parent = new Int32Array(total).fill(-1);
  const soc = new Float64Array(total);
  const closed = new Uint8Array(total);
  const count = new Int32Array(total);
  const gsMax = maxGroundSpeedMps(drone.cruiseSpeedMps, wind.speedMps);
  const pMax = perches.reduce((m, p) => Math.max(m, ...p.hourlyHarvestW), 0) * drone.chargeEfficiency;
  const whPerM = drone.cruisePowerW / gsMax / 3600;
  const pos = (s: number): Point => (s === 0 || s === GOAL ? input.base : s <= n ? perches[s - 1]! : s <= 2 * n ? perches[s - n - 1]! : input.target);
  const outbound = (s: number) => s <= n;
  const dist = (a: Point, b: Point) => geodesicInverse({ latDeg: a.lat, lonDeg: a.lon }, { latDeg: b.lat, lonDeg: b.lon }).lengthM;
  const targetToBase = input.returnToBase ? dist(input.target, input.base) : 0;
  // Each perch's distance to the target and to the base, computed once (the heuristic asks for them on every relaxation).
  const toTargetM = new Float64Array(n).fill(NaN);
  const toBaseM = new Float64Array(n).fill(NaN);
  const baseToTarget = dist(input.base, input.target);
  const remainingM = (s: number): number => {
    if (s === 0) return baseToTarget + targetToBase;
    if (s > 2 * n) return targetToBase;
    const i = s <= n ? s - 1 : s - n - 1;
    if (s <= n) {
      if (Number.isNaN(toTargetM[i]!)) toTargetM[i] = dist(perches[i]!, input.target);
      return toTargetM[i]! + targetToBase;
    }
    if (Number.isNaN(toBaseM[i]!)) toBaseM[i] = dist(perches[i]!, input.base);
    return toBaseM[i]!;
  };
  const h = (s: number): number => {
    if (s === GOAL) return 0;
    const d = remainingM(s);
    const deficit = Math.max(0, whPerM * d - usableWh(drone, soc[s]!));
    if (deficit > 1e-9 && !(pMax > 0)) return Infinity;
    return d / gsMax + (deficit > 1e-9 ? (deficit * 3600) / pMax : 0);
  };
  const queue = new FlatQueue<number>();
  const zoneCuts = new Set<string>();
  const unflyable = new Set<string>();
  const relax = (from: number, to: number, t: number, s: number) => {
    if (closed[to]) return;
    const c = count[from]! + (to >= 1 && to <= 2 * n ? 1 : 0);
    soc[to] = s;
    const hh = h(to);
    if (!Number.isFinite(hh)) return;
    const k = (input.objective === 'fewest-perches' ? c * COUNT : 0) + t + hh;
    if (k < key[to]! - 1e-9) {
      key[to] = k;
      g[to] = t;
      parent[to] = from;
      count[to] = c;
      queue.push(to, k);
    }
  };
  // The search's leg: the same arithmetic as evaluateLeg (geodesic, wind triangle, E = P·d/GS + manoeuvre) without
  // building its figures or texts; the wind's reason in words is asked of evaluateLeg only when a leg is unflyable.
  const V = drone.cruiseSpeedMps;
  const W = Math.max(0, wind.speedMps);
  const overLimit = W > drone.windLimitMps;
  const leg = (a: Point, b: Point, s0: number, perch: boolean): { durationS: number; socEndPct: number } | null => {
    const geo = geodesicInverse({ latDeg: a.lat, lonDeg: a.lon }, { latDeg: b.lat, lonDeg: b.lon });
    let gs = 0;
    if (!overLimit && V > 0) {
      const rel = (wind.fromDeg - geo.azimuthDeg) * RAD;
      const crosswind = W * Math.sin(rel);
      if (Math.abs(crosswind) < V) gs = V * Math.cos(Math.asin(crosswind / V)) - W * Math.cos(rel);
    }
    if (!(gs > 0)) {
      const f = evaluateLeg(a, b, s0, perch, drone, wind);
      if (f.failure === 'wind' && f.failureText) unflyable.add(f.failureText);
      return null;
    }
    const durationS = geo.lengthM / gs;
    const energyWh = (drone.cruisePowerW * durationS) / 3600 + (perch ? drone.perchManoeuvreWh : 0);
    if (!(energyWh <= usableWh(drone, s0) + 1e-9)) return null;
    const z = input.blocked?.(a, b);
    if (z) {
      zoneCuts.add(z);
      return null;
    }
    return { durationS, socEndPct: s0 - (100 * energyWh) / drone.batteryWh };
  };
  soc[0] = 100;
  g[0] = 0;
  key[0] = h(0);
  queue.push(0, key[0]!);
  let expansions = 0;
  let nearestToTargetM = Infinity;
  let nearest: Point = input.base;
  while (queue.length) {
    const s = queue.pop()!;
    if (closed[s]) continue;
    closed[s] = 1;
    if (s === GOAL) break;
    expansions++;
    const p = pos(s);
    const t = g[s]!;
    const s0 = soc[s]!;
    if (outbound(s)) {
      const d = remainingM(s) - targetToBase;
      if (d < nearestToTargetM) { nearestToTargetM = d; nearest = p; }
    }
    // To the end of this phase: the target (outbound) or the base (homebound).
    if (outbound(s)) {
      const f = leg(p, input.target, s0, false);
      if (f) relax(s, input.returnToBase ? T0 + s : GOAL, t + f.durationS, f.socEndPct);
    } else if (input.returnToBase) {
      const f = leg(p, input.base, s0, false);
      if (f) relax(s, GOAL, t + f.durationS, f.socEndPct);
    }
    // To perches within reach.
    const reachM = (usableWh(drone, s0) * 3600 * gsMax) / drone.cruisePowerW;
    if (n === 0 || !(reachM > 0)) continue;
    const homebound = !outbound(s);
    if (homebound && !input.returnToBase) continue;
    const candidates = around(index, p.lon, p.lat, Infinity, (reachM * 1.01) / 1000 + 0.01);
    for (const i of candidates) {
      const to = (homebound ? n + 1 : 1) + i;
      if (to === s || closed[to]) continue;
      const q = perches[i]!;
      const f = leg(p, q, s0, true);
      if (!f || f.socEndPct > drone.chargeToPercent + 1e-9) continue;
      const arrive = input.departAtMs + (t + f.durationS) * 1000;
      const need = ((drone.chargeToPercent - f.socEndPct) / 100) * drone.batteryWh;
      const dw = dwellS({ arriveAtMs: arrive, utcOffsetMin: input.utcOffsetMin, hourlyHarvestW: q.hourlyHarvestW, chargeEfficiency: drone.chargeEfficiency, energyWh: need });
      if (!Number.isFinite(dw.dwellS)) continue;
      relax(s, to, t + f.durationS + dw.dwellS, drone.chargeToPercent);
    }
  }
  if (!closed[GOAL]) return { found: false, expansions, zoneCuts: [...zoneCuts], unflyable: [...unflyable], nearestToTargetM, nearest };
  // Walk back, then recompute every leg and dwell forward with the same functions.
  const chain: number[] = [];
  for (let s = GOAL; s !== -1; s = parent[s]!) chain.unshift(s);
  const stops: Stop[] = chain.map((s) => {
      const p = pos(s);
      if (s === 0 || s === GOAL) return { kind: 'base' as const, perch: -1, ...p };
      if (s >= T0) return { kind: 'target' as const, perch: -1, ...p };
      return { kind: 'perch' as const, perch: s <= n ? s - 1 : s - n - 1, lat: p.lat, lon: p.lon };
    });
  if (!input.returnToBase) stops[stops.length - 1] = { kind: 'target', perch: -1, ...input.target };
  const legs: SearchLeg[] = [];
  const visits: SearchVisit[] = [];
  let tMs = input.departAtMs;
  let socNow = 100;
  let totalDistanceM = 0;
  for (let i = 1; i < stops.length; i++) {
    const a = stops[i - 1]!;
    const b = stops[i]!;
    const f = evaluateLeg(a, b, socNow, b.kind === 'perch', drone, wind);
    const arriveMs = tMs + f.durationS * 1000;
    legs.push({ ...f, from: a, to: b, departMs: tMs, arriveMs });
    totalDistanceM += f.distanceM;
    tMs = arriveMs;
    socNow = f.socEndPct;
    if (b.kind === 'perch') {
      const q = perches[b.perch]!;
      const need = ((drone.chargeToPercent - socNow) / 100) * drone.batteryWh;
      const dw = dwellS({ arriveAtMs: arriveMs, utcOffsetMin: input.utcOffsetMin, hourlyHarvestW: q.hourlyHarvestW, chargeEfficiency: drone.chargeEfficiency, energyWh: need });
      visits.push({ perch: b.perch, arriveMs, departMs: arriveMs + dw.dwellS * 1000, dwellS: dw.dwellS, harvestW: dw.harvestAtArrivalW, socArrivePct: socNow, socDepartPct: drone.chargeToPercent });
      tMs = arriveMs + dw.dwellS * 1000;
      socNow = drone.chargeToPercent;
    }
  }
  return { found: true, legs, visits, totalDistanceM, totalDurationS: (tMs - input.departAtMs) / 1000, expansions };
}
