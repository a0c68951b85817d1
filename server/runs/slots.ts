/** How many fits a worker process runs at once: FIT_SLOTS, else the cores minus one (at least one). */
import os from 'node:os';

export function fitSlotsFromEnv(env: NodeJS.ProcessEnv = process.env, cores = os.availableParallelism()): number {
  const raw = env.FIT_SLOTS?.trim();
  if (raw) {
    const n = Number(raw);
    if (!Number.isInteger(n) || n < 1 || n > 256) throw new Error(`FIT_SLOTS must be a whole number from 1 to 256 (got "${raw}")`);
    return n;
  }
  return Math.max(1, cores - 1);
}
