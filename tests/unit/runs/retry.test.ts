/** Retrying worker writes through a database outage, and the number of fit slots. */
import { describe, expect, it } from 'vitest';
import { isTransientDbError, retryDb } from '../../../server/runs/retry';
import { fitSlotsFromEnv } from '../../../server/runs/slots';

const refused = () => Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:3307'), { code: 'ECONNREFUSED' });

describe('transient database errors', () => {
  it('knows connection failures, also wrapped as Drizzle wraps them (the driver error as cause)', () => {
    expect(isTransientDbError(refused())).toBe(true);
    expect(isTransientDbError(new Error('Failed query: update …', { cause: refused() }))).toBe(true);
    expect(isTransientDbError(Object.assign(new Error('lost'), { code: 'PROTOCOL_CONNECTION_LOST' }))).toBe(true);
    expect(isTransientDbError(Object.assign(new Error('syntax'), { code: 'ER_PARSE_ERROR' }))).toBe(false);
    expect(isTransientDbError(new Error('plain'))).toBe(false);
  });
});

describe('retryDb', () => {
  it('retries transient failures with doubling pauses up to the cap, logging the outage once', async () => {
    const pauses: number[] = [];
    const logs: string[] = [];
    let calls = 0;
    const out = await retryDb(
      async () => {
        if (++calls < 6) throw refused();
        return 'stored';
      },
      { what: 'storing chain 1', log: (m) => logs.push(m), baseDelayMs: 100, maxDelayMs: 500, sleep: async (ms) => void pauses.push(ms) },
    );
    expect(out).toBe('stored');
    expect(pauses).toEqual([100, 200, 400, 500, 500]);
    expect(logs).toHaveLength(2);
    expect(logs[0]).toMatch(/storing chain 1: database unavailable \(ECONNREFUSED/);
    expect(logs[1]).toMatch(/succeeded after 5 failed attempt/);
  });

  it('throws other errors at once, and transient ones when told to give up', async () => {
    let calls = 0;
    const bad = Object.assign(new Error('Data too long'), { code: 'ER_DATA_TOO_LONG' });
    await expect(retryDb(async () => { calls++; throw bad; }, { what: 'x', log: () => {}, sleep: async () => {} })).rejects.toBe(bad);
    expect(calls).toBe(1);
    let n = 0;
    await expect(retryDb(async () => { n++; throw refused(); }, { what: 'x', log: () => {}, sleep: async () => {}, giveUp: () => n >= 3 })).rejects.toMatchObject({ code: 'ECONNREFUSED' });
    expect(n).toBe(3);
  });
});

describe('fit slots', () => {
  it('cores minus one, at least one; FIT_SLOTS overrides; nonsense is refused', () => {
    expect(fitSlotsFromEnv({}, 8)).toBe(7);
    expect(fitSlotsFromEnv({}, 2)).toBe(1);
    expect(fitSlotsFromEnv({}, 1)).toBe(1);
    expect(fitSlotsFromEnv({ FIT_SLOTS: '3' }, 2)).toBe(3);
    expect(() => fitSlotsFromEnv({ FIT_SLOTS: '0' }, 2)).toThrow(/FIT_SLOTS/);
    expect(() => fitSlotsFromEnv({ FIT_SLOTS: 'many' }, 2)).toThrow(/FIT_SLOTS/);
  });
});
