// Load evidence: a line's metered currents (import, monthly profile, line page) and the implied-current calculator.
import { Transform, type TransformCallback } from 'node:stream';
import express, { type ErrorRequestHandler, type RequestHandler } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { impliedCurrentSchema, loadProfileQuerySchema, loadSeriesQuerySchema } from '#shared/schemas/load-evidence.ts';
import { impliedCurrentA, PowerAboveCeilingError } from '#shared/engineering/implied-current.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { AppError, errorBody, parse } from '../../http/errors.ts';
import { getFlightRecord, listFlightRecords, perchEvidence, spanEvidence, uploadFlightRecord } from './flight-record.service.ts';
import { flightTemplateCsv } from './flight-template.ts';
import { updateLine } from '../inventory/lines.service.ts';
import { currentMonth, estimateFromEvidence, importLoadSeries, seriesSummaries, loadEvidence, loadProfile, LoadSeriesRefusedError } from './load-series.service.ts';

/** Largest load-series file accepted, bytes (several years of 5-minute readings). */
export const MAX_LOAD_SERIES_BYTES = 200 * 1024 * 1024;

class ByteLimit extends Transform {
  private seen = 0;
  constructor(private readonly limit: number) {
    super();
  }
  override _transform(chunk: Buffer, _enc: BufferEncoding, cb: TransformCallback) {
    this.seen += chunk.length;
    if (this.seen > this.limit) return cb(new AppError(413, 'payload_too_large', `body: larger than ${this.limit / 1024 / 1024} MB`, [{ path: 'body', message: 'too large' }]));
    cb(null, chunk);
  }
}

export const evidenceErrorHandler: ErrorRequestHandler = (err, _req, res, next) => {
  if (err instanceof LoadSeriesRefusedError) {
    const { rows, accepted, problems, moreProblems } = err.report;
    res.status(400).json({ ...errorBody(err.code, err.message), rows, accepted, problems, moreProblems });
    return;
  }
  next(err);
};

const MAX_FLIGHT_BYTES = 50 * 1024 * 1024;
const flightUpload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_FLIGHT_BYTES, files: 1, fields: 5 } }).single('file');
const receiveFlight: RequestHandler = (req, res, next) =>
  flightUpload(req, res, (err: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') return next(new AppError(413, 'payload_too_large', `file: larger than ${MAX_FLIGHT_BYTES / 1024 / 1024} MB`, [{ path: 'file', message: 'too large' }]));
    next(AppError.field('file', 'send the flight record as the multipart field "file"'));
  });
const flightFieldsSchema = z.object({
  spanId: z.string().max(64).optional(),
  missionId: z.string().max(64).optional(),
  harvesterProfileId: z.string().max(64).optional(),
});

export function evidenceRouter(_ctx: AppContext) {
  const root = express.Router();
  const lines = featureRouter('/api/lines');

  lines.post('/:id/load-series', ['admin', 'safety'], async (req, res) => {
    const q = parse(loadSeriesQuerySchema, req.query);
    if (!req.is(['text/csv', 'text/plain', 'application/octet-stream'])) {
      throw new AppError(415, 'unsupported_media_type', 'body: send the series as text/csv with the header "timestamp,current_a"', [{ path: 'body', message: 'text/csv expected' }]);
    }
    const input = req.pipe(new ByteLimit(MAX_LOAD_SERIES_BYTES));
    req.on('error', (e) => input.destroy(e));
    res.json(await importLoadSeries(req.em, currentUser(req), String(req.params.id), input, q.mode, q.timeZone));
  });

  // Replaces the line's load estimate with one derived from evidence: audited and rescored as any line edit.
  lines.post('/:id/load-estimate/from-evidence', ['admin'], async (req, res) => {
    const body = parse(z.object({ source: z.enum(['series', 'flights'], { error: 'source must be "series" or "flights"' }), version: z.number({ error: 'Give the line version you saw' }).int() }), req.body);
    const derived = await estimateFromEvidence(req.em, String(req.params.id), body.source);
    res.json(await updateLine(req.em, currentUser(req), String(req.params.id), { version: body.version, ...derived }));
  });

  lines.get('/:id/load-profile', 'signed-in', async (req, res) => {
    const q = parse(loadProfileQuerySchema, req.query);
    res.json(await loadProfile(req.em, String(req.params.id), q.month ?? currentMonth()));
  });

  lines.get('/:id/load-evidence', 'signed-in', async (req, res) => {
    const q = parse(loadProfileQuerySchema, req.query);
    res.json(await loadEvidence(req.em, String(req.params.id), q.month));
  });

  const summaries = featureRouter('/api/load-series');
  summaries.get('/', 'signed-in', async (req, res) => {
    res.json({ items: await seriesSummaries(req.em) });
  });

  const flights = featureRouter('/api/flight-records');
  flights.get('/template.csv', 'signed-in', (_req, res) => {
    res.type('text/csv').attachment('roostline-flight-record.csv').send(flightTemplateCsv());
  });
  flights.post('/', ['planner', 'safety', 'admin'], receiveFlight, async (req, res) => {
    if (!req.file) throw AppError.field('file', 'attach the flight record (CSV or GPX) as "file"');
    const fields = parse(flightFieldsSchema, req.body);
    const text = req.file.buffer.toString('utf8');
    if (text.includes('\u0000')) throw new AppError(415, 'unsupported_media_type', 'file: not a text file (CSV or GPX expected)', [{ path: 'file', message: 'not a text file' }]);
    res.status(201).json(await uploadFlightRecord(req.em, currentUser(req), { text, name: req.file.originalname }, fields));
  });
  flights.get('/', 'signed-in', async (req, res) => {
    const q = parse(z.object({ missionId: z.string().max(64).optional() }), req.query);
    res.json({ items: await listFlightRecords(req.em, q) });
  });
  flights.get('/:id', 'signed-in', async (req, res) => res.json(await getFlightRecord(req.em, String(req.params.id))));

  const ev = featureRouter('/api/evidence');
  ev.get('/perches', 'signed-in', async (req, res) => {
    const q = parse(z.object({ spanId: z.string().max(64).optional(), harvesterProfileId: z.string().max(64).optional() }), req.query);
    res.json(await perchEvidence(req.em, q));
  });
  ev.get('/spans/:id', 'signed-in', async (req, res) => res.json(await spanEvidence(req.em, String(req.params.id))));

  const calc = featureRouter('/api/calc');
  calc.post('/implied-current', 'signed-in', (req, res) => {
    const input = parse(impliedCurrentSchema, req.body);
    try {
      res.json({ currentA: impliedCurrentA(input.harvester, input.frequencyHz, input.powerW) });
    } catch (e) {
      if (e instanceof PowerAboveCeilingError) {
        throw AppError.field('powerW', `above the model's ceiling of ${e.ceilingW.toFixed(2)} W for this harvester: no line current gives it`);
      }
      throw e;
    }
  });

  root.use('/api/lines', lines.router);
  root.use('/api/calc', calc.router);
  root.use('/api/load-series', summaries.router);
  root.use('/api/flight-records', flights.router);
  root.use('/api/evidence', ev.router);
  root.use(evidenceErrorHandler);
  return root;
}
