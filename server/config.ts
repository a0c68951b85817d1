/** Application configuration, read from the environment by index.ts and built directly by tests. */
export interface AppConfig {
  /** true in production: hides development routes (mail capture) and error details. */
  production: boolean;
  /** Public base URL used in links inside e-mails, e.g. http://127.0.0.1:3000 */
  publicUrl: string;
  /** Origins allowed to make state-changing requests besides the request's own host. */
  allowedOrigins: string[];
  /** Express 'trust proxy' setting: false, true, a hop count or a list of addresses. */
  trustProxy: boolean | number | string;
  /** Largest JSON body accepted, e.g. '100kb'. */
  bodyLimit: string;
  /** Sign-in / sign-up / reset attempts allowed per client address per window. */
  authRateLimit: { windowMs: number; limit: number };
  /** Directory of the built client to serve with SPA fallback, or null for API only. */
  clientDir: string | null;
  /** From address of outgoing mail. */
  mailFrom: string;
  /** Validate every JSON answer against the route's response schema (tests, development). */
  checkResponses: boolean;
  /** Log unexpected errors to stderr. */
  logErrors: boolean;
}

export const defaultConfig = (overrides: Partial<AppConfig> = {}): AppConfig => ({
  production: false,
  publicUrl: 'http://127.0.0.1:3000',
  allowedOrigins: [],
  trustProxy: false,
  bodyLimit: '100kb',
  authRateLimit: { windowMs: 15 * 60_000, limit: 30 },
  clientDir: null,
  mailFrom: 'Slackline <no-reply@slackline.invalid>',
  checkResponses: false,
  logErrors: true,
  ...overrides,
});

function parseTrustProxy(v: string | undefined): AppConfig['trustProxy'] {
  if (v === undefined || v === '' || v === 'false') return false;
  if (v === 'true') return true;
  if (/^\d+$/.test(v)) return Number(v);
  return v;
}

export function configFromEnv(env: NodeJS.ProcessEnv, clientDir: string | null): AppConfig {
  const port = env.PORT ?? '3000';
  return defaultConfig({
    production: env.NODE_ENV === 'production',
    publicUrl: (env.PUBLIC_URL ?? `http://127.0.0.1:${port}`).replace(/\/+$/, ''),
    allowedOrigins: (env.ALLOWED_ORIGINS ?? '').split(',').map((s) => s.trim()).filter(Boolean),
    trustProxy: parseTrustProxy(env.TRUST_PROXY),
    bodyLimit: env.BODY_LIMIT ?? '100kb',
    authRateLimit: {
      windowMs: Number(env.AUTH_RATE_WINDOW_MS ?? 15 * 60_000),
      limit: Number(env.AUTH_RATE_LIMIT ?? 30),
    },
    clientDir,
    mailFrom: env.MAIL_FROM ?? 'Slackline <no-reply@slackline.invalid>',
    checkResponses: env.NODE_ENV === 'test' || env.CHECK_RESPONSES === 'true',
  });
}
