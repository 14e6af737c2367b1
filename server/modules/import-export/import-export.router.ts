// Import (dry run, then an all-or-nothing commit) and export of the line inventory.
import express, { type ErrorRequestHandler, type RequestHandler } from 'express';
import multer from 'multer';
import { z } from 'zod';
import Papa from 'papaparse';
import { IMPORT_FORMATS, INVENTORY_CSV_COLUMNS, spanListQuerySchema, type ImportFormat } from '#shared/schemas/inventory.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { AppError, errorBody, parse } from '../../http/errors.ts';
import { Line } from '../inventory/line.entity.ts';
import { Span } from '../inventory/span.entity.ts';
import { Structure } from '../inventory/structure.entity.ts';
import { chunks, lineView, spanViews, structureView } from '../inventory/inventory.service.ts';
import { matchingSpanIds } from '../inventory/spans.query.ts';
import { spansToCsv, spansToGeoJson, spansToKml } from './formats.ts';
import { commitImport, detectFormat, dryRun, ImportRefusedError } from './import.service.ts';
import { newImportFile, queueImport, registerImportWork, type ImportMode } from './import-jobs.ts';
import { jobRunnerFor } from '../jobs/job-runner.ts';
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { sql } from '../../sql/query.ts';

/** Largest import file accepted, bytes. */
export const MAX_IMPORT_BYTES = 20 * 1024 * 1024;

const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_IMPORT_BYTES, files: 1, fields: 5 } }).single('file');

const receive: RequestHandler = (req, res, next) => {
  if (!req.is('multipart/form-data')) return next();
  upload(req, res, (err: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') return next(new AppError(413, 'payload_too_large', `file: larger than ${MAX_IMPORT_BYTES / 1024 / 1024} MB`, [{ path: 'file', message: 'too large' }]));
    if (err instanceof multer.MulterError) return next(AppError.field(err.field ?? 'file', `the upload is not valid: send the file as "file" (${err.message})`));
    next(AppError.badRequest('The upload could not be read (broken multipart body)'));
  });
};

const formatSchema = z.object({ format: z.enum(IMPORT_FORMATS, { error: 'The format must be csv or geojson' }).optional() });
const jsonBodySchema = formatSchema.extend({ text: z.string({ error: 'Give the file content as text' }).min(1, 'The file is empty') });

/** The import file from multipart (`file`, optional `format`), a JSON body `{format?, text}`, or a text/csv or GeoJSON body. */
function importSource(req: express.Request): { format: ImportFormat; text: string } {
  if (req.file) {
    const { format } = parse(formatSchema, req.body);
    const text = req.file.buffer.toString('utf8');
    if (!text.trim()) throw AppError.field('file', 'The file is empty');
    if (text.includes('\u0000')) throw new AppError(415, 'unsupported_media_type', 'file: this is not a text file (CSV or GeoJSON expected)', [{ path: 'file', message: 'not a text file' }]);
    return { format: detectFormat(text, req.file.originalname, format), text };
  }
  if (typeof req.body === 'string') {
    if (!req.body.trim()) throw AppError.field('file', 'The file is empty');
    const q = parse(formatSchema, req.query);
    return { format: detectFormat(req.body, undefined, q.format ?? (req.is('text/csv') ? 'csv' : req.is('application/geo+json') ? 'geojson' : undefined)), text: req.body };
  }
  if (req.is('multipart/form-data')) throw AppError.field('file', 'Attach the CSV or GeoJSON file as "file"');
  const body = parse(jsonBodySchema, req.body);
  return { format: detectFormat(body.text, undefined, body.format), text: body.text };
}

const textBody = express.text({ type: ['text/csv', 'text/plain', 'application/geo+json'], limit: MAX_IMPORT_BYTES });

export const importErrorHandler: ErrorRequestHandler = (err, _req, res, next) => {
  if (err instanceof ImportRefusedError) {
    res.status(400).json({ error: { ...errorBody(err.code, err.message, err.issues).error, report: err.report } });
    return;
  }
  next(err);
};

/** A finished job's result (the report), also when it failed with a refused report. */
async function resultOf(ctx: AppContext, id: string) {
  const row = await sql.get<{ result: string | null }>(ctx.orm.em.fork(), 'select result from jobs where id = ?', [id]);
  return row?.result ? JSON.parse(row.result) : null;
}

const exportQuerySchema = spanListQuerySchema.omit({ page: true, pageSize: true });

/** Largest file an import job takes, bytes: the job reads it as a stream, so this bounds the disk, not memory. */
export const MAX_STREAMED_IMPORT_BYTES = 512 * 1024 * 1024;

const modeSchema = z.object({ mode: z.enum(['dry-run', 'commit'], { error: 'The mode must be dry-run or commit' }), format: z.enum(IMPORT_FORMATS, { error: 'The format must be csv or geojson' }).optional() });

/** The upload of an import job, written straight to disk (multipart `file`, or a text/csv or GeoJSON body). */
function receiveToDisk(ctx: AppContext): RequestHandler {
  const diskUpload = multer({
    storage: multer.diskStorage({ destination: (_req, _file, cb) => cb(null, path.dirname(newImportFile(ctx))), filename: (_req, _file, cb) => cb(null, `${randomUUID()}.upload`) }),
    limits: { fileSize: MAX_STREAMED_IMPORT_BYTES, files: 1, fields: 5 },
  }).single('file');
  return async (req, res, next) => {
    if (req.is('multipart/form-data')) {
      diskUpload(req, res, (err: unknown) => {
        if (!err) return next();
        if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') return next(new AppError(413, 'payload_too_large', `file: larger than ${MAX_STREAMED_IMPORT_BYTES / 1024 / 1024} MB`, [{ path: 'file', message: 'too large' }]));
        if (err instanceof multer.MulterError) return next(AppError.field(err.field ?? 'file', `the upload is not valid: send the file as "file" (${err.message})`));
        next(AppError.badRequest('The upload could not be read (broken multipart body)'));
      });
      return;
    }
    if (req.is(['text/csv', 'text/plain', 'application/geo+json'])) {
      // A plain body streams to the same kind of file.
      const file = newImportFile(ctx);
      let size = 0;
      const out = fs.createWriteStream(file);
      try {
        for await (const chunk of req as AsyncIterable<Buffer>) {
          size += chunk.length;
          if (size > MAX_STREAMED_IMPORT_BYTES) throw new AppError(413, 'payload_too_large', `file: larger than ${MAX_STREAMED_IMPORT_BYTES / 1024 / 1024} MB`, [{ path: 'file', message: 'too large' }]);
          if (!out.write(chunk)) await new Promise<void>((r) => out.once('drain', () => r()));
        }
        await new Promise<void>((resolve, reject) => out.end((err?: Error | null) => (err ? reject(err) : resolve())));
      } catch (err) {
        out.destroy();
        await fs.promises.rm(file, { force: true });
        return next(err);
      }
      req.file = { path: file, originalname: '', size } as Express.Multer.File;
      return next();
    }
    next(AppError.field('file', 'Attach the CSV or GeoJSON file as "file"'));
  };
}

/** Checks the stored upload's start: not empty, text; the format from the name, the choice or the content. */
async function checkStoredUpload(file: Express.Multer.File, explicit?: ImportFormat): Promise<ImportFormat> {
  const fd = await fs.promises.open(file.path, 'r');
  try {
    const head = Buffer.alloc(64 * 1024);
    const { bytesRead } = await fd.read(head, 0, head.length, 0);
    const text = head.subarray(0, bytesRead).toString('utf8');
    if (!text.replace(/^\uFEFF/, '').trim()) throw AppError.field('file', 'The file is empty');
    if (text.includes('\u0000')) throw new AppError(415, 'unsupported_media_type', 'file: this is not a text file (CSV or GeoJSON expected)', [{ path: 'file', message: 'not a text file' }]);
    return detectFormat(text, file.originalname || undefined, explicit);
  } finally {
    await fd.close();
  }
}

export function importExportRouter(ctx: AppContext) {
  const root = express.Router();
  registerImportWork(ctx);

  const imp = featureRouter('/api/import');
  imp.post('/dry-run', ['surveyor', 'admin'], textBody, receive, async (req, res) => {
    const { format, text } = importSource(req);
    res.json(await dryRun(req.em, format, text));
  });
  imp.post('/commit', ['surveyor', 'admin'], textBody, receive, async (req, res) => {
    const { format, text } = importSource(req);
    res.json(await commitImport(req.em, currentUser(req), format, text));
  });

  // An import as a job: the upload is stored, read as a stream in batches; 202 with the job, whose progress counts
  // rows and whose result is the report (GET /api/import/jobs/:id).
  imp.post('/jobs', ['surveyor', 'admin'], receiveToDisk(ctx), async (req, res) => {
    const file = req.file;
    try {
      const q = parse(modeSchema, { ...req.query, ...(typeof req.body === 'object' && req.body ? req.body : {}) });
      if (!file) throw AppError.field('file', 'Attach the CSV or GeoJSON file as "file"');
      const format = await checkStoredUpload(file, q.format);
      const job = await queueImport(ctx, { file: file.path, format, mode: q.mode as ImportMode, userId: currentUser(req).id, filename: file.originalname || null });
      res.status(202).json({ job });
    } catch (err) {
      if (file) await fs.promises.rm(file.path, { force: true });
      throw err;
    }
  });
  imp.get('/jobs/:id', ['surveyor', 'admin'], async (req, res) => {
    const queue = jobRunnerFor(ctx);
    const job = await queue.get(String(req.params.id));
    if (!job || !job.kind.startsWith('import-')) throw AppError.notFound('Import job');
    res.json({ job, report: job.state === 'done' || job.state === 'failed' ? await resultOf(ctx, job.id) : null });
  });

  // A starting file: the columns with one example span (invented), for people building an import by hand.
  imp.get('/template.csv', 'signed-in', (_req, res) => {
    const example: Record<(typeof INVENTORY_CSV_COLUMNS)[number], string> = {
      line_name: 'Example Feeder 9',
      line_owner: 'Harrow Vale Power Cooperative',
      voltage_kv: '12.47',
      frequency_hz: '60',
      phases: '3',
      load_typical_a: '150',
      load_min_a: '50',
      load_peak_a: '240',
      load_profile_a: '',
      from_label: 'EX9-001',
      from_lat: '-30.21',
      from_lon: '-130.31',
      from_kind: 'pole',
      from_attachment_height_m: '11.5',
      to_label: 'EX9-002',
      to_lat: '-30.2105',
      to_lon: '-130.309',
      to_kind: 'pole',
      to_attachment_height_m: '11.5',
      conductor_code_word: 'Penguin',
      conductor_size: '',
      conductor_material: '',
      conductor_diameter_mm: '',
      conductor_resistance_low_ohm_per_m: '',
      conductor_temp_low_c: '',
      conductor_resistance_high_ohm_per_m: '',
      conductor_temp_high_c: '',
      phase_position: 'B (centre)',
      clearance_m: '7.2',
      lowest_clearance_m: '6.9',
      lowest_clearance_along_m: '48',
      terrain: 'open-field',
      load_current_a: '',
      survey_date: '2026-11-02',
      hazards: JSON.stringify([{ kindId: 'road-crossing', severity: 'medium', positionAlongM: 30, note: 'Farm road' }]),
    };
    res
      .type('text/csv; charset=utf-8')
      .attachment('roostline-inventory-template.csv')
      .send(Papa.unparse({ fields: [...INVENTORY_CSV_COLUMNS], data: [INVENTORY_CSV_COLUMNS.map((c) => example[c])] }, { newline: '\r\n' }) + '\r\n');
  });

  const exp = featureRouter('/api/spans');
  exp.get('/export.:format', 'signed-in', async (req, res) => {
    const format = String(req.params.format);
    if (!['geojson', 'csv', 'kml'].includes(format)) throw AppError.notFound('Export format');
    const q = parse(exportQuerySchema, req.query);
    const ids = await matchingSpanIds(req.em, {
      status: q.status,
      lineId: q.lineId || undefined,
      surveyorId: q.mine ? currentUser(req).id : q.surveyorId || undefined,
      q: q.q || undefined,
      minHarvestW: q.minHarvestW,
      minScore: q.minScore,
      sort: q.sort,
    });
    const spans: Span[] = [];
    for (const c of chunks(ids, 500)) spans.push(...(await req.em.find(Span, { id: { $in: c } })));
    const order = new Map(ids.map((id, i) => [id, i]));
    spans.sort((a, b) => order.get(a.id)! - order.get(b.id)!);
    const views = await spanViews(req.em, spans);
    const lines = new Map((await req.em.find(Line, { id: { $in: [...new Set(spans.map((s) => s.lineId))] } })).map((l) => [l.id, lineView(l)]));
    const structureIds = [...new Set(spans.flatMap((s) => [s.fromStructureId, s.toStructureId]))];
    const structures = new Map<string, ReturnType<typeof structureView>>();
    for (const c of chunks(structureIds, 500)) for (const s of await req.em.find(Structure, { id: { $in: c } })) structures.set(s.id, structureView(s));
    const stamp = new Date().toISOString().slice(0, 10);
    const base = `roostline-spans-${q.status?.join('-') ?? 'all'}-${stamp}`;
    if (format === 'geojson') {
      res.type('application/geo+json').attachment(`${base}.geojson`).send(JSON.stringify(spansToGeoJson(views, lines, structures)));
    } else if (format === 'csv') {
      res.type('text/csv; charset=utf-8').attachment(`${base}.csv`).send(spansToCsv(views, lines, structures));
    } else {
      res.type('application/vnd.google-earth.kml+xml').attachment(`${base}.kml`).send(spansToKml(views, lines, structures, `Roostline spans (${q.status?.join(', ') ?? 'all statuses'}), ${stamp}`));
    }
  });

  root.use('/import', imp.router);
  root.use('/spans', exp.router);
  root.use(importErrorHandler);
  return root;
}
