// The field's writes when there is no signal (or earlier ones still wait): kept in the outbox, shown at once.
import type { Line, Span, Structure, StructureKind } from '#shared/schemas/inventory.ts';
import type { UnitSystem } from '#shared/units.ts';
import { geodesicInverse } from '#shared/engineering/geodesic.ts';
import { api, isNetworkError } from '../../lib/api.ts';
import { amend, deviceOnline, enqueue, getOutbox, newClientId, resolveId, type OutboxItem } from '../../lib/outbox.ts';
import { formValuesToCreate, formValuesToUpdate, type SpanFormValues } from './form-values.ts';

const KIND_WORDS: Record<StructureKind, string> = { pole: 'pole', tower: 'tower', 'h-frame': 'H-frame', other: 'structure' };

/** Writes go to the outbox when offline or when earlier writes of this user still wait (so they keep their order). */
export function mustQueue(userId: string) {
  return !deviceOnline() || getOutbox().items.some((i) => i.userId === userId && (i.state === 'waiting' || i.state === 'sending'));
}

export interface StructureBody {
  lineId: string;
  lat: number;
  lon: number;
  kind: StructureKind;
  attachmentHeightM: number | null;
  label?: string;
}

/** Creates a structure: straight to the server when it can, else (or when the answer is lost) into the outbox. */
export async function createStructure(body: StructureBody, line: Line | undefined, userId: string): Promise<{ structure: Structure; queued: boolean }> {
  const key = newClientId();
  if (!mustQueue(userId)) {
    try {
      return { structure: await api.send<Structure>('POST', '/api/structures', body, { 'Idempotency-Key': key }), queued: false };
    } catch (err) {
      if (!isNetworkError(err)) throw err;
    }
  }
  const now = new Date().toISOString();
  const preview: Structure = { id: key, lineId: body.lineId, lat: body.lat, lon: body.lon, kind: body.kind, label: body.label ?? 'new', attachmentHeightM: body.attachmentHeightM ?? 0, version: 0, createdAt: now, updatedAt: now };
  await enqueue({
    id: key,
    kind: 'structure.create',
    label: `New ${KIND_WORDS[body.kind]}${body.label ? ` ${body.label}` : ''} on ${line?.name ?? 'the line'}${body.label ? '' : ' (numbered when it is sent)'}`,
    method: 'POST',
    url: '/api/structures',
    body,
    clientId: key,
    touches: [key],
    preview,
  });
  return { structure: preview, queued: true };
}

/** Structures of a line made offline and not sent yet, for the pickers. */
export function waitingStructures(items: OutboxItem[], lineId: string): Structure[] {
  return items.filter((i) => i.kind === 'structure.create' && (i.preview as Structure).lineId === lineId).map((i) => i.preview as Structure);
}

export const structureShownLabel = (s: Pick<Structure, 'id' | 'label'>) => (s.id.startsWith('local-') && s.label === 'new' ? 'New (waiting)' : s.label);

function previewSpan(values: SpanFormValues, system: UnitSystem, id: string, line: Line | undefined, structures: Structure[], base: Span | null): Span {
  const from = structures.find((s) => s.id === values.fromStructureId);
  const to = structures.find((s) => s.id === values.toStructureId);
  const body = formValuesToCreate(values, system);
  const now = new Date().toISOString();
  const lengthM = from && to ? geodesicInverse({ latDeg: from.lat, lonDeg: from.lon }, { latDeg: to.lat, lonDeg: to.lon }).lengthM : (base?.lengthM ?? 0);
  return {
    ...(base ?? {
      id,
      lineId: values.lineId,
      status: 'draft',
      version: 0,
      photoIds: [],
      surveyorId: null,
      returnReason: null,
      suspendReason: null,
      submittedAt: null,
      approvedAt: null,
      approvedById: null,
      assessment: null,
      createdAt: now,
    }),
    lineName: line?.name ?? base?.lineName ?? '',
    fromStructureId: values.fromStructureId,
    toStructureId: values.toStructureId,
    fromStructureLabel: from ? structureShownLabel(from) : (base?.fromStructureLabel ?? ''),
    toStructureLabel: to ? structureShownLabel(to) : (base?.toStructureLabel ?? ''),
    lengthM,
    conductor: body.conductor ? { codeWord: null, size: null, material: null, diameterMm: null, resistanceLowOhmPerM: null, tempLowC: null, resistanceHighOhmPerM: null, tempHighC: null, source: 'custom', ...body.conductor } as Span['conductor'] : null,
    phasePosition: body.phasePosition ?? null,
    clearanceM: body.clearanceM ?? null,
    lowestClearanceM: body.lowestClearanceM ?? null,
    lowestClearanceAlongM: body.lowestClearanceAlongM ?? null,
    terrain: body.terrain ?? null,
    loadCurrentA: body.loadCurrentA ?? line?.loadTypicalA ?? base?.loadCurrentA ?? 0,
    loadCurrentSource: body.loadCurrentA != null ? 'span' : 'line',
    hazards: (body.hazards ?? []).map((h, n) => ({ id: h.id ?? `${id}-h${n}`, kindId: h.kindId, severity: h.severity, positionAlongM: h.positionAlongM ?? null, note: h.note ?? '' })),
    surveyDate: body.surveyDate ?? null,
    updatedAt: now,
  };
}

const spanWords = (s: Span) => `${s.fromStructureLabel} → ${s.toStructureLabel}${s.lineName ? ` on ${s.lineName}` : ''}`;

export interface QueuedSave {
  span: Span;
  item: OutboxItem;
}

/** Keeps a span's entries in the outbox: a new span (or more entries on one made offline) or changes to a saved one. */
export async function queueSpanSave(opts: {
  values: SpanFormValues;
  base: SpanFormValues;
  system: UnitSystem;
  saved: Span | null;
  version: number | undefined;
  line: Line | undefined;
  structures: Structure[];
  idempotencyKey?: string;
}): Promise<QueuedSave> {
  const { values, system, saved, line, structures } = opts;
  const items = getOutbox().items;
  const localCreate = saved && items.find((i) => i.kind === 'span.create' && i.clientId === saved.id && i.state !== 'sending');
  if (!saved || localCreate) {
    const id = saved?.id ?? opts.idempotencyKey ?? newClientId();
    const span = previewSpan(values, system, id, line, structures, null);
    const body = formValuesToCreate(values, system);
    const change = { body, preview: span, formValues: values, label: `New span ${spanWords(span)}`, touches: [id, values.fromStructureId, values.toStructureId] };
    if (localCreate) {
      await amend(localCreate.id, { ...change, state: localCreate.state === 'failed' ? 'waiting' : localCreate.state, error: null });
      return { span, item: { ...localCreate, ...change } };
    }
    const item = await enqueue({ id, kind: 'span.create', method: 'POST', url: '/api/spans', clientId: id, ...change });
    return { span, item };
  }
  const span = previewSpan(values, system, saved.id, line, structures, saved);
  const waiting = items.find((i) => i.kind === 'span.update' && i.touches.includes(saved.id) && (i.state === 'waiting' || i.state === 'failed'));
  if (waiting) {
    // Later entries replace the waiting ones; the version stays the one the surveyor started from.
    const body = formValuesToUpdate(values, system, (waiting.body as { version: number }).version);
    await amend(waiting.id, { body, preview: span, formValues: values, state: 'waiting', error: null });
    return { span, item: { ...waiting, body } };
  }
  const body = formValuesToUpdate(values, system, opts.version ?? saved.version);
  const item = await enqueue({
    kind: 'span.update',
    label: `Changes to span ${spanWords(saved)}`,
    method: 'PATCH',
    url: `/api/spans/${resolveId(saved.id)}`,
    body,
    touches: [saved.id],
    preview: span,
    formValues: values,
    baseFormValues: opts.base,
  });
  return { span, item };
}

export async function queueSubmit(span: Span) {
  return enqueue({
    kind: 'span.submit',
    label: `Submit span ${spanWords(span)} for review`,
    method: 'POST',
    url: `/api/spans/${span.id}/submit`,
    body: { version: span.version },
    latestVersionOf: span.id,
    touches: [span.id],
  });
}

/** The outbox's own copy of a span: made offline (its create), or saved with changes still waiting. */
export function waitingSpanWrites(items: OutboxItem[], spanId: string) {
  return items.filter((i) => i.touches.includes(spanId) && (i.kind === 'span.create' || i.kind === 'span.update' || i.kind === 'span.submit'));
}
