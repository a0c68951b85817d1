/**
 * Multipart routes: authorize first, then receive one file (in memory, size-limited by multer),
 * then validate the text fields and params with the route's zod schemas like `mount` does.
 */
import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import multer from 'multer';
import { z } from 'zod';
import type { RouteDef } from '../../shared/api/routes';
import { authorize } from '../auth/authorize';
import type { AppContext } from '../context';
import { HttpError } from './errors';
import { issuesToFields } from './route';

export interface UploadedFile {
  originalName: string;
  bytes: Buffer;
  size: number;
}

type Out<R, K extends string> = R extends { [P in K]: infer S extends z.ZodType } ? z.output<S> : Record<string, never>;

function parsePart(schema: z.ZodType | undefined, value: unknown, part: string): unknown {
  const result = (schema ?? z.strictObject({})).safeParse(value);
  if (result.success) return result.data;
  const fields = issuesToFields(result.error.issues, part);
  const names = Object.keys(fields);
  throw new HttpError(400, 'bad_request', names.length === 1 ? `${names[0]}: ${fields[names[0]]}` : `Invalid ${part}: ${names.join(', ')}`, fields);
}

export function mountUpload<R extends RouteDef>(
  router: Router,
  ctx: AppContext,
  def: R,
  opts: { field: string; maxBytes: number; what: string },
  handler: (v: { params: Out<R, 'params'>; body: Out<R, 'body'>; file: UploadedFile }, req: Request, res: Response) => Promise<unknown>,
): void {
  const receive = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: opts.maxBytes, files: 1, fields: 10, fieldSize: 4096 },
  }).single(opts.field);
  const upload: RequestHandler = (req, res, next) =>
    receive(req, res, (err: unknown) => {
      if (!err) return next();
      const e = err as { code?: string; message?: string };
      if (e.code === 'LIMIT_FILE_SIZE') {
        return next(new HttpError(413, 'payload_too_large', `The ${opts.what} is larger than the limit of ${Math.round(opts.maxBytes / 1048576)} MB. Nothing was stored.`));
      }
      if (e.code === 'LIMIT_UNEXPECTED_FILE') {
        return next(new HttpError(400, 'bad_request', `Send the ${opts.what} in the multipart field "${opts.field}"`, { [opts.field]: 'Unexpected field' }));
      }
      next(new HttpError(400, 'bad_request', `The upload could not be read: ${e.message ?? 'malformed multipart body'}`));
    });
  const run: RequestHandler = async (req: Request, res: Response, next: NextFunction) => {
    try {
      const params = parsePart(def.params, { ...req.params }, 'params') as Out<R, 'params'>;
      const body = parsePart(def.body, { ...(req.body ?? {}) }, 'body') as Out<R, 'body'>;
      const f = (req as Request & { file?: Express.Multer.File }).file;
      if (!f) throw new HttpError(400, 'bad_request', `Attach the ${opts.what} in the multipart field "${opts.field}"`, { [opts.field]: 'Required' });
      const out = await handler({ params, body, file: { originalName: f.originalname, bytes: f.buffer, size: f.size } }, req, res);
      if (res.headersSent) return;
      res.status(def.status).json(out);
    } catch (err) {
      next(err);
    }
  };
  const method = def.method.toLowerCase() as 'post' | 'patch';
  router[method](def.path, authorize(ctx, def.access), upload, run);
}
