/**
 * createApp(deps) builds the Express application from its routers and dependencies, so tests hand
 * in their own database, mailer, clock and configuration. index.ts only reads the environment and
 * listens.
 */
import fs from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import type { AppContext, AppDeps } from './context';
import { createLucia } from './auth/lucia';
import { sessionMiddleware } from './auth/session';
import { apiNotFound, errorHandler } from './http/error-handler';
import { hostCheck, originCheck, securityHeaders } from './http/security';
import { authRouter } from './routes/auth';
import { workspacesRouter } from './routes/workspaces';
import { membersRouter } from './routes/members';
import { invitationsRouter } from './routes/invitations';
import { notebooksRouter } from './routes/notebooks';
import { shareLinksRouter } from './routes/share-links';
import { devMailRouter, systemRouter } from './routes/system';
import { cellsRouter } from './routes/cells';
import { datasetsRouter } from './routes/datasets';
import { compileRouter } from './routes/compile';
import { runsRouter } from './routes/runs';
import { commentsRouter } from './routes/comments';
import { notebookFileRouter } from './routes/notebook-file';

export type { AppDeps } from './context';

export function createApp(deps: AppDeps): Express {
  const ctx: AppContext = { ...deps, lucia: createLucia(deps.db) };
  const { config } = ctx;
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.trustProxy);
  app.use(securityHeaders(config));
  // Every request must name one of this site's hosts (DNS rebinding); health probes excepted.
  const checkHost = hostCheck(config);
  app.use((req, res, next) => (req.method === 'GET' && req.path === '/api/health' ? next() : checkHost(req, res, next)));

  app.use('/api', express.json({ limit: config.bodyLimit, strict: true }));
  app.use('/api', (_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  app.use('/api', originCheck(config));
  // Health needs no session: it must answer even when sessions cannot be read.
  app.use(systemRouter(ctx));
  app.use('/api', sessionMiddleware(ctx));
  app.use(devMailRouter(ctx));

  // One router per resource; each registers full /api/... paths from the shared route table.
  app.use(authRouter(ctx));
  app.use(workspacesRouter(ctx));
  app.use(membersRouter(ctx));
  app.use(invitationsRouter(ctx));
  app.use(notebooksRouter(ctx));
  app.use(shareLinksRouter(ctx));
  app.use(notebookFileRouter(ctx));
  app.use(cellsRouter(ctx));
  app.use(datasetsRouter(ctx));
  app.use(compileRouter(ctx));
  app.use(runsRouter(ctx));
  app.use(commentsRouter(ctx));
  app.use('/api', apiNotFound);

  if (config.clientDir) {
    const dir = path.resolve(config.clientDir);
    if (!fs.existsSync(path.join(dir, 'index.html'))) throw new Error(`no built client at ${dir}: run \`npx vite build\` first`);
    app.use(express.static(dir, { index: false, maxAge: '1h' }));
    // Single-page app: every other GET renders the client, which routes on its own. The file is
    // named relative to its root: `send` refuses dot segments only below the root, so a checkout
    // under a folder like ~/.projects/ still serves its pages.
    app.get('/{*splat}', (_req, res, next) => {
      res.set('Cache-Control', 'no-cache');
      res.sendFile('index.html', { root: dir }, (err) => {
        if (err && !res.headersSent) next(err);
      });
    });
  }

  app.use(errorHandler(config));
  return app;
}
