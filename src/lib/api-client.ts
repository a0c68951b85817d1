/**
 * The client's one door to the HTTP API.
 *
 * - `apiFetch` sends JSON with the session cookie and turns every non-2xx answer into an
 *   `ApiError` built from the API's one error shape (`{ error: { code, message, fields? } }`).
 * - `callRoute` goes through the shared route table: it fills the path, validates the body with
 *   the same zod object the server uses (so a bad form never leaves the browser) and checks the
 *   answer against the route's response schema.
 */
import type { z } from 'zod';
import { apiErrorSchema, issuesToFields as sharedIssuesToFields, routePath, routes, type RouteName } from '@shared/api';

/** Codes the client adds on top of the server's (`ERROR_CODES` in shared/api/common.ts). */
export type ClientErrorCode = 'network' | 'bad_response';

export class ApiError extends Error {
  override readonly name = 'ApiError';
  constructor(
    /** HTTP status; 0 when the server could not be reached or the request never left. */
    readonly status: number,
    readonly code: string,
    message: string,
    /** Field path (e.g. `email`) → message, for forms. */
    readonly fields: Readonly<Record<string, string>> = {},
    /** The answer's parsed body, for routes whose refusals carry more than the error (a save conflict). */
    readonly body?: unknown,
  ) {
    super(message);
  }

  /** Message for one form field, if the server (or the local check) named it. */
  field(name: string): string | undefined {
    return this.fields[name];
  }

  get hasFieldErrors(): boolean {
    return Object.keys(this.fields).length > 0;
  }
}

export function isApiError(e: unknown): e is ApiError {
  return e instanceof ApiError;
}

/** Plain-language fallbacks when the server sent no usable message. */
const fallbackMessages: Record<number, string> = {
  400: 'The request was not accepted.',
  401: 'Please sign in.',
  403: 'You do not have permission to do that.',
  404: 'Not found.',
  409: 'That conflicts with the current state.',
  413: 'The request is too large.',
  429: 'Too many attempts. Wait a moment and try again.',
  503: 'The service is unavailable right now.',
};

/** Builds an ApiError from a non-2xx answer's status and parsed body (anything). */
export function toApiError(status: number, body: unknown): ApiError {
  const parsed = apiErrorSchema.safeParse(body);
  if (parsed.success) {
    const { code, message, fields } = parsed.data.error;
    return new ApiError(status, code, message || fallbackMessages[status] || `Request failed (${status}).`, fields ?? {}, body);
  }
  const message = fallbackMessages[status] ?? `Request failed (${status}).`;
  const code = status >= 500 ? 'internal' : status === 404 ? 'not_found' : 'bad_request';
  return new ApiError(status, code, message, {}, body);
}

/** Zod issues as the server's `fields` map (shared/api/common.ts); a whole-value problem goes under `''`. */
export const issuesToFields = (issues: Parameters<typeof sharedIssuesToFields>[0]) => sharedIssuesToFields(issues, '');

export type ApiFetchOptions = {
  method?: 'GET' | 'POST' | 'PATCH' | 'DELETE';
  /** JSON-serialisable, or a FormData sent as multipart as it is. */
  body?: unknown;
  query?: Record<string, string | number | undefined>;
  signal?: AbortSignal;
};

/** Sends one request; resolves with the parsed JSON (or undefined for 204), rejects with ApiError. */
export async function apiFetch(path: string, { method = 'GET', body, query, signal }: ApiFetchOptions = {}): Promise<unknown> {
  let url = path;
  if (query) {
    const qs = new URLSearchParams();
    for (const [k, v] of Object.entries(query)) if (v !== undefined) qs.set(k, String(v));
    const s = qs.toString();
    if (s) url += `?${s}`;
  }
  const headers: Record<string, string> = { Accept: 'application/json' };
  const multipart = body instanceof FormData;
  if (body !== undefined && !multipart) headers['Content-Type'] = 'application/json';

  let res: Response;
  try {
    res = await fetch(url, {
      method,
      headers,
      body: body === undefined ? undefined : multipart ? body : JSON.stringify(body),
      credentials: 'same-origin',
      signal,
    });
  } catch (e) {
    if (e instanceof DOMException && e.name === 'AbortError') throw e;
    throw new ApiError(0, 'network', 'Could not reach the server. Check your connection and try again.');
  }

  if (res.status === 204) return undefined;
  const text = await res.text();
  let data: unknown = undefined;
  if (text) {
    try {
      data = JSON.parse(text);
    } catch {
      data = undefined;
    }
  }
  if (!res.ok) throw toApiError(res.status, data);
  return data;
}

// ---- typed calls through the shared route table ----

type Routes = typeof routes;
type Field<N extends RouteName, K extends string> = Routes[N] extends { [P in K]: infer S extends z.ZodType } ? S : never;

export type RouteParams<N extends RouteName> = [Field<N, 'params'>] extends [never] ? undefined : z.input<Field<N, 'params'>>;
export type RouteQuery<N extends RouteName> = [Field<N, 'query'>] extends [never] ? undefined : z.input<Field<N, 'query'>>;
export type RouteBody<N extends RouteName> = [Field<N, 'body'>] extends [never] ? undefined : z.input<Field<N, 'body'>>;
export type RouteResponse<N extends RouteName> = [Field<N, 'response'>] extends [never] ? void : z.output<Field<N, 'response'>>;

export type CallOptions<N extends RouteName> = {
  params?: RouteParams<N>;
  query?: RouteQuery<N>;
  body?: RouteBody<N>;
  /** For multipart routes: the file, sent in the `file` field beside the body's text fields. */
  file?: File;
  signal?: AbortSignal;
};

/**
 * Calls a route of the shared table. The body is validated locally with the route's own zod
 * schema first; a failure rejects with the same ApiError (code `bad_request`, `fields`) the
 * server would answer with, without a round trip.
 */
export async function callRoute<N extends RouteName>(name: N, opts: CallOptions<N> = {}): Promise<RouteResponse<N>> {
  const def = routes[name] as {
    method: 'GET' | 'POST' | 'PATCH' | 'DELETE';
    body?: z.ZodType;
    response?: z.ZodType;
  };
  const path = routePath(name, (opts.params ?? {}) as Record<string, string>);

  let body: unknown = undefined;
  if (def.body) {
    const checked = def.body.safeParse(opts.body ?? {});
    if (!checked.success) {
      throw new ApiError(400, 'bad_request', 'Please correct the highlighted fields.', issuesToFields(checked.error.issues));
    }
    body = checked.data;
    if (opts.file) {
      const form = new FormData();
      for (const [k, v] of Object.entries(checked.data as Record<string, unknown>)) form.set(k, String(v));
      form.set('file', opts.file);
      body = form;
    }
  } else if (def.method !== 'GET' && opts.body !== undefined) {
    body = opts.body;
  }

  const data = await apiFetch(path, {
    method: def.method,
    body,
    query: opts.query as Record<string, string | number | undefined> | undefined,
    signal: opts.signal,
  });
  if (!def.response) return undefined as RouteResponse<N>;
  const parsed = def.response.safeParse(data);
  if (!parsed.success) {
    throw new ApiError(200, 'bad_response', 'The server sent an answer this page does not understand. Reload and try again.');
  }
  return parsed.data as RouteResponse<N>;
}

/** Routes of the table that answer bytes of their own content type (`produces`). */
export type BinaryRouteName = { [N in RouteName]: Routes[N] extends { produces: string } ? N : never }[RouteName];

/**
 * Calls a binary route of the shared table (method and path from the table) and resolves with the
 * answer's bytes once its content type is the one the route names; errors as `apiFetch`.
 */
export async function callRouteBytes<N extends BinaryRouteName>(name: N, opts: Pick<CallOptions<N>, 'params' | 'query' | 'signal'> = {}): Promise<ArrayBuffer> {
  const def = routes[name] as { method: 'GET' | 'POST' | 'PATCH' | 'DELETE'; produces: string };
  let url = routePath(name, (opts.params ?? {}) as Record<string, string>);
  const qs = new URLSearchParams();
  for (const [k, v] of Object.entries((opts.query ?? {}) as Record<string, string | number | undefined>)) if (v !== undefined) qs.set(k, String(v));
  if (qs.toString()) url += `?${qs.toString()}`;
  let res: Response;
  try {
    res = await fetch(url, { method: def.method, headers: { Accept: `${def.produces}, application/json` }, credentials: 'same-origin', signal: opts.signal });
  } catch (e) {
    if (e instanceof DOMException && e.name === 'AbortError') throw e;
    throw new ApiError(0, 'network', 'Could not reach the server. Check your connection and try again.');
  }
  if (!res.ok) {
    let data: unknown = undefined;
    try {
      data = JSON.parse(await res.text());
    } catch {
      data = undefined;
    }
    throw toApiError(res.status, data);
  }
  if (!(res.headers.get('Content-Type') ?? '').startsWith(def.produces)) {
    throw new ApiError(res.status, 'bad_response', 'The server sent an answer this page does not understand. Reload and try again.');
  }
  return res.arrayBuffer();
}

/** A human sentence for any error thrown by a query or mutation. */
export function errorMessage(e: unknown): string {
  if (isApiError(e)) return e.message;
  if (e instanceof Error && e.message) return e.message;
  return 'Something went wrong.';
}
