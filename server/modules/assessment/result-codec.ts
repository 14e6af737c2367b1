// The stored form of an assessment result: the same result with what can be rebuilt left out, so a full rescore
// writes fewer bytes. A gate's `detail` is dropped when it is exactly the metric reading of its `parts`
// (detailText), and gates, factors and quantity parts are written as arrays in their fixed key order. Decoding
// gives back the identical object (same keys, same order, same values); a result stored before this form, or any
// piece whose shape is not the expected one, is stored and read as it is.
import { JsonType, type Platform, type TransformContext } from '@mikro-orm/core';
import { detailText, type DetailPart } from '#shared/engineering/assessment.ts';

/** Marks the compact form (a key the result itself never has). */
const FORM = '~c';
const QUANTITY_KEYS = ['quantity', 'si', 'digits'];

type Obj = Record<string, unknown>;
const keysAre = (o: Obj, keys: readonly string[]) => {
  const own = Object.keys(o);
  return own.length === keys.length && own.every((k, i) => k === keys[i]);
};

function encodePart(p: unknown): unknown {
  if (typeof p === 'string' || !p || typeof p !== 'object' || Array.isArray(p)) return p;
  const o = p as Obj;
  if (keysAre(o, QUANTITY_KEYS)) return [o.quantity, o.si, o.digits];
  if (keysAre(o, [...QUANTITY_KEYS, 'bare'])) return [o.quantity, o.si, o.digits, o.bare];
  return p;
}

function decodePart(p: unknown): unknown {
  if (!Array.isArray(p)) return p;
  const o: Obj = { quantity: p[0], si: p[1], digits: p[2] };
  if (p.length === 4) o.bare = p[3];
  return o;
}

function encodeGate(g: unknown): unknown {
  if (!g || typeof g !== 'object' || Array.isArray(g)) return g;
  const o = g as Obj;
  if (!keysAre(o, ['id', 'passed', 'blocking', 'detail', 'parts']) || !Array.isArray(o.parts)) return g;
  const parts = o.parts.map(encodePart);
  if (parts.some((p) => p !== null && typeof p === 'object' && !Array.isArray(p))) return g; // a part of another shape
  // Non-finite figures do not survive JSON as numbers; such a gate keeps its object form.
  if (parts.some((p) => Array.isArray(p) && !Number.isFinite(p[1]))) return g;
  const rebuilt = detailText(o.parts as DetailPart[]) === o.detail;
  return rebuilt ? [o.id, o.passed, o.blocking, parts] : [o.id, o.passed, o.blocking, parts, o.detail];
}

function decodeGate(g: unknown): unknown {
  if (!Array.isArray(g)) return g;
  const parts = (g[3] as unknown[]).map(decodePart);
  return { id: g[0], passed: g[1], blocking: g[2], detail: g.length > 4 ? g[4] : detailText(parts as DetailPart[]), parts };
}

const FACTOR_KEYS = ['id', 'value', 'weight', 'contribution'];

/** The stored form of a result (an object); anything else is returned as it is. */
export function encodeResult(result: unknown): unknown {
  if (!result || typeof result !== 'object' || Array.isArray(result)) return result;
  const r = result as Obj;
  if (FORM in r) return result;
  const out: Obj = { [FORM]: 1 };
  for (const [k, v] of Object.entries(r)) {
    if (k === 'gates' && Array.isArray(v)) out[k] = v.map(encodeGate);
    else if (k === 'factors' && Array.isArray(v)) out[k] = v.map((f) => (f && typeof f === 'object' && keysAre(f as Obj, FACTOR_KEYS) ? FACTOR_KEYS.map((key) => (f as Obj)[key]) : f));
    else out[k] = v;
  }
  return out;
}

/** The result from its stored form (or a result stored before the compact form, as it is). */
export function decodeResult(stored: unknown): unknown {
  if (!stored || typeof stored !== 'object' || Array.isArray(stored) || !(FORM in (stored as Obj))) return stored;
  const out: Obj = {};
  for (const [k, v] of Object.entries(stored as Obj)) {
    if (k === FORM) continue;
    if (k === 'gates' && Array.isArray(v)) out[k] = v.map(decodeGate);
    else if (k === 'factors' && Array.isArray(v)) out[k] = v.map((f) => (Array.isArray(f) ? Object.fromEntries(FACTOR_KEYS.map((key, i) => [key, f[i]])) : f));
    else out[k] = v;
  }
  return out;
}

/** A `result` column value read with hand-written SQL (text on SQLite, parsed on PostgreSQL), decoded. */
export function readStoredResult(value: unknown): unknown {
  return decodeResult(typeof value === 'string' ? JSON.parse(value) : value);
}

/** The `result` column's type: a JSON column holding the compact form; entities see the decoded result. */
export class AssessmentResultType extends JsonType {
  override convertToDatabaseValue(value: unknown, platform: Platform, context?: TransformContext): string | null {
    return super.convertToDatabaseValue(encodeResult(value), platform, context);
  }

  override convertToJSValue(value: string | unknown, platform: Platform, context?: TransformContext): unknown {
    return decodeResult(super.convertToJSValue(value as string, platform, context));
  }
}
