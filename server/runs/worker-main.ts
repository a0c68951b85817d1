/**
 * `npm run worker`: a standalone run worker with FIT_SLOTS fit slots (default: cores − 1, at least
 * one). `npm start` runs one as a child process of the server and starts it again if it dies.
 * Point several at the same DATABASE_URL (on one host or many) to fit more runs at once.
 *
 * The process never exits because of the database: its writes retry through outages, and a
 * rejection or exception nothing caught is logged, not fatal.
 */
import { createDb, DEFAULT_DATABASE_URL } from '../db/client';
import { describe } from './retry';
import { fitSlotsFromEnv } from './slots';
import { RunWorker } from './worker';

process.on('unhandledRejection', (e) => console.error(`[slackline] worker: unhandled rejection (still running): ${describe(e)}`));
process.on('uncaughtException', (e) => console.error(`[slackline] worker: uncaught exception (still running): ${describe(e)}`));

const handle = createDb(process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL, 4);
const slots = fitSlotsFromEnv();
/** Optional whole milliseconds from the environment (lease and beat lengths, for operators and tests). */
function msFromEnv(name: string): number | undefined {
  const raw = process.env[name]?.trim();
  if (!raw) return undefined;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1) throw new Error(`${name} must be a whole number of milliseconds (got "${raw}")`);
  return n;
}
const worker = new RunWorker({ db: handle.db, slots, leaseMs: msFromEnv('RUN_LEASE_MS'), heartbeatMs: msFromEnv('RUN_HEARTBEAT_MS'), pollMs: msFromEnv('RUN_POLL_MS'), progressMs: msFromEnv('RUN_PROGRESS_MS'), ...(process.env.RUN_CHAIN_SECONDS ? { wallSeconds: Number(process.env.RUN_CHAIN_SECONDS) } : {}) });
worker.start();
console.log(`[slackline] run worker ${worker.id} polling the queue with ${slots} fit slot(s)`);

let stopping = false;
const stop = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  console.log(`[slackline] worker ${signal}: finishing the current runs then stopping (Ctrl-C again to abandon them)`);
  process.once('SIGINT', () => void worker.stop(true).then(() => handle.close()).then(() => process.exit(0)));
  // A parent that asks for a quick stop (npm start shutting down) abandons: leases let another resume.
  await worker.stop(signal === 'SIGTERM' && process.env.WORKER_ABANDON_ON_TERM === 'true');
  await handle.close().catch(() => undefined);
  process.exit(0);
};
process.on('SIGINT', () => void stop('SIGINT'));
process.on('SIGTERM', () => void stop('SIGTERM'));
