// The span form's unit conversion (display ⇄ SI), validation through the shared schema, and issue → field mapping.
import { describe, expect, it } from 'vitest';
import type { Span } from '#shared/schemas/inventory.ts';
import {
  emptySpanForm,
  formValuesToCreate,
  formValuesToUpdate,
  issuePathToField,
  issuesToErrors,
  missingForSubmit,
  spanToFormValues,
  validateSpanForm,
  type SpanFormValues,
} from '../../src/features/field/form-values.ts';
import { inputToSi, siToInput } from '../../src/features/field/quantity.ts';

function form(patch: Partial<SpanFormValues> = {}): SpanFormValues {
  return { ...emptySpanForm(new Date(2026, 4, 3)), lineId: 'L1', fromStructureId: 'S1', toStructureId: 'S2', ...patch };
}

function savedSpan(patch: Partial<Span> = {}): Span {
  return {
    id: 'SP1',
    lineId: 'L1',
    lineName: 'Harrow Vale 69 kV North',
    fromStructureId: 'S1',
    toStructureId: 'S2',
    fromStructureLabel: 'HV69-N-001',
    toStructureLabel: 'HV69-N-002',
    status: 'draft',
    version: 3,
    lengthM: 152.4,
    conductor: { codeWord: 'Hawk', size: '477 kcmil', material: 'ACSR', diameterMm: 21.79, resistanceLowOhmPerM: null, tempLowC: null, resistanceHighOhmPerM: null, tempHighC: null, source: 'catalogue' },
    phasePosition: null,
    clearanceM: 9.144,
    lowestClearanceM: 7.62,
    lowestClearanceAlongM: 70.1,
    terrain: 'road',
    loadCurrentA: 310,
    loadCurrentSource: 'line',
    hazards: [{ id: 'H1', kindId: 'road-crossing', severity: 'medium', positionAlongM: 30.48, note: 'county road' }],
    photoIds: [],
    surveyDate: '2026-05-03',
    surveyorId: 'U1',
    returnReason: null,
    suspendReason: null,
    submittedAt: null,
    approvedAt: null,
    approvedById: null,
    assessment: null,
    createdAt: '2026-05-03T10:00:00.000Z',
    updatedAt: '2026-05-03T10:00:00.000Z',
    ...patch,
  };
}

describe('unit conversion in the span form', () => {
  it('when a US surveyor types feet and inches, then the payload carries metres and millimetres', () => {
    const v = form({ clearance: '30', lowestClearance: '25.5', conductorMode: 'custom', conductorSize: '477 kcmil', conductorMaterial: 'ACSR', conductorDiameter: '0.858', loadCurrent: '420' });
    const p = formValuesToCreate(v, 'us');
    // 1 ft = 0.3048 m and 1 in = 25.4 mm exactly (international yard and pound, 1959).
    expect(p.clearanceM).toBeCloseTo(9.144, 9);
    expect(p.lowestClearanceM).toBeCloseTo(7.7724, 9);
    expect(p.conductor).toMatchObject({ codeWord: null, size: '477 kcmil', material: 'ACSR' });
    expect(p.conductor?.diameterMm).toBeCloseTo(21.7932, 9);
    // Current has the same unit (A) in both systems.
    expect(p.loadCurrentA).toBe(420);
  });

  it('when a metric surveyor types values, then they go out unchanged; a comma decimal is read as a point', () => {
    const p = formValuesToCreate(form({ clearance: '9,5', lowestClearance: '8' }), 'metric');
    expect(p.clearanceM).toBe(9.5);
    expect(p.lowestClearanceM).toBe(8);
  });

  it('when a field is left empty, then it is sent as null (not recorded; the load is inherited from the line)', () => {
    const p = formValuesToCreate(form(), 'us');
    expect(p.clearanceM).toBeNull();
    expect(p.loadCurrentA).toBeNull();
    expect(p.conductor).toBeNull();
    expect(p.terrain).toBeNull();
    expect(p.hazards).toEqual([]);
  });

  it('when a saved span opens in US units, then the form shows feet, and saving it unchanged sends the same SI values back', () => {
    const span = savedSpan();
    const v = spanToFormValues(span, 'us');
    expect(v.clearance).toBe('30');
    expect(v.lowestClearance).toBe('25');
    expect(v.hazards[0]).toMatchObject({ id: 'H1', positionAlong: '100', kindId: 'road-crossing' });
    // The effective current came from the line: the span's own field stays empty so it keeps inheriting.
    expect(v.loadCurrent).toBe('');
    expect(v.conductorMode).toBe('catalogue');
    expect(v.conductorCodeWord).toBe('Hawk');
    const back = formValuesToUpdate(v, 'us', span.version);
    expect(back.version).toBe(3);
    expect(back.clearanceM).toBeCloseTo(9.144, 9);
    expect(back.lowestClearanceM).toBeCloseTo(7.62, 9);
    expect(back.hazards?.[0].positionAlongM).toBeCloseTo(30.48, 9);
    expect(back.loadCurrentA).toBeNull();
    expect(back.conductor).toEqual({ codeWord: 'Hawk' });
  });

  it('when the span has its own load estimate, then the form shows it', () => {
    expect(spanToFormValues(savedSpan({ loadCurrentA: 275, loadCurrentSource: 'span' }), 'metric').loadCurrent).toBe('275');
  });

  it('when text is not a number, then it becomes NaN so validation names the field', () => {
    expect(inputToSi('ten', 'length', 'us')).toBeNaN();
    expect(siToInput(null, 'length', 'us')).toBe('');
    expect(siToInput(21.79, 'diameter', 'us')).toBe('0.858');
  });
});

describe('validation with the shared schema', () => {
  it('when the lowest clearance is above the perch-point clearance, then the lowest-clearance field carries the error', () => {
    const issues = validateSpanForm(form({ clearance: '20', lowestClearance: '25' }), 'us', {});
    expect(issues).toContainEqual({ field: 'lowestClearance', message: 'The lowest clearance cannot be above the clearance at the perch point' });
  });

  it('when a number is unreadable or negative, then its own field carries the error', () => {
    const issues = validateSpanForm(form({ clearance: 'abc', loadCurrent: '-5' }), 'metric', {});
    expect(issues.map((i) => i.field)).toEqual(expect.arrayContaining(['clearance', 'loadCurrent']));
  });

  it('when a custom conductor lacks its diameter, then the diameter field asks for it', () => {
    const issues = validateSpanForm(form({ conductorMode: 'custom', conductorSize: '336.4 kcmil' }), 'metric', { version: 2 });
    expect(issues.find((i) => i.field === 'conductorDiameter')?.message).toMatch(/diameter/);
  });

  it('when both structures are the same, then the to-structure field says so', () => {
    const issues = validateSpanForm(form({ toStructureId: 'S1' }), 'metric', {});
    expect(issues).toContainEqual({ field: 'toStructureId', message: 'A span needs two different structures' });
  });

  it('when a draft is valid but incomplete, then saving passes and submitting lists what review needs', () => {
    const v = form({ clearance: '9' });
    expect(validateSpanForm(v, 'metric', {})).toEqual([]);
    expect(missingForSubmit(v, 'metric').map((i) => i.field)).toEqual(['conductorCodeWord', 'terrain']);
  });
});

describe('server issues onto form fields', () => {
  it('maps API paths to the fields that show them', () => {
    expect(issuePathToField('clearanceM')).toBe('clearance');
    expect(issuePathToField('conductor.diameterMm')).toBe('conductorDiameter');
    expect(issuePathToField('hazards.2.positionAlongM')).toBe('hazards.2.positionAlong');
    expect(issuePathToField('hazards.0.kindId')).toBe('hazards.0.kindId');
    expect(issuePathToField('version')).toBeNull();
  });

  it('builds nested errors for react-hook-form, first message per field', () => {
    const errors = issuesToErrors([
      { field: 'hazards.1.kindId', message: 'Choose a hazard kind' },
      { field: 'clearance', message: 'first' },
      { field: 'clearance', message: 'second' },
      { field: null, message: 'form level' },
    ]);
    expect(errors.hazards[1].kindId.message).toBe('Choose a hazard kind');
    expect(Array.isArray(errors.hazards)).toBe(true);
    expect(errors.clearance.message).toBe('first');
    expect(errors.root.message).toBe('form level');
  });
});
