/**
 * Work that must not delay (or show in the timing of) an answer: it starts once the response has
 * been handed to the network, and its failures go to the log only.
 */
import type { Response } from 'express';
import type { AppContext } from '../context';

export function afterResponse(res: Response, work: () => Promise<void>, ctx: AppContext, what: string): void {
  let started = false;
  const start = () => {
    if (started) return;
    started = true;
    setImmediate(() => {
      work().catch((err: unknown) => {
        if (ctx.config.logErrors) console.error(`[slackline] ${what} failed:`, err);
      });
    });
  };
  // 'finish': the answer was written out; 'close' covers a client that went away first.
  res.once('finish', start);
  res.once('close', start);
}
