/**
 * Start the server: read the environment, connect to MariaDB, start the local mail capture when
 * no SMTP_URL is given, serve the built client and the API. See DEVELOPERS.md for the variables.
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createApp } from './app';
import { configFromEnv } from './config';
import { createDb, DEFAULT_DATABASE_URL, pingDb } from './db/client';
import { startCaptureServer, type CaptureServer } from './mail/capture-server';
import { createSmtpMailer } from './mail/mailer';
import { systemClock } from './lib/clock';
import { superviseWorker } from './runs/supervisor';
import { fitSlotsFromEnv } from './runs/slots';
import { describe } from './runs/retry';
import { createLucia } from './auth/lucia';
import { passwordResets } from './db/schema';
import { lt } from 'drizzle-orm';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

async function main() {
  const env = process.env;
  const port = Number(env.PORT ?? 3000);
  const host = env.HOST ?? '127.0.0.1';
  const clientDir = env.CLIENT_DIR ?? path.join(root, 'dist/client');
  const config = configFromEnv(env, env.SERVE_CLIENT === 'false' ? null : clientDir);
  const handle = createDb(env.DATABASE_URL ?? DEFAULT_DATABASE_URL);

  let capture: CaptureServer | null = null;
  let smtpUrl = env.SMTP_URL;
  if (!smtpUrl) {
    // Production never runs the capture (it would hold every reset and invitation link).
    if (config.production) throw new Error('SMTP_URL is required in production: the local mail capture does not run there');
    capture = await startCaptureServer(handle.db, Number(env.SMTP_CAPTURE_PORT ?? 0));
    smtpUrl = capture.url;
    // The key is new on every start and is the only way in without signing in (README, Security).
    console.log(`[slackline] mail capture on ${capture.url}; read it at ${config.publicUrl}/dev/mail?key=${config.devMailKey}`);
  }
  const mailer = createSmtpMailer(smtpUrl, config.mailFrom);
  const slots = fitSlotsFromEnv(env);
  const app = createApp({ db: handle.db, mailer, clock: systemClock, config, pingDb: () => pingDb(handle) });
  // The fits run in a child process with FIT_SLOTS slots (RUN_WORKER=false: none; `npm run worker`
  // adds more, on this host or others).
  const worker = env.RUN_WORKER === 'false' ? null : superviseWorker({ env, slots });
  const server = app.listen(port, host, () => {
    console.log(`[slackline] serving on http://${host}:${port}`);
  });
  server.on('error', (err) => {
    console.error('[slackline] could not listen:', err.message);
    process.exit(1);
  });

  // Hourly housekeeping: expired sessions and reset tokens are of no use to anyone.
  const lucia = createLucia(handle.db);
  const housekeeping = setInterval(() => {
    Promise.all([
      lucia.deleteExpiredSessions(),
      handle.db.delete(passwordResets).where(lt(passwordResets.expiresAt, new Date(Date.now() - 86_400_000))),
    ]).catch((err: unknown) => console.error('[slackline] housekeeping failed:', err));
  }, 3_600_000);
  housekeeping.unref();

  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    clearInterval(housekeeping);
    console.log(`[slackline] ${signal}: stopping`);
    server.close();
    server.closeAllConnections();
    Promise.allSettled([worker?.stop(), capture?.close()])
      .then(() => handle.close())
      .then(() => {
      mailer.close();
      process.exit(0);
    });
    setTimeout(() => process.exit(0), 5000).unref();
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

// A rejection nothing caught is a bug to log, not a reason to take every user's session down.
process.on('unhandledRejection', (e) => console.error(`[slackline] unhandled rejection: ${describe(e)}`));

main().catch((err: unknown) => {
  console.error('[slackline] failed to start:', err);
  process.exit(1);
});
