/**
 * Retrying database writes through an outage. A worker's writes (progress, heartbeat, chain store,
 * finish) go through `retryDb`: errors that mean "the database is not reachable right now" are
 * retried with capped exponential backoff; any other error (a bad query, a row too large) is
 * thrown at once, since repeating it would fail the same way.
 */

import { isTransientDbError } from '../db/errors';

export { isTransientDbError };

export interface RetryOptions {
  /** Named in the log lines, e.g. "storing chain 2 of run x". */
  what: string;
  log: (msg: string) => void;
  /** Checked before every new attempt: true ends the retries with the last error. */
  giveUp?: () => boolean;
  /** First pause, doubled after every failure up to `maxDelayMs`. */
  baseDelayMs?: number;
  maxDelayMs?: number;
  /** Stop after this many attempts (default: until it succeeds or giveUp()). */
  maxAttempts?: number;
  sleep?: (ms: number) => Promise<void>;
}

const defaultSleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

/**
 * Run `fn` until it succeeds, retrying transient database errors with backoff (one log line when
 * the outage starts and one when it ends, not one per attempt).
 */
export async function retryDb<T>(fn: () => Promise<T>, o: RetryOptions): Promise<T> {
  const base = o.baseDelayMs ?? 200;
  const max = o.maxDelayMs ?? 5_000;
  const sleep = o.sleep ?? defaultSleep;
  let delay = base;
  let failures = 0;
  for (;;) {
    try {
      const out = await fn();
      if (failures > 0) o.log(`${o.what}: succeeded after ${failures} failed attempt(s)`);
      return out;
    } catch (e) {
      if (!isTransientDbError(e)) throw e;
      failures++;
      if (failures === 1) o.log(`${o.what}: database unavailable (${describe(e)}); retrying`);
      if ((o.maxAttempts !== undefined && failures >= o.maxAttempts) || o.giveUp?.()) throw e;
      await sleep(delay);
      delay = Math.min(max, delay * 2);
      if (o.giveUp?.()) throw e;
    }
  }
}

/** The driver's code and message, through Drizzle's wrapper. */
export function describe(err: unknown): string {
  let e: unknown = err;
  while ((e as { cause?: unknown })?.cause) e = (e as { cause?: unknown }).cause;
  const code = (e as { code?: unknown })?.code;
  const msg = (e as { message?: unknown })?.message;
  return [typeof code === 'string' ? code : null, typeof msg === 'string' ? msg.split('\n')[0].slice(0, 200) : String(e)].filter(Boolean).join(': ');
}
