// Reading a load-series CSV row by row: each row is checked as it arrives, and the accepted readings are packed by
// local day (12 bytes a reading) so a year of 5-minute readings stays about a megabyte in memory.
import type { LoadSeriesProblem, LoadSeriesProblemKind, LoadSeriesReport } from '#shared/schemas/load-evidence.ts';
import { LOAD_SERIES_ERROR_KINDS } from '#shared/schemas/load-evidence.ts';

/** Above this no overhead conductor carries current (the largest bundles stay well under it; common practice). */
export const IMPLAUSIBLE_CURRENT_A = 5000;
/** A step longer than this many typical intervals is reported as a gap. */
export const GAP_FACTOR = 2.5;
/** The report lists at most this many problems and counts the rest. */
export const MAX_LISTED_PROBLEMS = 1000;
export const READING_BYTES = 12;

export interface Reading {
  epochS: number;
  offsetMin: number;
  currentA: number;
}

const ISO = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(\.\d+)?)?\s*(Z|[+-]\d{2}:?\d{2})?$/;

interface Parsed {
  epochS: number;
  offsetMin: number;
  /** Local date as written. */
  day: string;
  /** Both offsets a local time had in a clock-change repeat, when it was ambiguous. */
  ambiguous?: [number, number];
}

/** Offset (minutes east of UTC) that `timeZone` has at the instant `utcMs`. */
function zoneOffsetMin(timeZone: string, utcMs: number, fmt: Intl.DateTimeFormat): number {
  const parts = Object.fromEntries(fmt.formatToParts(new Date(utcMs)).map((p) => [p.type, p.value]));
  const asUtc = Date.UTC(+parts.year, +parts.month - 1, +parts.day, +parts.hour % 24, +parts.minute, +parts.second);
  return Math.round((asUtc - Math.floor(utcMs / 1000) * 1000) / 60_000);
}

export class LoadSeriesReader {
  readonly problems: LoadSeriesProblem[] = [];
  moreProblems = 0;
  rows = 0;
  accepted = 0;
  errors = 0;
  private prevEpoch: number | null = null;
  private prevRow = 0;
  private readonly seen = new Set<number>();
  private readonly steps: { row: number; step: number }[] = [];
  private readonly days = new Map<string, Reading[]>();
  private headerDone = false;
  private tsCol = 0;
  private aCol = 1;
  private readonly fmt: Intl.DateTimeFormat | null;
  private first: Parsed | null = null;
  private last: Parsed | null = null;

  constructor(private readonly timeZone?: string) {
    this.fmt = timeZone
      ? new Intl.DateTimeFormat('en-US', { timeZone, hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit' })
      : null;
  }

  private problem(row: number, kind: LoadSeriesProblemKind, message: string) {
    if ((LOAD_SERIES_ERROR_KINDS as readonly string[]).includes(kind)) this.errors++;
    if (this.problems.length < MAX_LISTED_PROBLEMS) this.problems.push({ row, kind, message });
    else this.moreProblems++;
  }

  get hasHeader() {
    return this.headerDone;
  }

  /** The header row names the columns; `timestamp` and `current_a` are required, in any order. */
  header(cells: string[]): string | null {
    const names = cells.map((c) => c.trim().toLowerCase());
    this.tsCol = names.indexOf('timestamp');
    this.aCol = names.indexOf('current_a');
    this.headerDone = true;
    if (this.tsCol < 0 || this.aCol < 0) return 'The first row must name the columns "timestamp" and "current_a"';
    return null;
  }

  private parseTime(text: string, row: number): Parsed | null {
    const m = ISO.exec(text.trim());
    if (!m) return null;
    const [, y, mo, d, h, mi, s = '0', frac = '', off] = m;
    const localMs = Date.UTC(+y, +mo - 1, +d, +h, +mi, +s) + (frac ? Math.round(parseFloat(frac) * 1000) : 0);
    const check = new Date(localMs);
    if (check.getUTCFullYear() !== +y || check.getUTCMonth() !== +mo - 1 || check.getUTCDate() !== +d || +h > 23 || +mi > 59 || +s > 59) return null;
    const day = `${y}-${mo}-${d}`;
    if (off) {
      const offsetMin = off === 'Z' ? 0 : (off[0] === '-' ? -1 : 1) * (parseInt(off.slice(1, 3), 10) * 60 + parseInt(off.slice(-2), 10));
      return { epochS: Math.floor((localMs - offsetMin * 60_000) / 1000), offsetMin, day };
    }
    if (!this.fmt) {
      this.problem(row, 'unparseable', `timestamp "${text}" has no UTC offset: add one (e.g. +12:00) or state the time zone of the file`);
      return { epochS: NaN, offsetMin: 0, day };
    }
    // Local time in a stated zone: the offsets the zone has around that time, kept when they map back to it.
    const candidates = new Set<number>();
    for (const probe of [-36, -12, 0, 12, 36]) candidates.add(zoneOffsetMin(this.timeZone!, localMs + probe * 3_600_000, this.fmt));
    const valid = [...candidates].filter((o) => zoneOffsetMin(this.timeZone!, localMs - o * 60_000, this.fmt!) === o).sort((a, b) => b - a);
    if (valid.length === 0) {
      this.problem(row, 'unparseable', `local time ${text} does not exist in ${this.timeZone} (the clocks went forward over it)`);
      return { epochS: NaN, offsetMin: 0, day };
    }
    const offsetMin = valid[0];
    const p: Parsed = { epochS: Math.floor((localMs - offsetMin * 60_000) / 1000), offsetMin, day };
    if (valid.length > 1) p.ambiguous = [valid[0], valid[1]];
    return p;
  }

  /** One data row (after the header). */
  row(cells: string[]) {
    if (!this.headerDone) throw new Error('header first');
    const row = ++this.rows;
    if (cells.length === 1 && cells[0].trim() === '') {
      this.rows--;
      return;
    }
    const tsText = cells[this.tsCol] ?? '';
    const aText = (cells[this.aCol] ?? '').trim();
    const before = this.errors;
    let t = this.parseTime(tsText, row);
    if (t === null) {
      this.problem(row, 'unparseable', `timestamp "${tsText}" is not an ISO 8601 date and time`);
      return;
    }
    if (this.errors > before) return;
    const currentA = aText === '' ? NaN : Number(aText);
    if (!Number.isFinite(currentA)) {
      this.problem(row, 'unparseable', `current_a "${aText}" is not a number`);
      return;
    }
    if (currentA < 0) return this.problem(row, 'negative', `current_a ${currentA} A is negative`);
    if (currentA > IMPLAUSIBLE_CURRENT_A) return this.problem(row, 'implausible', `current_a ${currentA} A is above ${IMPLAUSIBLE_CURRENT_A} A, more than any overhead line carries`);
    if (t.ambiguous && this.prevEpoch !== null && t.epochS <= this.prevEpoch) {
      // The repeated hour after the clocks went back: the later offset keeps the readings in time order.
      const later: Parsed = { ...t, offsetMin: t.ambiguous[1], epochS: t.epochS + (t.ambiguous[0] - t.ambiguous[1]) * 60 };
      if (later.epochS > this.prevEpoch) {
        this.problem(row, 'dst-repeat', `local time ${tsText.trim()} occurs twice in ${this.timeZone}; read as the second one (UTC offset ${fmtOffset(later.offsetMin)})`);
        t = later;
      }
    }
    if (this.seen.has(t.epochS)) return this.problem(row, 'duplicate', `the time ${tsText.trim()} appears on an earlier row`);
    if (this.prevEpoch !== null && t.epochS < this.prevEpoch) return this.problem(row, 'out-of-order', `the time ${tsText.trim()} is earlier than row ${this.prevRow}`);
    if (this.prevEpoch !== null) this.steps.push({ row, step: t.epochS - this.prevEpoch });
    this.seen.add(t.epochS);
    this.prevEpoch = t.epochS;
    this.prevRow = row;
    this.first ??= t;
    this.last = t;
    this.accepted++;
    let list = this.days.get(t.day);
    if (!list) this.days.set(t.day, (list = []));
    list.push({ epochS: t.epochS, offsetMin: t.offsetMin, currentA });
  }

  /** Gaps need the typical interval, so they are found once every row is in. */
  finish(): { report: Omit<LoadSeriesReport, 'committed'>; days: Map<string, Buffer> } {
    const sortedSteps = this.steps.map((s) => s.step).sort((a, b) => a - b);
    const intervalS = sortedSteps.length ? sortedSteps[Math.floor(sortedSteps.length / 2)] : null;
    if (intervalS) {
      for (const s of this.steps) {
        if (s.step > GAP_FACTOR * intervalS) this.problem(s.row, 'gap', `${fmtDuration(s.step)} since the row before (readings are every ${fmtDuration(intervalS)})`);
      }
      this.problems.sort((a, b) => a.row - b.row);
    }
    const days = new Map<string, Buffer>();
    for (const [day, list] of this.days) days.set(day, packReadings(list));
    return {
      report: {
        rows: this.rows,
        accepted: this.accepted,
        problems: this.problems,
        moreProblems: this.moreProblems,
        firstAt: this.first ? isoAt(this.first.epochS, this.first.offsetMin) : null,
        lastAt: this.last ? isoAt(this.last.epochS, this.last.offsetMin) : null,
        intervalS,
        days: this.days.size,
      },
      days,
    };
  }
}

export function packReadings(list: Reading[]): Buffer {
  const buf = Buffer.alloc(list.length * READING_BYTES);
  list.forEach((r, i) => {
    buf.writeUInt32LE(r.epochS, i * READING_BYTES);
    buf.writeInt16LE(r.offsetMin, i * READING_BYTES + 4);
    buf.writeFloatLE(r.currentA, i * READING_BYTES + 8);
  });
  return buf;
}

export function unpackReadings(buf: Buffer): Reading[] {
  const out: Reading[] = [];
  for (let o = 0; o + READING_BYTES <= buf.length; o += READING_BYTES) {
    out.push({ epochS: buf.readUInt32LE(o), offsetMin: buf.readInt16LE(o + 4), currentA: buf.readFloatLE(o + 8) });
  }
  return out;
}

/** Hour of day as written (in the reading's own offset). */
export function localHour(r: Reading): number {
  return Math.floor((((r.epochS + r.offsetMin * 60) % 86_400) + 86_400) % 86_400 / 3600);
}

export function fmtOffset(min: number): string {
  const sign = min < 0 ? '-' : '+';
  const a = Math.abs(min);
  return `${sign}${String(Math.floor(a / 60)).padStart(2, '0')}:${String(a % 60).padStart(2, '0')}`;
}

export function isoAt(epochS: number, offsetMin: number): string {
  return new Date((epochS + offsetMin * 60) * 1000).toISOString().slice(0, 19) + fmtOffset(offsetMin);
}

function fmtDuration(s: number): string {
  if (s % 86_400 === 0) return `${s / 86_400} d`;
  if (s >= 3600) return `${Math.floor(s / 3600)} h${s % 3600 ? ` ${String(Math.round((s % 3600) / 60)).padStart(2, '0')} min` : ''}`;
  if (s >= 60) return `${Math.round(s / 60)} min`;
  return `${s} s`;
}
