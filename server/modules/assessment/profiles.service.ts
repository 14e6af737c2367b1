// Equipment profiles, bench tests and scoring settings: defaults, views and the lookups the assessment needs.
import type { EntityManager } from '@mikro-orm/core';
import { DEMO_DRONES, DEMO_HARVESTERS, CLAMP_S_OPEN } from '#shared/engineering/demo-profiles.ts';
import { DEFAULT_SCORING_SETTINGS, type ScoringSettings } from '#shared/engineering/assessment.ts';
import { harvest } from '#shared/engineering/ct-harvester.ts';
import { benchTest as benchArithmetic } from '#shared/engineering/bench-test.ts';
import type { BenchTestView, DroneProfileView, HarvesterProfileView, ScoringSettingsView } from '#shared/schemas/assessment.ts';
import { BenchTest, DroneProfile, HarvesterProfile, ScoringSettingsVersion } from './profile.entity.ts';
import type { HarvesterProfile as HarvesterModel } from '#shared/engineering/ct-harvester.ts';
import type { DroneProfile as DroneModel } from '#shared/engineering/demo-profiles.ts';
import { sql } from '../../sql/query.ts';

/**
 * Puts the invented demo profiles and the default scoring settings into empty tables, whether or not the demo
 * scenario is seeded: an assessment needs at least one harvester, one drone and one settings version.
 * The open-core variant is kept for bench comparisons but left inactive (it never harvests a useful amount).
 */
export async function ensureAssessmentDefaults(em: EntityManager): Promise<void> {
  const now = new Date();
  if ((await em.count(HarvesterProfile, {})) === 0) {
    DEMO_HARVESTERS.forEach((h, i) => {
      em.create(HarvesterProfile, {
        id: h.id,
        name: h.name,
        coreMaterial: h.coreMaterial,
        turns: h.turns,
        coreAreaMm2: h.coreAreaMm2,
        pathLengthMm: h.pathLengthMm,
        relativePermeability: h.relativePermeability,
        airGapMm: h.airGapMm,
        saturationT: h.saturationT,
        windingResistanceOhm: h.windingResistanceOhm ?? 0,
        converterEfficiency: h.converterEfficiency,
        massKg: h.massKg,
        gripperMinDiameterMm: h.gripperMinDiameterMm,
        gripperMaxDiameterMm: h.gripperMaxDiameterMm,
        contactTempLimitC: h.contactTempLimitC,
        usefulMinHarvestW: h.usefulMinHarvestW,
        active: h.id !== CLAMP_S_OPEN.id,
        sortOrder: i,
        version: 1,
        createdAt: now,
        updatedAt: now,
      });
    });
  }
  if ((await em.count(DroneProfile, {})) === 0) {
    DEMO_DRONES.forEach((d, i) => {
      em.create(DroneProfile, { ...d, active: true, sortOrder: i, version: 1, createdAt: now, updatedAt: now });
    });
  }
  if ((await em.count(ScoringSettingsVersion, {})) === 0) {
    em.create(ScoringSettingsVersion, { version: 1, settings: DEFAULT_SCORING_SETTINGS, createdById: null, createdAt: now });
  }
  await em.flush();
}

export async function activeHarvesters(em: EntityManager): Promise<HarvesterProfile[]> {
  return em.find(HarvesterProfile, { active: true }, { orderBy: { sortOrder: 'asc', createdAt: 'asc', id: 'asc' } });
}

export async function activeDrones(em: EntityManager): Promise<DroneProfile[]> {
  return em.find(DroneProfile, { active: true }, { orderBy: { sortOrder: 'asc', createdAt: 'asc', id: 'asc' } });
}

/** The default pair whose assessment the span API shows: the first active harvester and drone. */
export async function defaultPair(em: EntityManager): Promise<{ harvester: HarvesterProfile; drone: DroneProfile } | null> {
  const [harvester] = await em.find(HarvesterProfile, { active: true }, { orderBy: { sortOrder: 'asc', createdAt: 'asc', id: 'asc' }, limit: 1 });
  const [drone] = await em.find(DroneProfile, { active: true }, { orderBy: { sortOrder: 'asc', createdAt: 'asc', id: 'asc' }, limit: 1 });
  return harvester && drone ? { harvester, drone } : null;
}

/** The active harvesters and drones by id and name, each in the profiles' order (the first of each is the default pair). */
export interface ActiveProfiles {
  harvesters: { id: string; name: string }[];
  drones: { id: string; name: string }[];
}

/**
 * The active profiles in one bound statement, without entity loads: what a list request needs (the default pair's
 * ids for its joins and views, every active pair's ids and names for the standings), read once per request.
 * Same order as `activeHarvesters` / `activeDrones`.
 */
export async function readActiveProfiles(em: EntityManager): Promise<ActiveProfiles> {
  const rows = await sql.all<{ kind: string; id: string; name: string }>(
    em,
    "select 'h' as kind, id, name, sort_order, created_at from harvester_profiles where active = ? " +
      "union all select 'd' as kind, id, name, sort_order, created_at from drone_profiles where active = ? " +
      'order by kind, sort_order, created_at, id',
    [true, true],
  );
  const pick = (kind: string) => rows.filter((r) => r.kind === kind).map((r) => ({ id: r.id, name: r.name }));
  return { harvesters: pick('h'), drones: pick('d') };
}

/** The default pair's ids from the active profiles (first active harvester and drone), or null. */
export function defaultPairOf(p: ActiveProfiles): { harvesterProfileId: string; droneProfileId: string } | null {
  return p.harvesters.length && p.drones.length ? { harvesterProfileId: p.harvesters[0].id, droneProfileId: p.drones[0].id } : null;
}

export async function currentSettings(em: EntityManager): Promise<{ version: number; settings: ScoringSettings; row: ScoringSettingsVersion | null }> {
  const [row] = await em.find(ScoringSettingsVersion, {}, { orderBy: { version: 'desc' }, limit: 1 });
  if (!row) return { version: 0, settings: DEFAULT_SCORING_SETTINGS, row: null };
  // Fields added to the settings later fall back to their defaults.
  return { version: row.version, settings: { ...DEFAULT_SCORING_SETTINGS, ...(row.settings as ScoringSettings) }, row };
}

export function settingsView(row: ScoringSettingsVersion): ScoringSettingsView {
  return {
    version: row.version,
    settings: { ...DEFAULT_SCORING_SETTINGS, ...(row.settings as ScoringSettings) },
    createdAt: row.createdAt.toISOString(),
    createdById: row.createdById,
  };
}

/** The profile as the pure engineering functions take it. */
export function harvesterModel(p: HarvesterProfile): HarvesterModel {
  return {
    id: p.id,
    name: p.name,
    coreMaterial: p.coreMaterial,
    turns: p.turns,
    coreAreaMm2: p.coreAreaMm2,
    pathLengthMm: p.pathLengthMm,
    relativePermeability: p.relativePermeability,
    airGapMm: p.airGapMm,
    saturationT: p.saturationT,
    windingResistanceOhm: p.windingResistanceOhm,
    converterEfficiency: p.converterEfficiency,
    massKg: p.massKg,
    gripperMinDiameterMm: p.gripperMinDiameterMm,
    gripperMaxDiameterMm: p.gripperMaxDiameterMm,
    contactTempLimitC: p.contactTempLimitC,
    usefulMinHarvestW: p.usefulMinHarvestW,
  };
}

export function harvesterView(p: HarvesterProfile): HarvesterProfileView {
  return {
    ...harvesterModel(p),
    windingResistanceOhm: p.windingResistanceOhm,
    active: p.active,
    sortOrder: p.sortOrder,
    version: p.version,
    createdAt: p.createdAt.toISOString(),
    updatedAt: p.updatedAt.toISOString(),
  };
}

export function droneModel(p: DroneProfile): DroneModel {
  return {
    id: p.id,
    name: p.name,
    batteryWh: p.batteryWh,
    reservePercent: p.reservePercent,
    cruiseSpeedMps: p.cruiseSpeedMps,
    windLimitMps: p.windLimitMps,
    payloadKg: p.payloadKg,
    approachClearanceM: p.approachClearanceM,
    cruisePowerW: p.cruisePowerW,
    perchManoeuvreWh: p.perchManoeuvreWh,
    chargeEfficiency: p.chargeEfficiency,
    chargeToPercent: p.chargeToPercent,
  };
}

export function droneView(p: DroneProfile): DroneProfileView {
  return {
    ...droneModel(p),
    active: p.active,
    sortOrder: p.sortOrder,
    version: p.version,
    createdAt: p.createdAt.toISOString(),
    updatedAt: p.updatedAt.toISOString(),
  };
}

/** A bench test with its arithmetic and its deviation from the profile's model (at the measured load). */
export function benchTestView(t: BenchTest, profile: HarvesterProfile): BenchTestView {
  const { equivalentLineCurrentA, powerW } = benchArithmetic(t);
  const modelPowerW = harvest({ currentA: equivalentLineCurrentA, frequencyHz: t.frequencyHz, loadOhm: t.loadOhm, harvester: profile }).powerW;
  const deviationW = powerW - modelPowerW;
  return {
    id: t.id,
    harvesterProfileId: t.harvesterProfileId,
    fixtureTurns: t.fixtureTurns,
    fixtureCurrentA: t.fixtureCurrentA,
    loadVoltageRmsV: t.loadVoltageRmsV,
    loadOhm: t.loadOhm,
    frequencyHz: t.frequencyHz,
    note: t.note,
    createdAt: t.createdAt.toISOString(),
    equivalentLineCurrentA,
    powerW,
    modelPowerW,
    deviationW,
    deviationPercent: modelPowerW > 0 ? (100 * deviationW) / modelPowerW : null,
  };
}

/** The audited snapshot of a profile (the version history lives in the audit log). */
export function profileSnapshot(p: HarvesterProfile | DroneProfile) {
  const { createdAt: _c, updatedAt: _u, ...rest } = p as HarvesterProfile & DroneProfile;
  return { ...rest };
}
