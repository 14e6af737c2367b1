import { describe, it, expect } from 'vitest';
import {
  assessSpan,
  DEFAULT_SCORING_SETTINGS,
  DEFAULT_DESIGN_WEATHER,
  METHOD_VERSION,
  type SpanAssessmentInput,
  type GateId,
} from '../../../shared/engineering/assessment.ts';
import { CLAMP_S, LIGHT_QUAD } from '../../../shared/engineering/demo-profiles.ts';
import { codeGroundClearanceM, approachDistanceM } from '../../../shared/engineering/clearance.ts';
import { ampacityA, conductorTempC } from '../../../shared/engineering/ieee738.ts';

// A 138 kV Drake span, good in every respect (each test breaks one thing).
const goodSpan = (): SpanAssessmentInput => ({
  conductor: {
    diameterMm: 28.14,
    resistanceLowOhmPerM: 7.283e-5,
    tempLowC: 25,
    resistanceHighOhmPerM: 8.688e-5,
    tempHighC: 75,
  },
  clearanceM: 12,
  loadCurrentA: { min: 300, typical: 700, peak: 850 },
  voltageKv: 138,
  frequencyHz: 60,
  lengthM: 300,
  hazards: [],
  completeness: { conductor: true, load: true, clearance: true, photos: true },
  surveyAgeDays: 30,
  zones: { inExclude: false, inCautionCount: 0 },
});

const gate = (r: ReturnType<typeof assessSpan>, id: GateId) => r.gates.find((g) => g.id === id)!;
const thermal = (s: SpanAssessmentInput) => ({ ...s.conductor, emissivity: 0.5, absorptivity: 0.5 });

describe('perch assessment', () => {
  it('when every condition is good, then the span is perchable with all six gates passed', () => {
    const r = assessSpan(goodSpan(), CLAMP_S, LIGHT_QUAD);
    expect(r.gates.map((g) => g.id).sort()).toEqual(
      ['ampacity', 'clearance', 'contact-temperature', 'gripper-fit', 'no-perch-zone', 'useful-harvest'].sort(),
    );
    expect(r.gates.filter((g) => !g.passed)).toEqual([]);
    expect(r.perchable).toBe(true);
    expect(r.methodVersion).toBe(METHOD_VERSION);
    expect(r.harvestW).toBeGreaterThan(60); // common practice, no published source (700 A → >60 W)
    expect(r.harvestMinW).toBeLessThan(r.harvestW);
    expect(r.harvestPeakW).toBeGreaterThan(r.harvestW);
    expect(r.chargeTimeMin).toBeGreaterThan(45); // common practice, no published source (about an hour)
    expect(r.chargeTimeMin).toBeLessThan(90);
  });

  it('reports code clearance, approach distance and the thermal results from the underlying methods', () => {
    const s = goodSpan();
    const r = assessSpan(s, CLAMP_S, LIGHT_QUAD);
    expect(r.codeClearanceM).toBeCloseTo(codeGroundClearanceM(138), 9); // NESC (ANSI C2) Table 232-1
    expect(r.approachDistanceM).toBeCloseTo(3.3528, 4); // OSHA 29 CFR 1910.333(c)(3): 79.7 kV to ground → 11 ft
    expect(r.approachDistanceM).toBe(approachDistanceM(138));
    expect(r.conductorTempC).toBeCloseTo(conductorTempC(thermal(s), DEFAULT_DESIGN_WEATHER, 850), 6); // IEEE Std 738-2012 method
    expect(r.ampacityA).toBeCloseTo(ampacityA(thermal(s), DEFAULT_DESIGN_WEATHER, 100), 6); // IEEE Std 738-2012 method
  });

  it('uses a hot still summer noon as design weather', () => {
    expect(DEFAULT_DESIGN_WEATHER).toMatchObject({ ambientC: 40, windSpeedMps: 0.61, windAngleDeg: 90, solarHour: 12 }); // IEEE Std 738-2012 sample conditions
  });

  it('when the conductor is too thick for the gripper, then gripper-fit fails and the span is not perchable', () => {
    const s = goodSpan();
    s.conductor.diameterMm = 40;
    const r = assessSpan(s, CLAMP_S, LIGHT_QUAD);
    expect(gate(r, 'gripper-fit').passed).toBe(false);
    expect(r.perchable).toBe(false);
  });

  it('when the conductor is too thin for the gripper, then gripper-fit fails', () => {
    const s = goodSpan();
    s.conductor.diameterMm = 10;
    expect(gate(assessSpan(s, CLAMP_S, LIGHT_QUAD), 'gripper-fit').passed).toBe(false);
  });

  it('when the peak load heats the conductor past the contact limit, then contact-temperature fails', () => {
    const s = goodSpan();
    s.loadCurrentA.peak = 1300;
    const r = assessSpan(s, CLAMP_S, LIGHT_QUAD);
    expect(r.conductorTempC).toBeGreaterThan(CLAMP_S.contactTempLimitC);
    expect(gate(r, 'contact-temperature').passed).toBe(false);
    expect(r.perchable).toBe(false);
  });

  it('when the span is below the code clearance, then clearance fails', () => {
    const s = goodSpan();
    s.clearanceM = codeGroundClearanceM(138) - 0.1;
    const r = assessSpan(s, CLAMP_S, LIGHT_QUAD);
    expect(gate(r, 'clearance').passed).toBe(false);
    expect(r.perchable).toBe(false);
  });

  it('when the code is met but the drone needs more room, then clearance fails', () => {
    const s = goodSpan();
    s.voltageKv = 12.47;
    s.clearanceM = 7;
    expect(gate(assessSpan(s, CLAMP_S, LIGHT_QUAD), 'clearance').passed).toBe(true);
    expect(gate(assessSpan(s, CLAMP_S, { ...LIGHT_QUAD, approachClearanceM: 8 }), 'clearance').passed).toBe(false);
  });

  it('when clearance was never surveyed, then clearance fails', () => {
    const s = goodSpan();
    s.clearanceM = null;
    expect(gate(assessSpan(s, CLAMP_S, LIGHT_QUAD), 'clearance').passed).toBe(false);
  });

  it('when the span lies in an active exclude zone, then no-perch-zone fails', () => {
    const s = goodSpan();
    s.zones.inExclude = true;
    const r = assessSpan(s, CLAMP_S, LIGHT_QUAD);
    expect(gate(r, 'no-perch-zone').passed).toBe(false);
    expect(r.perchable).toBe(false);
  });

  it('when the load estimate exceeds the ampacity, then the ampacity flag fails, data quality drops, but it does not block', () => {
    const hotHarvester = { ...CLAMP_S, contactTempLimitC: 250 };
    const good = assessSpan(goodSpan(), hotHarvester, LIGHT_QUAD);
    const s = goodSpan();
    s.loadCurrentA.peak = 1400;
    const r = assessSpan(s, hotHarvester, LIGHT_QUAD);
    expect(r.ampacityA).toBeLessThan(1400);
    expect(gate(r, 'ampacity').passed).toBe(false);
    expect(gate(r, 'ampacity').blocking).toBe(false);
    expect(r.perchable).toBe(true);
    const dq = (x: typeof r) => x.factors.find((f) => f.id === 'data-quality')!.value;
    expect(dq(r)).toBeCloseTo(dq(good) * DEFAULT_SCORING_SETTINGS.ampacityFlagFactor, 9);
  });

  it('when the typical load is too light, then useful-harvest fails', () => {
    const s = goodSpan();
    s.loadCurrentA = { min: 10, typical: 30, peak: 60 };
    const r = assessSpan(s, CLAMP_S, LIGHT_QUAD);
    expect(r.harvestW).toBeLessThan(CLAMP_S.usefulMinHarvestW);
    expect(gate(r, 'useful-harvest').passed).toBe(false);
    expect(r.perchable).toBe(false);
  });

  it('when a phase is bundled, then the core sees one sub-conductor current', () => {
    const s = goodSpan();
    s.conductor.subConductors = 2;
    s.loadCurrentA = { min: 600, typical: 1400, peak: 1700 };
    const single = assessSpan(goodSpan(), CLAMP_S, LIGHT_QUAD);
    expect(assessSpan(s, CLAMP_S, LIGHT_QUAD).harvestW).toBeCloseTo(single.harvestW, 9); // Ampère's law (core encloses I/n)
  });
});

describe('perch score', () => {
  it('stays within 0..100 and equals the sum of the factor contributions', () => {
    const variants: SpanAssessmentInput[] = [goodSpan()];
    const bad = goodSpan();
    bad.hazards = [{ severity: 'high' }, { severity: 'high' }, { severity: 'medium' }];
    bad.zones.inCautionCount = 3;
    bad.clearanceM = 1;
    bad.surveyAgeDays = null;
    bad.completeness = { a: false, b: false };
    bad.lengthM = 5000;
    bad.loadCurrentA = { min: 0, typical: 0, peak: 0 };
    variants.push(bad);
    for (const s of variants) {
      const r = assessSpan(s, CLAMP_S, LIGHT_QUAD);
      expect(r.score).toBeGreaterThanOrEqual(0);
      expect(r.score).toBeLessThanOrEqual(100);
      const sum = r.factors.reduce((a, f) => a + f.contribution, 0);
      expect(r.score).toBeCloseTo(sum, 9);
      for (const f of r.factors) {
        expect(f.value).toBeGreaterThanOrEqual(0);
        expect(f.value).toBeLessThanOrEqual(1);
        const totalWeight = r.factors.reduce((a, x) => a + x.weight, 0);
        expect(f.contribution).toBeCloseTo((100 * f.value * f.weight) / totalWeight, 9);
      }
    }
    expect(assessSpan(bad, CLAMP_S, LIGHT_QUAD).score).toBe(0);
  });

  it('names five kebab-case factors', () => {
    const ids = assessSpan(goodSpan(), CLAMP_S, LIGHT_QUAD).factors.map((f) => f.id);
    expect(ids).toEqual(['power-margin', 'clearance-margin', 'hazards', 'span-exposure', 'data-quality']);
    for (const id of ids) expect(id).toMatch(/^[a-z]+(-[a-z]+)*$/);
  });

  it('when hazards or caution zones are added, then the score falls', () => {
    const base = assessSpan(goodSpan(), CLAMP_S, LIGHT_QUAD).score;
    const low = goodSpan();
    low.hazards = [{ severity: 'low' }];
    const high = goodSpan();
    high.hazards = [{ severity: 'high' }];
    const caution = goodSpan();
    caution.zones.inCautionCount = 1;
    const sLow = assessSpan(low, CLAMP_S, LIGHT_QUAD).score;
    const sHigh = assessSpan(high, CLAMP_S, LIGHT_QUAD).score;
    expect(sLow).toBeLessThan(base);
    expect(sHigh).toBeLessThan(sLow);
    expect(assessSpan(caution, CLAMP_S, LIGHT_QUAD).score).toBeLessThan(base);
  });

  it('when the survey is stale or incomplete, then the score falls', () => {
    const base = assessSpan(goodSpan(), CLAMP_S, LIGHT_QUAD).score;
    const old = goodSpan();
    old.surveyAgeDays = 1000;
    const partial = goodSpan();
    partial.completeness = { ...partial.completeness, photos: false };
    expect(assessSpan(old, CLAMP_S, LIGHT_QUAD).score).toBeLessThan(base);
    expect(assessSpan(partial, CLAMP_S, LIGHT_QUAD).score).toBeLessThan(base);
  });

  it('when the span is very short or very long, then span exposure scores less', () => {
    const exposure = (lengthM: number) => {
      const s = goodSpan();
      s.lengthM = lengthM;
      return assessSpan(s, CLAMP_S, LIGHT_QUAD).factors.find((f) => f.id === 'span-exposure')!.value;
    };
    expect(exposure(40)).toBeLessThan(exposure(300));
    expect(exposure(900)).toBeLessThan(exposure(300));
  });

  it('when weights change, then contributions follow them', () => {
    const settings = { ...DEFAULT_SCORING_SETTINGS, weights: { 'power-margin': 1, 'clearance-margin': 0, hazards: 0, 'span-exposure': 0, 'data-quality': 0 } };
    const r = assessSpan(goodSpan(), CLAMP_S, LIGHT_QUAD, DEFAULT_DESIGN_WEATHER, settings);
    const power = r.factors.find((f) => f.id === 'power-margin')!;
    expect(r.score).toBeCloseTo(100 * power.value, 9);
    expect(r.factors.filter((f) => f.id !== 'power-margin').every((f) => f.contribution === 0)).toBe(true);
  });
});
