import { EntitySchema } from '@mikro-orm/core';

/**
 * A harvester product kept by admins. Editing bumps `version`; every version's full record is kept in
 * the audit log (before → after) and each stored assessment records the version it used.
 */
export class HarvesterProfile {
  id!: string;
  name!: string;
  coreMaterial!: 'si-steel' | 'nanocrystalline' | 'ferrite';
  turns!: number;
  coreAreaMm2!: number;
  pathLengthMm!: number;
  relativePermeability!: number;
  /** Total air gap of the closed core (both cut faces), mm. */
  airGapMm!: number;
  saturationT!: number;
  windingResistanceOhm!: number;
  converterEfficiency!: number;
  massKg!: number;
  gripperMinDiameterMm!: number;
  gripperMaxDiameterMm!: number;
  contactTempLimitC!: number;
  usefulMinHarvestW!: number;
  /** Only active profiles are assessed; the first active one (by sortOrder) is the default. */
  active = true;
  sortOrder = 0;
  version = 1;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const HarvesterProfileSchema = new EntitySchema<HarvesterProfile>({
  class: HarvesterProfile,
  tableName: 'harvester_profiles',
  properties: {
    id: { type: 'string', primary: true },
    name: { type: 'string', unique: true },
    coreMaterial: { type: 'string' },
    turns: { type: 'integer' },
    coreAreaMm2: { type: 'double' },
    pathLengthMm: { type: 'double' },
    relativePermeability: { type: 'double' },
    airGapMm: { type: 'double' },
    saturationT: { type: 'double' },
    windingResistanceOhm: { type: 'double' },
    converterEfficiency: { type: 'double' },
    massKg: { type: 'double' },
    gripperMinDiameterMm: { type: 'double' },
    gripperMaxDiameterMm: { type: 'double' },
    contactTempLimitC: { type: 'double' },
    usefulMinHarvestW: { type: 'double' },
    active: { type: 'boolean', default: true },
    sortOrder: { type: 'integer', default: 0 },
    version: { type: 'integer', default: 1 },
    createdAt: { type: 'Date' },
    updatedAt: { type: 'Date' },
  },
});

/** A drone airframe kept by admins; versioned like HarvesterProfile. */
export class DroneProfile {
  id!: string;
  name!: string;
  batteryWh!: number;
  reservePercent!: number;
  cruiseSpeedMps!: number;
  windLimitMps!: number;
  payloadKg!: number;
  /** Clear height below the conductor the airframe needs to approach and perch, m. */
  approachClearanceM!: number;
  /** Electrical power at cruise airspeed, W. */
  cruisePowerW = 300;
  /** Energy to approach, dock on and leave a perch, Wh. */
  perchManoeuvreWh = 3;
  /** Battery charge efficiency, 0..1. */
  chargeEfficiency = 0.95;
  /** Charge-to policy on a perch, percent. */
  chargeToPercent = 100;
  active = true;
  sortOrder = 0;
  version = 1;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const DroneProfileSchema = new EntitySchema<DroneProfile>({
  class: DroneProfile,
  tableName: 'drone_profiles',
  properties: {
    id: { type: 'string', primary: true },
    name: { type: 'string', unique: true },
    batteryWh: { type: 'double' },
    reservePercent: { type: 'double' },
    cruiseSpeedMps: { type: 'double' },
    windLimitMps: { type: 'double' },
    payloadKg: { type: 'double' },
    approachClearanceM: { type: 'double' },
    cruisePowerW: { type: 'double', default: 300 },
    perchManoeuvreWh: { type: 'double', default: 3 },
    chargeEfficiency: { type: 'double', default: 0.95 },
    chargeToPercent: { type: 'double', default: 100 },
    active: { type: 'boolean', default: true },
    sortOrder: { type: 'integer', default: 0 },
    version: { type: 'integer', default: 1 },
    createdAt: { type: 'Date' },
    updatedAt: { type: 'Date' },
  },
});

/** One measurement of a harvester on a multi-turn bench fixture. */
export class BenchTest {
  id!: string;
  harvesterProfileId!: string;
  fixtureTurns!: number;
  fixtureCurrentA!: number;
  loadVoltageRmsV!: number;
  loadOhm!: number;
  frequencyHz!: number;
  note: string | null = null;
  createdById: string | null = null;
  createdAt: Date = new Date();
}

export const BenchTestSchema = new EntitySchema<BenchTest>({
  class: BenchTest,
  tableName: 'bench_tests',
  properties: {
    id: { type: 'string', primary: true },
    harvesterProfileId: { type: 'string', index: true },
    fixtureTurns: { type: 'integer' },
    fixtureCurrentA: { type: 'double' },
    loadVoltageRmsV: { type: 'double' },
    loadOhm: { type: 'double' },
    frequencyHz: { type: 'double' },
    note: { type: 'text', nullable: true },
    createdById: { type: 'string', nullable: true },
    createdAt: { type: 'Date' },
  },
});

/** Scoring weights and limits: one row per version, never edited; the highest version is in force. */
export class ScoringSettingsVersion {
  version!: number;
  settings!: unknown;
  createdById: string | null = null;
  createdAt: Date = new Date();
}

export const ScoringSettingsSchema = new EntitySchema<ScoringSettingsVersion>({
  class: ScoringSettingsVersion,
  tableName: 'scoring_settings',
  properties: {
    version: { type: 'integer', primary: true, autoincrement: false },
    settings: { type: 'json' },
    createdById: { type: 'string', nullable: true },
    createdAt: { type: 'Date' },
  },
});
