/**
 * Running the real app for tests.
 *
 * startTestServer(options?) → Promise<TestServer>
 *   Serves the API and, unless `serveClient: false`, the BUILT client (dist/client, made by
 *   `vite build`; npm test builds it first) on http://127.0.0.1:<ephemeral port>. Each call gets
 *   its own freshly migrated database and its own in-process fake SMTP server (port 0); mail the
 *   app sends lands in that database's mail_outbox.
 *
 *   options: {
 *     serveClient?: boolean             // default true; false for API-only integration tests
 *     clientDir?: string                // default <repo>/dist/client
 *     clock?: ManualClock               // default: ticks with real time; tests may advance() or set() it
 *     config?: Partial<AppConfig>       // e.g. { authRateLimit: { windowMs: 60_000, limit: 3 } }
 *     wrapMailer?: (m: Mailer) => Mailer  // e.g. a spy that records when mail is sent
 *   }
 *
 *   TestServer: {
 *     url: string                       // 'http://127.0.0.1:PORT' (no trailing slash)
 *     clock: ManualClock                // the injected clock
 *     db: TestDatabase                  // { url, handle, db, truncate(), drop() }
 *     mail: Mailbox                     // captured mail, see below
 *     config: AppConfig                 // config.devMailKey opens /dev/mail?key=… as `npm start` prints it
 *     http: Server                      // the listening node:http server
 *     client(): TestClient              // a new cookie-jar HTTP client pointed at url, reading this
 *                                       // server's mail (so signUp can follow the confirmation link)
 *     close(): Promise<void>            // stop server + SMTP, drop the database
 *   }
 *
 *   Mailbox: {
 *     all(): Promise<CapturedMail[]>                           // newest first
 *     latestTo(email): Promise<CapturedMail | undefined>
 *     waitFor(email, { timeoutMs?, subject? }): Promise<CapturedMail>   // polls until it arrives
 *     linkIn(mail, pathPrefix): string                         // first http(s) link whose path starts with prefix
 *   }
 *   CapturedMail: { id, from, to: string[], subject, text, html: string | null, createdAt: string }
 *
 * The browser tests use it like:
 *   const server = await startTestServer();
 *   … page.goto(server.url + '/sign-up') …
 *   const mail = await server.mail.waitFor('bo@example.test');
 *   const link = server.mail.linkIn(mail, '/invite/');
 *   await server.close();
 */
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { fileURLToPath } from 'node:url';
import { desc } from 'drizzle-orm';
import type { Express } from 'express';
import { createApp } from '../../server/app';
import { defaultConfig, type AppConfig } from '../../server/config';
import { pingDb } from '../../server/db/client';
import { mailOutbox } from '../../server/db/schema';
import { ManualClock } from '../../server/lib/clock';
import { startCaptureServer, toCapturedMail } from '../../server/mail/capture-server';
import { createSmtpMailer, type Mailer } from '../../server/mail/mailer';
import type { CapturedMail } from '../../shared/api/system';
import { createTestDatabase, type TestDatabase } from './db';
import { TestClient } from './http';

export const REPO_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

export interface Mailbox {
  all(): Promise<CapturedMail[]>;
  latestTo(email: string): Promise<CapturedMail | undefined>;
  waitFor(email: string, opts?: { timeoutMs?: number; subject?: RegExp }): Promise<CapturedMail>;
  linkIn(mail: CapturedMail, pathPrefix: string): string;
}

export interface TestServer {
  url: string;
  app: Express;
  clock: ManualClock;
  db: TestDatabase;
  mail: Mailbox;
  config: AppConfig;
  http: Server;
  client(): TestClient;
  close(): Promise<void>;
}

export interface TestServerOptions {
  serveClient?: boolean;
  clientDir?: string;
  clock?: ManualClock;
  config?: Partial<AppConfig>;
  wrapMailer?: (mailer: Mailer) => Mailer;
}

function mailbox(tdb: TestDatabase): Mailbox {
  const all = async (): Promise<CapturedMail[]> => {
    const rows = await tdb.db.select().from(mailOutbox).orderBy(desc(mailOutbox.createdAt), desc(mailOutbox.id));
    return rows.map(toCapturedMail);
  };
  const latestTo = async (email: string) => (await all()).find((m) => m.to.includes(email.toLowerCase()));
  return {
    all,
    latestTo,
    async waitFor(email, opts = {}) {
      const deadline = Date.now() + (opts.timeoutMs ?? 10_000);
      for (;;) {
        const found = (await all()).find(
          (m) => m.to.includes(email.toLowerCase()) && (!opts.subject || opts.subject.test(m.subject)),
        );
        if (found) return found;
        if (Date.now() > deadline) throw new Error(`no mail to ${email} arrived in time`);
        await new Promise((r) => setTimeout(r, 100));
      }
    },
    linkIn(mail, pathPrefix) {
      for (const match of mail.text.matchAll(/https?:\/\/[^\s<>"]+/g)) {
        const u = new URL(match[0]);
        if (u.pathname.startsWith(pathPrefix)) return match[0];
      }
      throw new Error(`no link to ${pathPrefix} in mail "${mail.subject}"`);
    },
  };
}

export async function startTestServer(options: TestServerOptions = {}): Promise<TestServer> {
  const tdb = await createTestDatabase();
  const clock = options.clock ?? new ManualClock(Date.now());
  const capture = await startCaptureServer(tdb.db, 0);
  const serveClient = options.serveClient ?? true;
  // The public URL is only known after listen(); links in mail use it, so fill it in then.
  const config = defaultConfig({
    clientDir: serveClient ? (options.clientDir ?? path.join(REPO_ROOT, 'dist/client')) : null,
    checkResponses: true,
    logErrors: true,
    authRateLimit: { windowMs: 60_000, limit: 10_000 },
    accountLimits: { windowMs: 60_000, signInFailures: 10_000, resetRequests: 10_000, invitationsPerWorkspace: 10_000, invitationsPerInviter: 10_000 },
    ...options.config,
  });
  const smtp = createSmtpMailer(capture.url, config.mailFrom);
  const mailer = options.wrapMailer ? options.wrapMailer(smtp) : smtp;
  const app = createApp({ db: tdb.db, mailer, clock, config, pingDb: () => pingDb(tdb.handle) });
  const server: Server = await new Promise((resolve, reject) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
    s.once('error', reject);
  });
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  if (!options.config?.publicUrl) config.publicUrl = url;
  const mb = mailbox(tdb);

  return {
    url,
    app,
    clock,
    db: tdb,
    mail: mb,
    config,
    http: server,
    client: () => new TestClient(url, url, {
      mailTo: async (email) => (await mb.all()).filter((m) => m.to.includes(email.toLowerCase())),
    }),
    async close() {
      await new Promise<void>((r) => {
        server.close(() => r());
        server.closeAllConnections();
      });
      smtp.close();
      await capture.close();
      await tdb.drop();
    },
  };
}

/** API-only app for integration tests (same as startTestServer with serveClient: false). */
export function startApiServer(options: Omit<TestServerOptions, 'serveClient' | 'clientDir'> = {}) {
  return startTestServer({ ...options, serveClient: false });
}
