import { createHash, randomUUID } from 'node:crypto';
import type { Request, RequestHandler, Response } from 'express';
import { UniqueConstraintViolationException, type EntityManager } from '@mikro-orm/core';
import type { AppContext } from '../context.ts';
import { IdempotencyKey } from '../modules/idempotency/idempotency-key.entity.ts';
import { AppError } from './errors.ts';

export const IDEMPOTENCY_HEADER = 'Idempotency-Key';
/** How long a key and its first answer are kept (the contract: 24 h). */
export const IDEMPOTENCY_TTL_MS = 24 * 60 * 60 * 1000;
/** 1–200 printable ASCII characters. */
const KEY_PATTERN = /^[\x20-\x7e]{1,200}$/;
/** A second request with a key still being worked on waits this long for the first answer. */
const WAIT_FOR_FIRST_MS = 20_000;
/** A claim this old with no answer belongs to a process that died mid-request: it may be taken over. */
const ABANDONED_AFTER_MS = 2 * 60 * 1000;
const SWEEP_EVERY_MS = 60 * 60 * 1000;

/** Removes keys older than 24 h; runs hourly and on start-up. */
export async function sweepIdempotencyKeys(em: EntityManager, now = new Date()): Promise<number> {
  return em.fork().nativeDelete(IdempotencyKey, { expiresAt: { $lte: now } });
}

/** JSON with object keys sorted, so the same body hashes the same whatever order a client writes it in. */
function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (value && typeof value === 'object') {
    const entries = Object.keys(value as object)
      .sort()
      .filter((k) => (value as Record<string, unknown>)[k] !== undefined)
      .map((k) => `${JSON.stringify(k)}:${canonicalJson((value as Record<string, unknown>)[k])}`);
    return `{${entries.join(',')}}`;
  }
  return JSON.stringify(value ?? null);
}

/**
 * Reads a multipart body into memory so it can be hashed, then hands the same bytes to multer
 * (which pipes the request into its parser). The boundary is random per request, so it is
 * replaced by a fixed token before hashing: a retried upload of the same files hashes the same.
 */
async function readMultipart(req: Request, maxBytes: number): Promise<string> {
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of req) {
    size += (chunk as Buffer).length;
    if (size > maxBytes) throw new AppError(413, 'payload_too_large', 'Request body is too large');
    chunks.push(chunk as Buffer);
  }
  const body = Buffer.concat(chunks);
  (req as unknown as { pipe: (dest: NodeJS.WritableStream) => NodeJS.WritableStream }).pipe = (dest) => {
    dest.end(body);
    return dest;
  };
  const boundary = /boundary=(?:"([^"]+)"|([^;]+))/i.exec(req.get('content-type') ?? '');
  const b = boundary?.[1] ?? boundary?.[2]?.trim();
  const hash = createHash('sha256');
  if (b) hash.update(body.toString('latin1').split(b).join('\u0000boundary\u0000'), 'latin1');
  else hash.update(body);
  return hash.digest('hex');
}

async function requestHash(req: Request, maxMultipartBytes: number): Promise<string> {
  const head = `${req.method} ${req.originalUrl}\n`;
  if (req.is('multipart/form-data')) return createHash('sha256').update(head).update(await readMultipart(req, maxMultipartBytes)).digest('hex');
  if (req.body !== undefined || !req.headers['content-length'] || req.headers['content-length'] === '0') {
    return createHash('sha256').update(head).update(canonicalJson(req.body ?? null)).digest('hex');
  }
  throw AppError.field(IDEMPOTENCY_HEADER, 'is accepted with JSON or multipart bodies only');
}

type Claim = { kind: 'claimed'; id: string } | { kind: 'replay'; row: IdempotencyKey };

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * Claims (user, key) with an insert that the unique index lets only one request win; the losers
 * read the winner's row: another body → 409, an answer → replayed, still working → wait for it.
 */
async function claim(em: EntityManager, userId: string, key: string, hash: string): Promise<Claim> {
  const deadline = Date.now() + WAIT_FOR_FIRST_MS;
  for (;;) {
    const now = new Date();
    const id = randomUUID();
    try {
      await em.fork().insert(IdempotencyKey, {
        id,
        userId,
        key,
        requestHash: hash,
        state: 'pending',
        responseStatus: null,
        responseBody: null,
        createdAt: now,
        expiresAt: new Date(now.getTime() + IDEMPOTENCY_TTL_MS),
      });
      return { kind: 'claimed', id };
    } catch (err) {
      if (!(err instanceof UniqueConstraintViolationException)) throw err;
    }
    const row = await em.fork().findOne(IdempotencyKey, { userId, key });
    if (!row) continue; // released or swept in between: try again
    if (row.expiresAt <= now) {
      await em.fork().nativeDelete(IdempotencyKey, { id: row.id, expiresAt: { $lte: now } });
      continue;
    }
    if (row.requestHash !== hash) {
      throw AppError.conflict(`${IDEMPOTENCY_HEADER}: this key was already used with a different request; use a new key for a new request`, [
        { path: IDEMPOTENCY_HEADER, message: 'already used with a different request' },
      ]);
    }
    if (row.state === 'done') return { kind: 'replay', row };
    if (now.getTime() - row.createdAt.getTime() > ABANDONED_AFTER_MS) {
      await em.fork().nativeDelete(IdempotencyKey, { id: row.id, state: 'pending' });
      continue;
    }
    if (Date.now() > deadline) {
      throw AppError.conflict(`${IDEMPOTENCY_HEADER}: the first request with this key is still being processed; retry shortly`, [
        { path: IDEMPOTENCY_HEADER, message: 'still being processed' },
      ]);
    }
    await sleep(40);
  }
}

function replay(res: Response, row: IdempotencyKey) {
  res.status(row.responseStatus ?? 200).set('Idempotent-Replayed', 'true');
  if (row.responseBody === null) res.end();
  else res.type('application/json').send(row.responseBody);
}

/**
 * `Idempotency-Key` on POSTs from a signed-in user (the contract's "writes that may be retried"):
 * the first successful answer is kept for 24 h and given back to a retry with the same key and
 * body, which then does nothing. Answers that are not 2xx release the key, so the retry runs again
 * (a rejected request changed nothing, and a transient failure should be retried for real).
 */
export function idempotency(ctx: AppContext): RequestHandler {
  const sweep = () => void sweepIdempotencyKeys(ctx.orm.em).catch(() => undefined);
  sweep();
  const timer = setInterval(sweep, SWEEP_EVERY_MS);
  timer.unref();
  ctx.onClose(() => clearInterval(timer));
  // Photos: up to 8 files per request (see the photo router) plus the form's own fields.
  const maxMultipartBytes = ctx.config.maxUploadBytes * 8 + 1024 * 1024;

  return async (req, res, next) => {
    if (req.method !== 'POST') return next();
    const key = req.get(IDEMPOTENCY_HEADER);
    if (key === undefined) return next();
    if (!KEY_PATTERN.test(key)) {
      throw AppError.field(IDEMPOTENCY_HEADER, 'must be 1–200 printable ASCII characters');
    }
    if (!req.user) return next(); // the route's guard answers 401 (or lets a public route run)
    const hash = await requestHash(req, maxMultipartBytes);
    const em = ctx.orm.em;
    const claimed = await claim(em, req.user.id, key, hash);
    if (claimed.kind === 'replay') return replay(res, claimed.row);

    let settled = false;
    const settle = async (status: number, body: string | null) => {
      if (settled) return;
      settled = true;
      if (status >= 200 && status < 300) {
        await em.fork().nativeUpdate(IdempotencyKey, { id: claimed.id }, { state: 'done', responseStatus: status, responseBody: body });
      } else {
        await em.fork().nativeDelete(IdempotencyKey, { id: claimed.id });
      }
    };
    const sendJson = res.json.bind(res);
    // The answer is stored before it is sent, so a retry that follows it always finds it.
    res.json = ((body: unknown) => {
      if (settled) return sendJson(body);
      const text = body === undefined ? null : JSON.stringify(body);
      settle(res.statusCode, text).then(
        () => sendJson(body),
        (err) => {
          console.error(err);
          sendJson(body);
        },
      );
      return res;
    }) as Response['json'];
    res.on('finish', () => void settle(res.statusCode, null).catch(() => undefined));
    res.on('close', () => {
      // Connection gone before any answer: let the handler finish; its json() still settles.
      if (!res.writableFinished && res.headersSent) void settle(500, null).catch(() => undefined);
    });
    next();
  };
}
