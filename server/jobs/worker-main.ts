/**
 * `npm run worker`: a standalone run worker. Point several at the same DATABASE_URL (on one host
 * or many) to fit more runs at once; each claims one run at a time.
 */
import { createDb, DEFAULT_DATABASE_URL } from '../db/client';
import { RunWorker } from './worker';

const handle = createDb(process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL, 4);
const worker = new RunWorker({ db: handle.db });
worker.start();
console.log(`[slackline] run worker ${worker.id} polling the queue`);

let stopping = false;
const stop = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  console.log(`[slackline] worker ${signal}: finishing the current run then stopping (Ctrl-C again to abandon it)`);
  process.once('SIGINT', () => void worker.stop(true).then(() => handle.close()).then(() => process.exit(0)));
  await worker.stop(false);
  await handle.close();
  process.exit(0);
};
process.on('SIGINT', () => void stop('SIGINT'));
process.on('SIGTERM', () => void stop('SIGTERM'));
