/** Map every error to the one JSON error shape `{ error: { code, message, fields? } }`. */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import type { ApiError, ErrorCode } from '../../shared/api/common';
import { DomainError, type DomainErrorKind } from '../lib/errors';
import type { AppConfig } from '../config';
import { HttpError } from './errors';
import { isDbUnreachable } from '../db/errors';
import { issuesToFields } from './route';


const DOMAIN: Record<DomainErrorKind, [number, ErrorCode]> = {
  invalid: [400, 'bad_request'],
  not_found: [404, 'not_found'],
  conflict: [409, 'conflict'],
  time_limit: [422, 'time_limit'],
  busy: [503, 'service_unavailable'],
};

function toHttpError(err: unknown): HttpError {
  if (err instanceof HttpError) return err;
  if (err instanceof DomainError) return new HttpError(DOMAIN[err.kind][0], DOMAIN[err.kind][1], err.message, err.fields);
  if (err instanceof ZodError) return new HttpError(400, 'bad_request', 'Invalid request', issuesToFields(err.issues));
  const e = err as { type?: string; status?: number; statusCode?: number; code?: string; message?: string };
  // Errors of express.json() (body-parser).
  if (e?.type === 'entity.parse.failed') return new HttpError(400, 'malformed_json', 'The request body is not valid JSON');
  if (e?.type === 'entity.too.large') return new HttpError(413, 'payload_too_large', 'The request body is too large');
  if (e?.type === 'encoding.unsupported' || e?.type === 'charset.unsupported') {
    return new HttpError(415, 'bad_request', 'Unsupported body encoding');
  }
  const status = e?.status ?? e?.statusCode;
  if (status === 404) return new HttpError(404, 'not_found', e.message ?? 'Not found');
  if (typeof status === 'number' && status >= 400 && status < 500) {
    return new HttpError(status, 'bad_request', e.message ?? 'Bad request');
  }
  // Also through Drizzle's wrapper (the driver's error is its cause).
  if (isDbUnreachable(err)) return new HttpError(503, 'service_unavailable', 'The database is not reachable');
  return new HttpError(500, 'internal', 'Something went wrong on our side');
}

export function errorHandler(config: AppConfig): ErrorRequestHandler {
  return (err, req, res, _next) => {
    const http = toHttpError(err);
    if (http.status >= 500 && config.logErrors) {
      console.error(`[slackline] ${req.method} ${req.originalUrl} failed:`, err);
    }
    if (res.headersSent) return;
    const body: ApiError = { error: { code: http.code, message: http.message } };
    if (http.fields && Object.keys(http.fields).length > 0) body.error.fields = http.fields;
    res.status(http.status).json(body);
  };
}

export const apiNotFound: RequestHandler = (req, res) => {
  const body: ApiError = { error: { code: 'not_found', message: `No API route ${req.method} ${req.path}` } };
  res.status(404).json(body);
};
