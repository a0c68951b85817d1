/** Application configuration, read from the environment by index.ts and built directly by tests. */
import { randomBytes } from 'node:crypto';
import { RUN_LIMITS } from '../shared/api/notebook';

export interface AppConfig {
  /** true in production: hides development routes (mail capture) and error details. */
  production: boolean;
  /** Public base URL used in links inside e-mails, e.g. http://127.0.0.1:3000 */
  publicUrl: string;
  /**
   * Further origins this site answers as besides publicUrl: their hosts are accepted in the Host
   * header and they may send state-changing requests (Origin check). A local start without
   * PUBLIC_URL lists http://localhost:PORT, http://127.0.0.1:PORT and Vite's dev server here.
   */
  allowedOrigins: string[];
  /** Express 'trust proxy' setting: false, true, a hop count or a list of addresses. */
  trustProxy: boolean | number | string;
  /** Largest JSON body accepted, e.g. '100kb'. */
  bodyLimit: string;
  /** Sign-in / sign-up / reset attempts allowed per client address per window. */
  authRateLimit: { windowMs: number; limit: number };
  /**
   * Failure budgets per account and per workspace (see README, Security): failed sign-ins per
   * account, reset requests per account, invitations sent per workspace and per inviter.
   */
  accountLimits: {
    windowMs: number;
    signInFailures: number;
    resetRequests: number;
    invitationsPerWorkspace: number;
    invitationsPerInviter: number;
  };
  /**
   * Per-start secret that opens the captured-mail page and its API (/dev/mail?key=…); printed by
   * `npm start`. null in production, where the capture does not exist.
   */
  devMailKey: string | null;
  /** Directory of the built client to serve with SPA fallback, or null for API only. */
  clientDir: string | null;
  /** From address of outgoing mail. */
  mailFrom: string;
  /** Validate every JSON answer against the route's response schema (tests, development). */
  checkResponses: boolean;
  /** Log unexpected errors to stderr. */
  logErrors: boolean;
  /** Longest one chain of a fit may run (RUN_CHAIN_SECONDS); fits estimated to need longer are refused. */
  runChainSeconds: number;
}

export const defaultConfig = (overrides: Partial<AppConfig> = {}): AppConfig => ({
  production: false,
  publicUrl: 'http://127.0.0.1:3000',
  allowedOrigins: [],
  trustProxy: false,
  bodyLimit: '100kb',
  authRateLimit: { windowMs: 15 * 60_000, limit: 30 },
  accountLimits: { windowMs: 15 * 60_000, signInFailures: 10, resetRequests: 5, invitationsPerWorkspace: 20, invitationsPerInviter: 20 },
  devMailKey: overrides.production ? null : randomBytes(24).toString('base64url'),
  clientDir: null,
  mailFrom: 'Slackline <no-reply@slackline.invalid>',
  checkResponses: false,
  logErrors: true,
  runChainSeconds: RUN_LIMITS.wallSeconds,
  ...overrides,
});

function parseTrustProxy(v: string | undefined): AppConfig['trustProxy'] {
  if (v === undefined || v === '' || v === 'false') return false;
  if (v === 'true') return true;
  if (/^\d+$/.test(v)) return Number(v);
  return v;
}

const num = (v: string | undefined, fallback: number) => (v !== undefined && v !== '' && Number.isFinite(Number(v)) ? Number(v) : fallback);

/**
 * The origins a local start answers as when PUBLIC_URL is not set: both loopback names on PORT
 * and Vite's dev server (`npm run dev` proxies /api with the browser's Host and Origin).
 */
export function localOrigins(port: string): string[] {
  return [`http://localhost:${port}`, `http://127.0.0.1:${port}`, 'http://localhost:5173', 'http://127.0.0.1:5173'];
}

export function configFromEnv(env: NodeJS.ProcessEnv, clientDir: string | null): AppConfig {
  const port = env.PORT ?? '3000';
  const production = env.NODE_ENV === 'production';
  const extra = (env.ALLOWED_ORIGINS ?? '').split(',').map((s) => s.trim()).filter(Boolean);
  const d = defaultConfig({ production });
  return defaultConfig({
    production,
    publicUrl: (env.PUBLIC_URL ?? `http://127.0.0.1:${port}`).replace(/\/+$/, ''),
    allowedOrigins: env.PUBLIC_URL ? extra : [...localOrigins(port), ...extra],
    accountLimits: {
      windowMs: num(env.ACCOUNT_LIMIT_WINDOW_MS, d.accountLimits.windowMs),
      signInFailures: num(env.SIGN_IN_FAILURE_LIMIT, d.accountLimits.signInFailures),
      resetRequests: num(env.RESET_REQUEST_LIMIT, d.accountLimits.resetRequests),
      invitationsPerWorkspace: num(env.INVITATION_LIMIT, d.accountLimits.invitationsPerWorkspace),
      invitationsPerInviter: num(env.INVITATION_LIMIT, d.accountLimits.invitationsPerInviter),
    },
    trustProxy: parseTrustProxy(env.TRUST_PROXY),
    bodyLimit: env.BODY_LIMIT ?? '100kb',
    authRateLimit: {
      windowMs: Number(env.AUTH_RATE_WINDOW_MS ?? 15 * 60_000),
      limit: Number(env.AUTH_RATE_LIMIT ?? 30),
    },
    clientDir,
    mailFrom: env.MAIL_FROM ?? 'Slackline <no-reply@slackline.invalid>',
    checkResponses: env.NODE_ENV === 'test' || env.CHECK_RESPONSES === 'true',
    runChainSeconds: num(env.RUN_CHAIN_SECONDS, RUN_LIMITS.wallSeconds),
  });
}
