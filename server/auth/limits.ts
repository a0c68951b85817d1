/**
 * Failure budgets keyed by account (the submitted e-mail address), on the injected clock.
 *
 * Sign-in counts failed attempts per submitted address, whether or not an account has it (so the
 * lock itself reveals nothing). Past the budget, sign-in for that address is refused for the rest
 * of the window without checking the password: a correct guess must not be told apart from a
 * wrong one, or the lock would not stop guessing. A successful sign-in clears the count; a
 * completed password reset clears the lock, so the owner always has a way in.
 *
 * Kept in memory: one HTTP process serves the API (run workers serve none); a restart starts
 * fresh budgets, which the per-address limiter and argon2id's cost still bound.
 */
import type { Clock } from '../lib/clock';

export class FailureBudget {
  private readonly entries = new Map<string, { count: number; since: number }>();

  constructor(
    private readonly clock: Clock,
    private readonly windowMs: () => number,
    private readonly limit: () => number,
  ) {}

  private live(key: string) {
    const e = this.entries.get(key);
    if (!e) return undefined;
    if (this.clock.now().getTime() - e.since >= this.windowMs()) {
      this.entries.delete(key);
      return undefined;
    }
    return e;
  }

  /** True when the key has used its whole budget in the current window. */
  exhausted(key: string): boolean {
    return (this.live(key)?.count ?? 0) >= this.limit();
  }

  /** Count one failure. */
  fail(key: string): void {
    const e = this.live(key);
    if (e) e.count += 1;
    else this.entries.set(key, { count: 1, since: this.clock.now().getTime() });
    if (this.entries.size > 50_000) this.prune();
  }

  clear(key: string): void {
    this.entries.delete(key);
  }

  private prune(): void {
    for (const key of [...this.entries.keys()]) this.live(key);
  }
}
