// Load evidence: a line's metered currents (import, monthly profile, line page) and the implied-current calculator.
import { Transform, type TransformCallback } from 'node:stream';
import express, { type ErrorRequestHandler } from 'express';
import { impliedCurrentSchema, loadProfileQuerySchema, loadSeriesQuerySchema } from '#shared/schemas/load-evidence.ts';
import { impliedCurrentA, PowerAboveCeilingError } from '#shared/engineering/implied-current.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { AppError, errorBody, parse } from '../../http/errors.ts';
import { currentMonth, importLoadSeries, seriesSummaries, loadEvidence, loadProfile, LoadSeriesRefusedError } from './load-series.service.ts';

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
  root.use(evidenceErrorHandler);
  return root;
}
