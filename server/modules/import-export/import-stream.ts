// The CSV import as a stream: csv-parse reads the upload from disk and hands over rows in batches; each batch is
// checked against the database and the plan so far, and only the plan (one entry per record) and the report stay
// in memory, never the file or all of its parsed rows. A commit then writes the plan in parts (lines, structures,
// spans), each part one transaction, so the writer is never held for the whole file.
import fs from 'node:fs';
import { once } from 'node:events';
import type { Readable } from 'node:stream';
import { parse } from 'csv-parse';
import type { EntityManager } from '@mikro-orm/core';
import { type ImportReport, type ImportRowReport } from '#shared/schemas/inventory.ts';
import type { User } from '../auth/user.entity.ts';
import { ConductorType } from '../inventory/conductor-type.entity.ts';
import { Hazard } from '../inventory/hazard.entity.ts';
import { HazardKind } from '../inventory/hazard-kind.entity.ts';
import { Line } from '../inventory/line.entity.ts';
import { Span } from '../inventory/span.entity.ts';
import { Structure } from '../inventory/structure.entity.ts';
import { chunks } from '../inventory/inventory.service.ts';
import { csvFieldName, csvHeaderName, csvHeaderProblem, csvRawRow, type RawRow } from './formats.ts';
import { applyPlan, evaluateRow, groupHazards, planNewLines, spanKeyOf, structureKey, type ImportPlan, type Lookups } from './import.service.ts';

/** Rows read, checked and (on commit) written per batch. */
export const IMPORT_BATCH_ROWS = 1000;

export interface CsvBatches {
  /** Batches of rows in file order (the header's problem, if any, is the one row of the one batch). */
  batches: AsyncIterable<RawRow[]>;
  /** The largest number of parsed rows held at once so far (the batch bound, for tests and the bench). */
  readonly maxHeld: number;
}

/**
 * Reads a CSV stream as batches of import rows. Lines holding only separators and blanks are skipped, as the
 * whole-file reader does; a row with too few or too many cells says so (and is refused); a file csv-parse cannot
 * read past a point (a quote left open) ends with a row naming that.
 */
export function csvBatches(input: Readable, batchRows = IMPORT_BATCH_ROWS): CsvBatches {
  const state = { maxHeld: 0 };
  async function* gen(): AsyncGenerator<RawRow[]> {
    const parser = parse({ bom: true, relax_column_count: true, skip_empty_lines: true, relax_quotes: true });
    input.on('error', (err) => parser.destroy(err));
    input.pipe(parser);
    let header: string[] | null = null;
    let fields = new Set<string>();
    let row = 0;
    let batch: RawRow[] = [];
    try {
      for await (const cells of parser as AsyncIterable<string[]>) {
        if (!header) {
          header = cells.map(csvHeaderName);
          fields = new Set(header);
          const problem = csvHeaderProblem(fields);
          if (problem) {
            yield [problem];
            return;
          }
          continue;
        }
        if (cells.every((c) => c.trim() === '')) continue;
        row += 1;
        const record: Record<string, string | undefined> = {};
        for (let i = 0; i < header.length; i++) record[header[i]] = cells[i];
        const errors: string[] = [];
        if (cells.length < header.length) errors.push(`Too few fields: expected ${header.length} fields but parsed ${cells.length}`);
        else if (cells.length > header.length) errors.push(`Too many fields: expected ${header.length} fields but parsed ${cells.length}`);
        batch.push(csvRawRow(record, row, fields, errors));
        state.maxHeld = Math.max(state.maxHeld, batch.length);
        if (batch.length >= batchRows) {
          yield batch;
          batch = [];
        }
      }
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      batch.push({ row: row + 1, subject: `row ${row + 1}`, reasons: [`The file cannot be read from here on: ${message}`], structures: [] });
    } finally {
      input.unpipe(parser);
    }
    if (!header) {
      yield [{ row: 0, subject: 'header', reasons: ['The file is empty'], structures: [] }];
      return;
    }
    if (batch.length) yield batch;
  }
  return {
    batches: gen(),
    get maxHeld() {
      return state.maxHeld;
    },
  };
}

/** Counts the data rows of a CSV file (one quick pass, for the progress bar's total). */
export async function countCsvRows(path: string): Promise<number> {
  const parser = fs.createReadStream(path).pipe(parse({ bom: true, relax_column_count: true, skip_empty_lines: true, relax_quotes: true }));
  let n = -1;
  try {
    for await (const cells of parser as AsyncIterable<string[]>) if (n < 0 || !cells.every((c) => c.trim() === '')) n += 1;
  } catch {
    /* the planning pass names the unreadable row */
  }
  return Math.max(0, n);
}

/**
 * The import plan built batch by batch: records of each line the file names are read from the database the first
 * time a batch names the line. Rows that wait for a record a later row defines (or name a new line not yet
 * described) are checked again at the end, as the whole-file planner does.
 */
export class StreamingPlanner {
  readonly plan: ImportPlan;
  private lookups: Lookups | null = null;
  private knownLines = new Set<string>();
  private final = new Map<number, ImportRowReport>();
  private deferred: RawRow[] = [];
  private order: number[] = [];

  constructor(private readonly em: EntityManager) {
    this.plan = { report: { format: 'csv', committed: false, rows: [], summary: { create: 0, update: 0, unchanged: 0, refuse: 0 } }, lines: new Map(), structures: new Map(), spans: new Map() };
  }

  private async load(rows: RawRow[]) {
    if (!this.lookups) {
      this.lookups = {
        dbLineByName: new Map(),
        dbStructureByKey: new Map(),
        dbSpanByKey: new Map(),
        hazardsBySpan: new Map(),
        kinds: new Map((await this.em.find(HazardKind, {})).map((k) => [k.id, k])),
        catalogue: new Map((await this.em.find(ConductorType, {})).map((c) => [c.codeWord.toLowerCase(), c])),
      };
    }
    const names = [...new Set(rows.map((r) => r.line?.name).filter((n): n is string => !!n && !this.knownLines.has(n)))];
    if (!names.length) return;
    for (const n of names) this.knownLines.add(n);
    const db = this.lookups;
    const lines = await this.em.find(Line, { name: { $in: names } });
    for (const l of lines) db.dbLineByName.set(l.name, l);
    if (!lines.length) return;
    const lineById = new Map(lines.map((l) => [l.id, l]));
    const structures = await this.em.find(Structure, { lineId: { $in: [...lineById.keys()] } });
    const structureById = new Map(structures.map((s) => [s.id, s]));
    for (const s of structures) db.dbStructureByKey.set(structureKey(lineById.get(s.lineId)!.name, s.label), s);
    const spans = await this.em.find(Span, { lineId: { $in: [...lineById.keys()] } });
    for (const sp of spans) {
      const a = structureById.get(sp.fromStructureId)?.label;
      const b = structureById.get(sp.toStructureId)?.label;
      if (a && b) db.dbSpanByKey.set(spanKeyOf(lineById.get(sp.lineId)!.name, a, b), sp);
    }
    for (const c of chunks(spans.map((s) => s.id), 500)) groupHazards(await this.em.find(Hazard, { spanId: { $in: c } }), db.hazardsBySpan);
  }

  /** Checks one batch of rows (in file order). */
  async add(rows: RawRow[]): Promise<void> {
    await this.load(rows);
    const db = this.lookups!;
    const plan = this.plan;
    // New lines first, each from the first row that describes it fully (as the whole-file planner does per file).
    for (const raw of rows) this.order.push(raw.row);
    planNewLines(rows, db.dbLineByName, plan);
    for (const raw of rows) {
      const { report, waiting } = evaluateRow(raw, plan, csvFieldName, db);
      // A new line not yet described may be described by a later row: checked again at the end.
      const lineUnknown = !!raw.line && !plan.lines.has(raw.line.name) && !db.dbLineByName.has(raw.line.name);
      if (waiting || (report.action === 'refuse' && lineUnknown && !raw.reasons.length)) this.deferred.push(raw);
      else this.final.set(raw.row, report);
    }
  }

  /** Checks the rows that waited, and gives the report (rows in file order, with the summary). */
  finish(): ImportReport {
    const plan = this.plan;
    let pending = this.deferred;
    while (pending.length) {
      const again: { raw: RawRow; report: ImportRowReport }[] = [];
      for (const raw of pending) {
        const { report, waiting } = evaluateRow(raw, plan, csvFieldName, this.lookups!);
        if (waiting) again.push({ raw, report });
        else this.final.set(raw.row, report);
      }
      if (again.length === pending.length) {
        for (const d of again) this.final.set(d.raw.row, d.report);
        break;
      }
      pending = again.map((d) => d.raw);
    }
    this.deferred = [];
    plan.report.rows = this.order.map((r) => this.final.get(r)!);
    for (const r of plan.report.rows) plan.report.summary[r.action] += 1;
    return plan.report;
  }
}

/** Plans a CSV stream batch by batch; `onRows` hears how many rows each batch checked. */
export async function planCsvStream(em: EntityManager, input: Readable, opts: { batchRows?: number; onRows?: (n: number) => void } = {}) {
  const reader = csvBatches(input, opts.batchRows);
  const planner = new StreamingPlanner(em);
  for await (const batch of reader.batches) {
    await planner.add(batch);
    opts.onRows?.(batch.length);
  }
  const report = planner.finish();
  return { plan: planner.plan, report, maxHeld: reader.maxHeld };
}

/**
 * Writes a plan with no refused row in parts: the lines, then structures and spans `batchRows` at a time, each
 * part in its own transaction. Answers the spans to rescore. `onRecords` hears how many records each part wrote.
 */
export async function applyPlanInParts(em: EntityManager, user: User, plan: ImportPlan, opts: { batchRows?: number; onRecords?: (n: number) => void; shouldStop?: () => boolean } = {}): Promise<{ spanIds: string[]; parts: number; stopped: boolean }> {
  const size = opts.batchRows ?? IMPORT_BATCH_ROWS;
  const inFileSpanIds = new Set([...plan.spans.values()].flatMap((p) => (p.existing ? [p.existing.id] : [])));
  const touched = new Set<string>();
  let parts = 0;
  const part = async (sub: ImportPlan, n: number) => {
    if (opts.shouldStop?.()) return false;
    const ids = await em.transactional((tem) => applyPlan(tem, user, sub, { inFileSpanIds }));
    for (const id of ids) touched.add(id);
    parts += 1;
    opts.onRecords?.(n);
    return true;
  };
  const none = new Map();
  if (!(await part({ ...plan, structures: none, spans: none }, plan.lines.size))) return { spanIds: [...touched], parts, stopped: true };
  for (const c of chunks([...plan.structures.entries()], size)) {
    if (!(await part({ ...plan, structures: new Map(c), spans: none }, c.length))) return { spanIds: [...touched], parts, stopped: true };
  }
  for (const c of chunks([...plan.spans.entries()], size)) {
    // Only the structures these spans hang on (all written by now), not the whole file's.
    const ends = new Map<string, NonNullable<ReturnType<typeof plan.structures.get>>>();
    for (const [, p] of c) for (const k of [p.fromKey, p.toKey]) ends.set(k, plan.structures.get(k)!);
    if (!(await part({ ...plan, structures: ends, spans: new Map(c) }, c.length))) return { spanIds: [...touched], parts, stopped: true };
  }
  return { spanIds: [...touched], parts, stopped: false };
}

export const readableFile = async (path: string) => {
  const s = fs.createReadStream(path);
  await once(s, 'open');
  return s;
};
