/**
 * Mount one route of the shared route table on a router: authorize (the one place that decides
 * who may call what), validate params, query and body with the route's zod schemas, run the
 * handler, answer with the route's success status.
 */
import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import { z } from 'zod';
import type { RouteDef } from '../../shared/api/routes';
import { authorize } from '../auth/authorize';
import type { AppContext } from '../context';
import { HttpError } from './errors';
import { issuesToFields } from '../../shared/api/common';

type Out<R, K extends string> = R extends { [P in K]: infer S extends z.ZodType } ? z.output<S> : Record<string, never>;
type Res<R> = R extends { response: infer S extends z.ZodType } ? z.input<S> : void;

export interface Valid<R> {
  params: Out<R, 'params'>;
  query: Out<R, 'query'>;
  body: Out<R, 'body'>;
}

export type Handler<R extends RouteDef> = (v: Valid<R>, req: Request, res: Response) => Promise<Res<R>>;

export { issuesToFields };

const none = z.strictObject({});

function parsePart(schema: z.ZodType | undefined, value: unknown, part: string): unknown {
  // Params and query are always validated: a route without a schema accepts none.
  if (!schema && part === 'body') return {};
  schema ??= none;
  const result = schema.safeParse(value);
  if (result.success) return result.data;
  const fields = issuesToFields(result.error.issues, part);
  const names = Object.keys(fields);
  throw new HttpError(
    400,
    'bad_request',
    names.length === 1 ? `${names[0]}: ${fields[names[0]]}` : `Invalid ${part}: ${names.join(', ')}`,
    fields,
  );
}

export function mount<R extends RouteDef>(router: Router, ctx: AppContext, def: R, handler: Handler<R>): void {
  const method = def.method.toLowerCase() as 'get' | 'post' | 'patch' | 'delete';
  const run: RequestHandler = async (req: Request, res: Response, next: NextFunction) => {
    try {
      const valid = {
        params: parsePart(def.params, { ...req.params }, 'params'),
        query: parsePart(def.query, { ...(req.query as object) }, 'query'),
        body: parsePart(def.body, req.body ?? {}, 'body'),
      } as Valid<R>;
      const out = await handler(valid, req, res);
      if (res.headersSent) return;
      if (def.status === 204) {
        res.status(204).end();
        return;
      }
      if (ctx.config.checkResponses && def.response) {
        const checked = def.response.safeParse(out);
        if (!checked.success) {
          throw new Error(`response of ${def.method} ${def.path} breaks its schema: ${checked.error.message}`);
        }
      }
      res.status(def.status).json(out);
    } catch (err) {
      next(err);
    }
  };
  router[method](def.path, authorize(ctx, def.access), run);
}
