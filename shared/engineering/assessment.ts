// Perch assessment of a span: pass/fail gates for landing and harvesting, plus a weighted 0..100 suitability score.
import { harvest, type HarvesterProfile } from './ct-harvester.ts';
import { ampacityA as ieeeAmpacityA, conductorTempC as ieeeConductorTempC, type ThermalWeather } from './ieee738.ts';
import { approachDistanceM as oshaApproachDistanceM, codeGroundClearanceM } from './clearance.ts';
import { chargeTimeMin as energyChargeTimeMin, DEFAULT_BATTERY_EFFICIENCY } from './charge-time.ts';
import { DEFAULT_EMISSIVITY, DEFAULT_ABSORPTIVITY } from './conductors.ts';
import type { DroneProfile } from './demo-profiles.ts';
import { formatQuantity, unitLabel, type QuantityKind, type UnitSystem } from '../units.ts';

/** Bumped whenever a gate, factor, default or weight changes, so stored assessments can be recomputed. */
export const METHOD_VERSION = 'perch-assessment/1.0.0';

export type HazardSeverity = 'low' | 'medium' | 'high';

export interface SpanAssessmentInput {
  conductor: {
    diameterMm: number;
    resistanceLowOhmPerM: number;
    tempLowC: number;
    resistanceHighOhmPerM: number;
    tempHighC: number;
    emissivity?: number;
    absorptivity?: number;
    /** Sub-conductors per phase; the core encloses one, so it sees I/n (Ampère's law). */
    subConductors?: number;
  };
  /** Measured ground clearance at worst-case sag, m; null when not surveyed. */
  clearanceM: number | null;
  loadCurrentA: { min: number; typical: number; peak: number };
  /** Line-to-line voltage, kV. */
  voltageKv: number;
  frequencyHz: number;
  lengthM: number;
  hazards: ReadonlyArray<{ severity: HazardSeverity }>;
  /** Which survey fields are filled in (true) or missing (false). */
  completeness: Readonly<Record<string, boolean>>;
  /** Days since the span was last surveyed; null when never. */
  surveyAgeDays: number | null;
  zones: { inExclude: boolean; inCautionCount: number };
  /** Overrides of the design weather for this span (e.g. its latitude, elevation, azimuth). */
  weather?: Partial<ThermalWeather>;
}

export type FactorId = 'power-margin' | 'clearance-margin' | 'hazards' | 'span-exposure' | 'data-quality';
export type GateId = 'gripper-fit' | 'contact-temperature' | 'clearance' | 'no-perch-zone' | 'ampacity' | 'useful-harvest';

export interface ScoringSettings {
  weights: Record<FactorId, number>;
  /** Conductor temperature at which the ampacity check is made, °C. */
  ampacityMaxConductorC: number;
  /** Harvest / useful minimum at which the power-margin factor is full. */
  powerMarginFullRatio: number;
  /** Clearance above the requirement at which the clearance-margin factor is full, m. */
  clearanceMarginFullM: number;
  hazardPenalty: Record<HazardSeverity, number>;
  cautionZonePenalty: number;
  /** Span lengths scoring full marks, m; the score falls linearly to 0 at zero and at spanLengthMaxM. */
  spanLengthIdealM: { min: number; max: number };
  spanLengthMaxM: number;
  /** Survey ages: full freshness up to freshDays, none at staleDays. */
  surveyFreshDays: number;
  surveyStaleDays: number;
  /** Multiplier on the data-quality factor when the load estimate exceeds the ampacity. */
  ampacityFlagFactor: number;
  batteryEfficiency: number;
}

export const DEFAULT_SCORING_SETTINGS: ScoringSettings = {
  weights: { 'power-margin': 30, 'clearance-margin': 20, hazards: 20, 'span-exposure': 15, 'data-quality': 15 },
  ampacityMaxConductorC: 100,
  powerMarginFullRatio: 4,
  clearanceMarginFullM: 3,
  hazardPenalty: { low: 0.1, medium: 0.25, high: 0.5 },
  cautionZonePenalty: 0.2,
  spanLengthIdealM: { min: 100, max: 400 },
  spanLengthMaxM: 1200,
  surveyFreshDays: 180,
  surveyStaleDays: 1825,
  ampacityFlagFactor: 0.5,
  batteryEfficiency: DEFAULT_BATTERY_EFFICIENCY,
};

/**
 * Design weather: a hot, still summer noon, the IEEE Std 738-2012 sample's conservative conditions —
 * 40 °C air, 0.61 m/s wind perpendicular to the line, sea level, 30° N, east–west line, 21 June, solar noon, clear sky.
 */
export const DEFAULT_DESIGN_WEATHER: ThermalWeather = {
  ambientC: 40,
  windSpeedMps: 0.61,
  windAngleDeg: 90,
  elevationM: 0,
  latitudeDeg: 30,
  lineAzimuthDeg: 90,
  dayOfYear: 172,
  solarHour: 12,
  atmosphere: 'clear',
};

export interface Gate {
  id: GateId;
  passed: boolean;
  /** False for data-quality flags that inform but do not stop a perch. */
  blocking: boolean;
  /** The detail in words, metric (kept for readers of the API; `parts` carries the same with its quantities). */
  detail: string;
  /** The detail as text and SI quantities, so a screen writes each figure in the user's units. */
  parts: DetailPart[];
}

/** A piece of a gate detail: plain text, or an SI value of a quantity with the decimals the metric text shows. */
export type DetailPart = string | { quantity: QuantityKind; si: number; digits: number; bare?: boolean };

/** Text of the parts in the chosen units: metric as the detail string has always read, US through formatQuantity. */
export function detailText(parts: readonly DetailPart[], system: UnitSystem = 'metric'): string {
  return parts
    .map((p) => {
      if (typeof p === 'string') return p;
      // `bare`: the number without its unit, as the first end of a range ("12.0–36.0 mm").
      const text = system === 'metric' ? `${Number.isFinite(p.si) ? p.si.toFixed(p.digits) : '∞'} ${unitLabel(p.quantity, 'metric')}` : formatQuantity(p.si, p.quantity, system);
      return p.bare ? text.slice(0, text.lastIndexOf(' ')) : text;
    })
    .join('');
}

const part = (quantity: QuantityKind, si: number, digits = 1): DetailPart => ({ quantity, si, digits });
const gate = (id: GateId, passed: boolean, blocking: boolean, parts: DetailPart[]): Gate => ({ id, passed, blocking, detail: detailText(parts), parts });

export interface Factor {
  id: FactorId;
  /** 0..1 */
  value: number;
  weight: number;
  /** Points of the 0..100 score; contributions sum to the score. */
  contribution: number;
}

export interface SpanAssessment {
  perchable: boolean;
  score: number;
  gates: Gate[];
  factors: Factor[];
  /** Converter output at typical, minimum and peak load, W. */
  harvestW: number;
  harvestMinW: number;
  harvestPeakW: number;
  /** Minutes to restore the drone's reserve at typical load; Infinity when nothing is harvested. */
  chargeTimeMin: number;
  /** Conductor temperature at peak load in the design weather, °C. */
  conductorTempC: number;
  ampacityA: number;
  codeClearanceM: number;
  approachDistanceM: number;
  methodVersion: string;
}

/** "12.0–36.0 mm" as parts: the gripper's diameter range. */
export function gripperRange(h: Pick<HarvesterProfile, 'gripperMinDiameterMm' | 'gripperMaxDiameterMm'>): DetailPart[] {
  return [{ quantity: 'diameter', si: h.gripperMinDiameterMm, digits: 1, bare: true }, '–', part('diameter', h.gripperMaxDiameterMm)];
}

/**
 * Reuse of the costly sub-results across many spans (a full rescore): the IEEE 738 ampacity and conductor
 * temperature per (conductor, weather, current or limit), and the harvester's output per (harvester, current,
 * frequency). The same pure functions run on the same arguments, so the results are identical; only repeats are
 * skipped. Harvester objects are keyed by identity: pass the same object for the whole run and do not change it.
 */
export interface AssessmentMemo {
  thermal: Map<string, number>;
  harvest: WeakMap<object, Map<string, number>>;
  weatherKeys: WeakMap<object, string>;
}

export function createAssessmentMemo(): AssessmentMemo {
  return { thermal: new Map(), harvest: new WeakMap(), weatherKeys: new WeakMap() };
}

/** Entries kept per table before it starts again (bounds memory on networks with very many distinct loads). */
const MEMO_LIMIT = 250_000;

function memoised<K>(map: Map<K, number>, key: K, compute: () => number): number {
  const hit = map.get(key);
  if (hit !== undefined) return hit;
  const v = compute();
  if (map.size >= MEMO_LIMIT) map.clear();
  map.set(key, v);
  return v;
}

const weatherKeyOf = (w: ThermalWeather) =>
  `${w.ambientC}|${w.windSpeedMps}|${w.windAngleDeg}|${w.elevationM}|${w.latitudeDeg}|${w.lineAzimuthDeg}|${w.dayOfYear}|${w.solarHour}|${w.atmosphere}`;

const clamp01 = (x: number) => (Number.isFinite(x) ? Math.min(1, Math.max(0, x)) : 0);

// Perch assessment: IEEE Std 738-2012 thermal checks, CT harvester model, NESC Table 232-1 and OSHA 29 CFR 1910.333(c)(3) distances.
export function assessSpan(
  span: SpanAssessmentInput,
  harvester: HarvesterProfile,
  drone: DroneProfile,
  designWeather: ThermalWeather = DEFAULT_DESIGN_WEATHER,
  settings: ScoringSettings = DEFAULT_SCORING_SETTINGS,
  memo?: AssessmentMemo,
): SpanAssessment {
  const weather: ThermalWeather = { ...designWeather, ...span.weather };
  let thermalKey = '';
  if (memo) {
    let wk = span.weather ? undefined : memo.weatherKeys.get(designWeather);
    if (wk === undefined) {
      wk = weatherKeyOf(weather);
      if (!span.weather) memo.weatherKeys.set(designWeather, wk);
    }
    const c = span.conductor;
    thermalKey = `${wk}|${c.diameterMm}|${c.resistanceLowOhmPerM}|${c.tempLowC}|${c.resistanceHighOhmPerM}|${c.tempHighC}|${c.emissivity ?? DEFAULT_EMISSIVITY}|${c.absorptivity ?? DEFAULT_ABSORPTIVITY}`;
  }
  const thermalConductor = {
    diameterMm: span.conductor.diameterMm,
    resistanceLowOhmPerM: span.conductor.resistanceLowOhmPerM,
    tempLowC: span.conductor.tempLowC,
    resistanceHighOhmPerM: span.conductor.resistanceHighOhmPerM,
    tempHighC: span.conductor.tempHighC,
    emissivity: span.conductor.emissivity ?? DEFAULT_EMISSIVITY,
    absorptivity: span.conductor.absorptivity ?? DEFAULT_ABSORPTIVITY,
  };
  const bundle = Math.max(1, Math.floor(span.conductor.subConductors ?? 1));
  // The core closes around one sub-conductor, which carries I/n of the phase current.
  const harvestOf = (phaseA: number) =>
    harvest({ currentA: phaseA / bundle, frequencyHz: span.frequencyHz, harvester }).powerW * harvester.converterEfficiency;
  let harvestMemo: Map<string, number> | undefined;
  if (memo) {
    harvestMemo = memo.harvest.get(harvester);
    if (!harvestMemo) memo.harvest.set(harvester, (harvestMemo = new Map()));
  }
  const harvestAt = (phaseA: number) => (harvestMemo ? memoised(harvestMemo, `${phaseA}|${bundle}|${span.frequencyHz}`, () => harvestOf(phaseA)) : harvestOf(phaseA));

  const harvestW = harvestAt(span.loadCurrentA.typical);
  const harvestMinW = harvestAt(span.loadCurrentA.min);
  const harvestPeakW = harvestAt(span.loadCurrentA.peak);
  const chargeTimeMin = energyChargeTimeMin({
    deltaSoc: 1 - drone.reservePercent / 100,
    batteryWh: drone.batteryWh,
    harvestW,
    converterEfficiency: 1, // harvestW is already the converter's output
    batteryEfficiency: settings.batteryEfficiency,
  });
  const tempOf = () => ieeeConductorTempC(thermalConductor, weather, span.loadCurrentA.peak / bundle);
  const ratingOf = () => ieeeAmpacityA(thermalConductor, weather, settings.ampacityMaxConductorC);
  const conductorTempC = memo ? memoised(memo.thermal, `${thermalKey}|t|${span.loadCurrentA.peak / bundle}`, tempOf) : tempOf();
  const ampacityA = (memo ? memoised(memo.thermal, `${thermalKey}|a|${settings.ampacityMaxConductorC}`, ratingOf) : ratingOf()) * bundle;
  const codeClearanceM = codeGroundClearanceM(span.voltageKv);
  const approachDistanceM = oshaApproachDistanceM(span.voltageKv);
  const requiredClearanceM = Math.max(codeClearanceM, drone.approachClearanceM);

  const d = span.conductor.diameterMm;
  const gates: Gate[] = [
    gate('gripper-fit', d >= harvester.gripperMinDiameterMm && d <= harvester.gripperMaxDiameterMm, true, [
      'conductor ', part('diameter', d), '; gripper ', ...gripperRange(harvester),
    ]),
    gate('contact-temperature', conductorTempC < harvester.contactTempLimitC, true, [
      'conductor ', part('temperature', conductorTempC), ' at peak load ', part('current', span.loadCurrentA.peak, 0),
      '; contact limit ', part('temperature', harvester.contactTempLimitC, 0),
    ]),
    gate(
      'clearance',
      span.clearanceM !== null && span.clearanceM >= requiredClearanceM,
      true,
      span.clearanceM === null
        ? ['clearance not surveyed; needs ', part('length', requiredClearanceM, 2)]
        : ['clearance ', part('length', span.clearanceM, 2), '; code ', part('length', codeClearanceM, 2), ', drone ', part('length', drone.approachClearanceM, 2)],
    ),
    gate('no-perch-zone', !span.zones.inExclude, true, [span.zones.inExclude ? 'inside an active no-perch zone' : 'outside every active no-perch zone']),
    // A load above the thermal rating says the load estimate (or the conductor record) is doubtful;
    // it lowers data quality instead of blocking, since the line owner, not the drone, manages loading.
    gate('ampacity', span.loadCurrentA.peak <= ampacityA, false, [
      'peak load ', part('current', span.loadCurrentA.peak, 0), '; ampacity ', part('current', ampacityA, 0),
      ' at ', part('temperature', settings.ampacityMaxConductorC, 0),
    ]),
    gate('useful-harvest', harvestW >= harvester.usefulMinHarvestW, true, [
      part('power', harvestW), ' at typical load ', part('current', span.loadCurrentA.typical, 0), '; useful minimum ', part('power', harvester.usefulMinHarvestW),
    ]),
  ];
  const ampacityOk = gates.find((g) => g.id === 'ampacity')!.passed;

  const powerMargin = clamp01((harvestW / harvester.usefulMinHarvestW - 1) / (settings.powerMarginFullRatio - 1));
  const clearanceMargin = span.clearanceM === null ? 0 : clamp01((span.clearanceM - requiredClearanceM) / settings.clearanceMarginFullM);
  const hazardPenalty =
    span.hazards.reduce((sum, h) => sum + settings.hazardPenalty[h.severity], 0) +
    settings.cautionZonePenalty * Math.max(0, span.zones.inCautionCount);
  const hazards = clamp01(1 - hazardPenalty);
  const { min: idealMin, max: idealMax } = settings.spanLengthIdealM;
  const L = span.lengthM;
  const lengthScore = L < idealMin ? L / idealMin : L <= idealMax ? 1 : (settings.spanLengthMaxM - L) / (settings.spanLengthMaxM - idealMax);
  const windScore = 1 - weather.windSpeedMps / drone.windLimitMps;
  const spanExposure = clamp01(lengthScore) * clamp01(windScore);
  const fields = Object.values(span.completeness);
  const completeness = fields.length === 0 ? 0 : fields.filter(Boolean).length / fields.length;
  const age = span.surveyAgeDays;
  const freshness =
    age === null ? 0 : age <= settings.surveyFreshDays ? 1 : clamp01((settings.surveyStaleDays - age) / (settings.surveyStaleDays - settings.surveyFreshDays));
  const dataQuality = clamp01(((completeness + freshness) / 2) * (ampacityOk ? 1 : settings.ampacityFlagFactor));

  const values: Record<FactorId, number> = {
    'power-margin': powerMargin,
    'clearance-margin': clearanceMargin,
    hazards,
    'span-exposure': spanExposure,
    'data-quality': dataQuality,
  };
  const totalWeight = Object.values(settings.weights).reduce((a, b) => a + Math.max(0, b), 0);
  const factors: Factor[] = (Object.keys(values) as FactorId[]).map((id) => {
    const weight = Math.max(0, settings.weights[id]);
    return { id, value: values[id], weight, contribution: totalWeight > 0 ? (100 * values[id] * weight) / totalWeight : 0 };
  });
  const score = factors.reduce((sum, f) => sum + f.contribution, 0);

  return {
    perchable: gates.every((g) => g.passed || !g.blocking),
    score,
    gates,
    factors,
    harvestW,
    harvestMinW,
    harvestPeakW,
    chargeTimeMin,
    conductorTempC,
    ampacityA,
    codeClearanceM,
    approachDistanceM,
    methodVersion: METHOD_VERSION,
  };
}
