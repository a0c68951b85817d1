/**
 * Work that must not delay (or show in the timing of) an answer: it starts once the response has
 * been handed to the network, and its failures go to the log only.
 */
import type { Response } from 'express';
import type { AppContext } from '../context';

const pending = new Set<Promise<void>>();

export function afterResponse(res: Response, work: () => Promise<void>, ctx: AppContext, what: string): void {
  let started = false;
  const start = () => {
    if (started) return;
    started = true;
    const done = new Promise<void>((resolve) => setImmediate(resolve))
      .then(work)
      .catch((err: unknown) => {
        if (ctx.config.logErrors) console.error(`[slackline] ${what} failed:`, err);
      })
      .finally(() => pending.delete(done));
    pending.add(done);
  };
  // 'finish': the answer was written out; 'close' covers a client that went away first.
  res.once('finish', start);
  res.once('close', start);
}

/** Resolves when every piece of after-response work started so far has ended (tests, shutdown). */
export async function afterResponseSettled(): Promise<void> {
  while (pending.size > 0) await Promise.allSettled([...pending]);
}
