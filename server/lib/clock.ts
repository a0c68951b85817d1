/** Time source, injected so tests can move time (expiry of tokens and links). */
export interface Clock {
  now(): Date;
}
export const systemClock: Clock = { now: () => new Date() };

/** A clock tests can set and advance. */
export class ManualClock implements Clock {
  private t: number;
  constructor(start: Date | number = Date.now()) {
    this.t = typeof start === 'number' ? start : start.getTime();
  }
  now(): Date {
    return new Date(this.t);
  }
  advance(ms: number): void {
    this.t += ms;
  }
  set(date: Date | number): void {
    this.t = typeof date === 'number' ? date : date.getTime();
  }
}
