/** Security headers and the origin check on state-changing requests. */
import type { Request, RequestHandler } from 'express';
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
    return new URL(value).origin;
  } catch {
    return null;
  }
}

/** The origin this request was addressed to (honours trust proxy through req.protocol). */
function ownOrigin(req: Request): string | null {
  // req.host honours X-Forwarded-Host when trust proxy is on (Express 5 keeps the port).
  const host = req.host;
  return host ? `${req.protocol}://${host}` : null;
}

/**
 * State-changing API requests must come from our own pages: the Origin header (or, when a
 * browser omits it, the Referer) must be the request's own origin, the public URL or a configured
 * extra origin. Requests without either header are refused too; API clients send `Origin`.
 */
export function originCheck(config: AppConfig): RequestHandler {
  const allowed = new Set([originOf(config.publicUrl), ...config.allowedOrigins.map(originOf)].filter(Boolean));
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    const origin = originOf(req.get('origin')) ?? originOf(req.get('referer'));
    if (origin && (origin === ownOrigin(req) || allowed.has(origin))) return next();
    next(new HttpError(403, 'forbidden', 'Request refused: it did not come from this site (Origin check)'));
  };
}
