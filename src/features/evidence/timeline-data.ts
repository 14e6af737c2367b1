// Planned against flown: a mission's legs and dwells beside the flight record's, in minutes from the planned
// departure. Pure, so it is tested without a browser.

export interface PlannedMission {
  /** ISO 8601 with offset. */
  departAt: string;
  legs: { durationS: number; toSpanId?: string | null }[];
  perches: { spanId: string; dwellS: number }[];
}

export interface FlownRecord {
  startedAt: string;
  endedAt: string;
  events: { kind: 'perch' | 'hover'; spanId: string | null; startAt: string; endAt: string; durationS: number }[];
}

export interface TimelineSegment {
  kind: 'flight' | 'dwell';
  /** Minutes from the planned departure. */
  startMin: number;
  endMin: number;
  /** The span of a dwell. */
  spanId?: string;
}

export interface TimelineRow {
  row: 'Planned' | 'Flown';
  segments: TimelineSegment[];
}

export interface PerchComparison {
  spanId: string;
  plannedDwellS: number | null;
  flownDwellS: number | null;
  /** Flown arrival less planned arrival, min (late > 0). */
  arrivalDeltaMin: number | null;
}

const min = (ms: number) => ms / 60_000;

export function plannedSegments(plan: PlannedMission): TimelineSegment[] {
  const out: TimelineSegment[] = [];
  let t = 0;
  let next = 0;
  for (const leg of plan.legs) {
    out.push({ kind: 'flight', startMin: t, endMin: t + leg.durationS / 60 });
    t += leg.durationS / 60;
    // A leg that lands on a perch is followed by its dwell (perches pair with legs by toSpanId, in order).
    if (leg.toSpanId && plan.perches[next]) {
      const p = plan.perches[next++];
      out.push({ kind: 'dwell', startMin: t, endMin: t + p.dwellS / 60, spanId: p.spanId });
      t += p.dwellS / 60;
    }
  }
  return out;
}

export function flownSegments(record: FlownRecord, plannedDepartMs: number): TimelineSegment[] {
  const at = (iso: string) => min(Date.parse(iso) - plannedDepartMs);
  const perches = record.events.filter((e) => e.kind === 'perch').sort((a, b) => Date.parse(a.startAt) - Date.parse(b.startAt));
  const out: TimelineSegment[] = [];
  let t = at(record.startedAt);
  for (const p of perches) {
    const s = at(p.startAt);
    if (s > t) out.push({ kind: 'flight', startMin: t, endMin: s });
    out.push({ kind: 'dwell', startMin: s, endMin: at(p.endAt), spanId: p.spanId ?? undefined });
    t = at(p.endAt);
  }
  const end = at(record.endedAt);
  if (end > t) out.push({ kind: 'flight', startMin: t, endMin: end });
  return out;
}

/** Both rows, and each planned perch beside the flown one on the same span (in order), for the table. */
export function plannedVsFlown(plan: PlannedMission, record: FlownRecord) {
  const departMs = Date.parse(plan.departAt);
  const planned = plannedSegments(plan);
  const flown = flownSegments(record, departMs);
  const plannedDwells = planned.filter((s) => s.kind === 'dwell');
  const flownDwells = flown.filter((s) => s.kind === 'dwell');
  const used = new Set<number>();
  const perches: PerchComparison[] = plannedDwells.map((p) => {
    const i = flownDwells.findIndex((f, k) => !used.has(k) && f.spanId === p.spanId);
    if (i >= 0) used.add(i);
    const f = i >= 0 ? flownDwells[i] : null;
    return {
      spanId: p.spanId!,
      plannedDwellS: (p.endMin - p.startMin) * 60,
      flownDwellS: f ? (f.endMin - f.startMin) * 60 : null,
      arrivalDeltaMin: f ? f.startMin - p.startMin : null,
    };
  });
  // Perches flown on spans the plan did not name.
  flownDwells.forEach((f, k) => {
    if (!used.has(k)) perches.push({ spanId: f.spanId ?? '', plannedDwellS: null, flownDwellS: (f.endMin - f.startMin) * 60, arrivalDeltaMin: null });
  });
  const plannedEnd = planned.length ? planned[planned.length - 1].endMin : 0;
  const flownStart = flown.length ? flown[0].startMin : 0;
  const flownEnd = flown.length ? flown[flown.length - 1].endMin : 0;
  return {
    rows: [{ row: 'Planned', segments: planned }, { row: 'Flown', segments: flown }] as TimelineRow[],
    perches,
    plannedDurationMin: plannedEnd,
    flownDurationMin: flownEnd - flownStart,
    startDeltaMin: flownStart,
  };
}

/**
 * Chart rows for recharts' stacked bars: each row's segments are end to end, so a row is a transparent lead (from
 * the axis start `fromMin` to its first segment) and then one key per segment (`s0`, `s1`, …) holding its length.
 */
export function timelineChartData(rows: TimelineRow[], fromMin: number) {
  const n = Math.max(0, ...rows.map((r) => r.segments.length));
  const keys = Array.from({ length: n }, (_, i) => `s${i}`);
  const data = rows.map((r) => {
    const d: Record<string, number | string> = { row: r.row, lead: round2((r.segments[0]?.startMin ?? fromMin) - fromMin) };
    r.segments.forEach((s, i) => (d[`s${i}`] = round2(s.endMin - s.startMin)));
    return d;
  });
  return { keys, data };
}

const round2 = (v: number) => Math.round(v * 100) / 100;
