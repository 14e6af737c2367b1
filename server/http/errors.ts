import type { ErrorRequestHandler, RequestHandler } from 'express';
import { z } from 'zod';
import type { ApiErrorBody, ApiErrorCode, ApiIssue } from '#shared/api-error.ts';

/** The one error class handlers throw; the central handler turns it into the shared error shape. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: ApiErrorCode,
    message: string,
    readonly issues?: ApiIssue[],
  ) {
    super(message);
  }
  static badRequest(message: string, issues?: ApiIssue[]) {
    return new AppError(400, 'bad_request', message, issues);
  }
  static field(path: string, message: string) {
    return new AppError(400, 'bad_request', `${path}: ${message}`, [{ path, message }]);
  }
  static unauthenticated(message = 'Sign in to continue') {
    return new AppError(401, 'unauthenticated', message);
  }
  static forbidden(message = 'Your role does not allow this') {
    return new AppError(403, 'forbidden', message);
  }
  static notFound(what = 'Record') {
    return new AppError(404, 'not_found', `${what} not found`);
  }
  static conflict(message: string, issues?: ApiIssue[]) {
    return new AppError(409, 'conflict', message, issues);
  }
}

export function zodIssues(error: z.ZodError): ApiIssue[] {
  return error.issues.map((i) => ({ path: i.path.map(String).join('.') || '(body)', message: i.message }));
}

/** Parse with a shared schema; failures become a 400 naming each field. */
export function parse<T extends z.ZodType>(schema: T, data: unknown): z.infer<T> {
  const result = schema.safeParse(data ?? {});
  if (!result.success) {
    const issues = zodIssues(result.error);
    throw AppError.badRequest(`Invalid input: ${issues.map((i) => i.path).join(', ')}`, issues);
  }
  return result.data;
}

export const notFoundHandler: RequestHandler = (req, _res, next) => {
  next(new AppError(404, 'not_found', `No such endpoint: ${req.method} ${req.path}`));
};

export function errorBody(code: ApiErrorCode, message: string, issues?: ApiIssue[]): ApiErrorBody {
  return { error: issues?.length ? { code, message, issues } : { code, message } };
}

/** Storage and database faults in words for the person whose change did not save; reads go on meanwhile. */
export function storageFault(err: unknown): AppError | null {
  const code = String((err as { code?: unknown })?.code ?? '');
  const text = String((err as { message?: unknown })?.message ?? '');
  if (code === 'ENOSPC' || code === 'EDQUOT' || code === 'SQLITE_FULL' || /SQLITE_FULL/.test(text))
    return new AppError(507, 'insufficient_storage', "The server's disk is full, so this was not saved. Everything saved before is safe; ask your administrator to free space, then try again.");
  if (code === 'EROFS' || code === 'EACCES' || code === 'EPERM' || code === 'SQLITE_READONLY' || /SQLITE_READONLY/.test(text))
    return new AppError(503, 'unavailable', 'The server cannot write to its storage right now, so this was not saved. Everything saved before is safe; ask your administrator, then try again.');
  if (code === 'ESTOREUNAVAILABLE')
    return (err as { write?: boolean }).write
      ? new AppError(503, 'unavailable', 'The server cannot write to its storage right now, so this was not saved. Everything saved before is safe; ask your administrator, then try again.')
      : new AppError(503, 'unavailable', 'The server cannot reach its photo store right now. Nothing is lost; try again in a moment, or ask your administrator.');
  if (code === 'SQLITE_BUSY' || /SQLITE_BUSY/.test(text))
    return new AppError(503, 'unavailable', 'The server is busy and did not save this. Nothing was changed; try again in a moment.');
  return null;
}

export const errorHandler: ErrorRequestHandler = (err, _req, res, _next) => {
  if (res.headersSent) return;
  const fault = err instanceof AppError ? null : storageFault(err);
  if (fault) {
    console.error(err);
    res.status(fault.status).set('Retry-After', '30').json(errorBody(fault.code, fault.message));
    return;
  }
  if (err instanceof AppError) {
    res.status(err.status).json(errorBody(err.code, err.message, err.issues));
    return;
  }
  // body-parser and friends carry a status of their own (413 too large, 400 malformed JSON).
  const status = typeof err?.status === 'number' ? err.status : typeof err?.statusCode === 'number' ? err.statusCode : 500;
  if (status === 413) {
    res.status(413).json(errorBody('payload_too_large', 'Request body is too large'));
    return;
  }
  if (status >= 400 && status < 500) {
    const message = err.type === 'entity.parse.failed' ? 'Request body is not valid JSON' : 'Bad request';
    res.status(400).json(errorBody('bad_request', message));
    return;
  }
  console.error(err);
  res.status(500).json(errorBody('internal', 'Something went wrong on the server'));
};
