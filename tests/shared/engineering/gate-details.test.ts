// Gate details carry their figures as SI quantities, so a US-units screen reads ft, in, °F; the metric words stay as before.
import { describe, expect, it } from 'vitest';
import { assessSpan, detailText, type GateId, type SpanAssessmentInput } from '../../../shared/engineering/assessment.ts';
import { CLAMP_S, LIGHT_QUAD } from '../../../shared/engineering/demo-profiles.ts';
import { codeGroundClearanceM } from '../../../shared/engineering/clearance.ts';

const span = (over: Partial<SpanAssessmentInput> = {}): SpanAssessmentInput => ({
  conductor: { diameterMm: 28.14, resistanceLowOhmPerM: 7.283e-5, tempLowC: 25, resistanceHighOhmPerM: 8.688e-5, tempHighC: 75 },
  clearanceM: 12,
  loadCurrentA: { min: 300, typical: 700, peak: 850 },
  voltageKv: 138,
  frequencyHz: 60,
  lengthM: 300,
  hazards: [],
  completeness: { conductor: true, load: true, clearance: true, photos: true },
  surveyAgeDays: 30,
  zones: { inExclude: false, inCautionCount: 0 },
  ...over,
});

const gate = (id: GateId, s = span()) => assessSpan(s, CLAMP_S, LIGHT_QUAD).gates.find((g) => g.id === id)!;

describe('gate details in the user units', () => {
  it('when read in metric, then the parts read exactly as the detail words', () => {
    for (const g of assessSpan(span(), CLAMP_S, LIGHT_QUAD).gates) expect(detailText(g.parts, 'metric')).toBe(g.detail);
  });

  it('when read in US units, then the clearance figures are in feet', () => {
    const g = gate('clearance');
    const code = codeGroundClearanceM(138); // NESC (ANSI C2) Table 232-1
    // 1 ft = 0.3048 m exactly (international foot, 1959).
    const ft = (m: number) => `${(m / 0.3048).toFixed(1)} ft`;
    expect(detailText(g.parts, 'us')).toBe(`clearance ${ft(12)}; code ${ft(code)}, drone ${ft(LIGHT_QUAD.approachClearanceM)}`);
    expect(detailText(g.parts, 'us')).not.toMatch(/ m\b/);
  });

  it('when read in US units, then the gripper range is in inches and the temperatures in °F', () => {
    const grip = detailText(gate('gripper-fit').parts, 'us');
    // 28.14 mm / 25.4 mm per inch = 1.108 in (exact inch, 1959).
    expect(grip).toMatch(/^conductor 1\.108 in; gripper \d\.\d{3}–\d\.\d{3} in$/);
    const temp = gate('contact-temperature');
    const c = Number(/conductor ([\d.]+) °C/.exec(temp.detail)![1]);
    const f = (c * 9) / 5 + 32; // °F = °C × 9/5 + 32 (definition of the scales)
    expect(detailText(temp.parts, 'us')).toContain(`conductor ${f.toFixed(1)} °F at peak load 850 A`);
    expect(detailText(temp.parts, 'us')).not.toContain('°C');
  });

  it('when the clearance was not surveyed, then the requirement still reads in the chosen units', () => {
    const g = gate('clearance', span({ clearanceM: null }));
    expect(g.detail).toMatch(/^clearance not surveyed; needs \d+\.\d{2} m$/);
    expect(detailText(g.parts, 'us')).toMatch(/^clearance not surveyed; needs \d+\.\d ft$/);
  });
});
