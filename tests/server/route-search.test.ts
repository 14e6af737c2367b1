import { describe, expect, it } from 'vitest';
import { searchRoute, type Point, type SearchPerch } from '../../server/modules/missions/route-search.ts';
import { evaluateLeg, type Wind } from '../../shared/engineering/mission-leg.ts';
import { dwellS, type MissionDrone } from '../../shared/engineering/mission-energy.ts';
import { prng } from '../../shared/prng.ts';

const drone: MissionDrone = { batteryWh: 100, reservePercent: 20, cruiseSpeedMps: 12, windLimitMps: 12, cruisePowerW: 300, perchManoeuvreWh: 3, chargeEfficiency: 0.95, chargeToPercent: 100 };

/** Brute force: every sequence of distinct perches out (and, with a return, every sequence back), costed leg by leg. */
function bruteForce(perches: SearchPerch[], base: Point, target: Point, departAtMs: number, wind: Wind, returnToBase: boolean, objective: 'time' | 'fewest-perches', d: MissionDrone) {
  let best: { count: number; time: number } | null = null;
  const better = (c: number, t: number) => !best || (objective === 'time' ? t < best.time - 1e-6 : c < best.count || (c === best.count && t < best.time - 1e-6));
  const walk = (at: Point, soc: number, tS: number, used: Set<number>, count: number, goal: Point, done: (soc: number, tS: number, count: number) => void) => {
    const fin = evaluateLeg(at, goal, soc, false, d, wind);
    if (fin.ok) done(fin.socEndPct, tS + fin.durationS, count);
    perches.forEach((q, i) => {
      if (used.has(i)) return;
      const f = evaluateLeg(at, q, soc, true, d, wind);
      if (!f.ok || f.socEndPct > d.chargeToPercent) return;
      const arrive = departAtMs + (tS + f.durationS) * 1000;
      const dw = dwellS({ arriveAtMs: arrive, utcOffsetMin: 0, hourlyHarvestW: q.hourlyHarvestW, chargeEfficiency: d.chargeEfficiency, energyWh: ((d.chargeToPercent - f.socEndPct) / 100) * d.batteryWh });
      if (!Number.isFinite(dw.dwellS)) return;
      used.add(i);
      walk(q, d.chargeToPercent, tS + f.durationS + dw.dwellS, used, count + 1, goal, done);
      used.delete(i);
    });
  };
  walk(base, 100, 0, new Set(), 0, target, (soc, t, c) => {
    if (!returnToBase) {
      if (better(c, t)) best = { count: c, time: t };
      return;
    }
    walk(target, soc, t, new Set(), c, base, (_s, t2, c2) => {
      if (better(c2, t2)) best = { count: c2, time: t2 };
    });
  });
  return best as { count: number; time: number } | null;
}

function network(seed: number, maxPerches: number) {
  const rnd = prng(seed);
  const n = 1 + Math.floor(rnd() * maxPerches);
  const at = () => ({ lat: -30.2 + (rnd() - 0.5) * 0.25, lon: -130.3 + (rnd() - 0.5) * 0.3 });
  const perches: SearchPerch[] = Array.from({ length: n }, () => {
    const peak = 20 + rnd() * 80;
    const mu = rnd() * 24;
    return { ...at(), hourlyHarvestW: Array.from({ length: 24 }, (_, h) => Math.max(0, peak * (0.3 + 0.7 * Math.exp(-((h - mu) ** 2) / 20)))) };
  });
  const wind: Wind = rnd() < 0.3 ? { speedMps: 0, fromDeg: 0 } : { speedMps: rnd() * 6, fromDeg: rnd() * 360 };
  const d: MissionDrone = { ...drone, chargeToPercent: rnd() < 0.3 ? 90 : 100 };
  return { perches, base: at(), target: at(), wind, d, departAtMs: Date.UTC(2026, 5, 1, Math.floor(rnd() * 24), Math.floor(rnd() * 60)) };
}

describe('route search is optimal (against brute force over every perch sequence)', () => {
  it('when 240 random one-way networks of up to 9 perches, then the search finds the brute-force optimum for both objectives', () => {
    let feasible = 0;
    let multiPerch = 0;
    for (let k = 0; k < 240; k++) {
      const net = network(1000 + k, 9);
      for (const objective of ['time', 'fewest-perches'] as const) {
        const bf = bruteForce(net.perches, net.base, net.target, net.departAtMs, net.wind, false, objective, net.d);
        const r = searchRoute({ drone: net.d, base: net.base, target: net.target, departAtMs: net.departAtMs, utcOffsetMin: 0, wind: net.wind, returnToBase: false, objective, perches: net.perches });
        expect(r.found, `network ${k} ${objective}`).toBe(!!bf);
        if (bf && r.found) {
          feasible++;
          if (r.visits.length >= 2) multiPerch++;
          expect(r.totalDurationS).toBeCloseTo(bf.time, 3); // brute force, direct computation
          if (objective === 'fewest-perches') expect(r.visits.length).toBe(bf.count);
        }
      }
    }
    expect(feasible).toBeGreaterThan(100);
    expect(multiPerch).toBeGreaterThan(20); // the networks do exercise chains of perches
  });

  it('when 60 random networks of up to 5 perches with a return to base, then the search matches brute force', () => {
    for (let k = 0; k < 60; k++) {
      const net = network(5000 + k, 5);
      const bf = bruteForce(net.perches, net.base, net.target, net.departAtMs, net.wind, true, 'time', net.d);
      const r = searchRoute({ drone: net.d, base: net.base, target: net.target, departAtMs: net.departAtMs, utcOffsetMin: 0, wind: net.wind, returnToBase: true, objective: 'time', perches: net.perches });
      expect(r.found, `network ${k}`).toBe(!!bf);
      if (bf && r.found) expect(r.totalDurationS).toBeCloseTo(bf.time, 3); // brute force
    }
  });
});
