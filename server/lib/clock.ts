/** Time source, injected so tests can move time (expiry of tokens and links). */
export interface Clock {
  now(): Date;
}
export const systemClock: Clock = { now: () => new Date() };

/**
 * A clock tests can move. By default it ticks with real time from its start value, so ordering
 * by time still works; `advance(ms)` jumps ahead (or back), `set(date)` jumps to a moment.
 * With `{ frozen: true }` it stands still except when moved.
 */
export class ManualClock implements Clock {
  private base: number;
  private realStart = Date.now();
  private readonly frozen: boolean;

  constructor(start: Date | number = Date.now(), opts: { frozen?: boolean } = {}) {
    this.base = typeof start === 'number' ? start : start.getTime();
    this.frozen = opts.frozen ?? false;
  }
  now(): Date {
    return new Date(this.base + (this.frozen ? 0 : Date.now() - this.realStart));
  }
  advance(ms: number): void {
    this.base += ms;
  }
  set(date: Date | number): void {
    this.base = typeof date === 'number' ? date : date.getTime();
    this.realStart = Date.now();
  }
}
