// Audit entries → "field: before → after" lines for the span's history.
export interface FieldChange {
  field: string;
  before: string;
  after: string;
}

function show(v: unknown): string {
  if (v === null || v === undefined || v === '') return '—';
  if (typeof v === 'number') return String(Math.round(v * 1000) / 1000);
  if (typeof v === 'string' || typeof v === 'boolean') return String(v);
  if (Array.isArray(v)) return v.length ? `${v.length} item${v.length === 1 ? '' : 's'}` : 'none';
  const s = JSON.stringify(v);
  return s.length > 80 ? `${s.slice(0, 77)}…` : s;
}

const IGNORED = new Set(['version', 'updatedAt', 'createdAt']);

/** The top-level fields an entry changed (version and timestamps left out; they change on every write). */
export function changedFields(before: unknown, after: unknown): FieldChange[] {
  const b = before && typeof before === 'object' ? (before as Record<string, unknown>) : {};
  const a = after && typeof after === 'object' ? (after as Record<string, unknown>) : {};
  const keys = [...new Set([...Object.keys(b), ...Object.keys(a)])].filter((k) => !IGNORED.has(k));
  return keys.filter((k) => JSON.stringify(b[k]) !== JSON.stringify(a[k])).map((k) => ({ field: k, before: show(b[k]), after: show(a[k]) }));
}
