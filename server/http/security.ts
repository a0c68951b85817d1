/** Security headers and the origin check on state-changing requests. */
import type { RequestHandler } from 'express';
import helmet from 'helmet';
import type { AppConfig } from '../config';
import { HttpError } from './errors';

export function securityHeaders(config: AppConfig): RequestHandler {
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        baseUri: ["'self'"],
        scriptSrc: ["'self'"],
        // Editor and chart libraries set inline styles.
        styleSrc: ["'self'", "'unsafe-inline'"],
        imgSrc: ["'self'", 'data:', 'blob:'],
        fontSrc: ["'self'", 'data:'],
        connectSrc: ["'self'"],
        workerSrc: ["'self'", 'blob:'],
        objectSrc: ["'none'"],
        frameAncestors: ["'none'"],
        formAction: ["'self'"],
        ...(config.publicUrl.startsWith('https:') ? { upgradeInsecureRequests: [] } : {}),
      },
    },
    // HSTS only makes sense when the public address is https.
    strictTransportSecurity: config.publicUrl.startsWith('https:') ? { maxAge: 15552000 } : false,
    referrerPolicy: { policy: 'same-origin' },
    crossOriginEmbedderPolicy: false,
  });
}

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

function originOf(value: string | undefined): string | null {
  if (!value) return null;
  try {
    const u = new URL(value);
    // Opaque origins ('null', data:, file:) serialise as the string "null": never one of ours.
    return u.origin === 'null' ? null : u.origin;
  } catch {
    return null;
  }
}

/** The origins this site answers as: the public URL and the configured extra origins. */
export function siteOrigins(config: AppConfig): Set<string> {
  return new Set([originOf(config.publicUrl), ...config.allowedOrigins.map(originOf)].filter((o): o is string => !!o));
}

/** `host[:port]` of every site origin, as a browser sends it in the Host header. */
function siteHosts(config: AppConfig): Set<string> {
  return new Set([...siteOrigins(config)].map((o) => new URL(o).host));
}

/**
 * Every request must be addressed to one of this site's own host names (public URL or extra
 * origins). A page on another name that resolves to this server (DNS rebinding) would otherwise be
 * able to read its answers as same-origin. Reads the configuration per request: tests fill in the
 * public URL after listen().
 */
export function hostCheck(config: AppConfig): RequestHandler {
  return (req, _res, next) => {
    // req.host honours X-Forwarded-Host when trust proxy is on (Express 5 keeps the port).
    const host = (req.host ?? '').toLowerCase();
    if (host && siteHosts(config).has(host)) return next();
    next(new HttpError(421, 'forbidden', `Request refused: this server does not answer as "${host}" (set PUBLIC_URL or ALLOWED_ORIGINS)`));
  };
}

/**
 * State-changing API requests must come from our own pages: the Origin header (or, only when a
 * browser sends no Origin, the Referer) must be the public URL or a configured extra origin. The
 * Host header is never trusted for this. `Origin: null` (sandboxed frames, data: pages) and
 * requests without either header are refused; API clients send `Origin`.
 */
export function originCheck(config: AppConfig): RequestHandler {
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    const header = req.get('origin');
    const origin = header !== undefined ? originOf(header) : originOf(req.get('referer'));
    if (origin && siteOrigins(config).has(origin)) return next();
    next(new HttpError(403, 'forbidden', 'Request refused: it did not come from this site (Origin check)'));
  };
}
