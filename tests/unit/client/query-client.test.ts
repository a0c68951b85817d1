import { describe, expect, it, vi } from 'vitest';
import { ApiError } from '@/lib/api-client';
import { makeQueryClient, shouldRetry } from '@/lib/query-client';
import { queryKeys } from '@/lib/query-keys';

describe('query client', () => {
  it('retries network trouble and 5xx at most twice, never 4xx', () => {
    expect(shouldRetry(0, new ApiError(0, 'network', 'x'))).toBe(true);
    expect(shouldRetry(1, new ApiError(503, 'service_unavailable', 'x'))).toBe(true);
    expect(shouldRetry(2, new ApiError(503, 'service_unavailable', 'x'))).toBe(false);
    expect(shouldRetry(0, new ApiError(404, 'not_found', 'x'))).toBe(false);
    expect(shouldRetry(0, new Error('boom'))).toBe(false);
  });

  it('reports a lost session once and forgets the signed-in user', async () => {
    const onSessionLost = vi.fn();
    const qc = makeQueryClient({ onSessionLost });
    qc.setQueryData(queryKeys.me, { id: 'u1', email: 'a@x.test', name: 'A', createdAt: '2026-12-01T00:00:00Z' });
    const lost = () => Promise.reject(new ApiError(401, 'unauthenticated', 'Please sign in.'));
    await qc.fetchQuery({ queryKey: ['a'], queryFn: lost, retry: false }).catch(() => {});
    await qc.fetchQuery({ queryKey: ['b'], queryFn: lost, retry: false }).catch(() => {});
    expect(onSessionLost).toHaveBeenCalledOnce();
    expect(qc.getQueryData(queryKeys.me)).toBeNull();
  });

  it('does not treat a wrong password as a lost session', async () => {
    const onSessionLost = vi.fn();
    const qc = makeQueryClient({ onSessionLost });
    // nobody known yet, so only the error code keeps this from counting as a lost session
    const m = qc.getMutationCache().build(qc, {
      mutationFn: () => Promise.reject(new ApiError(401, 'invalid_credentials', 'Wrong e-mail or password')),
    });
    await m.execute(undefined).catch(() => {});
    expect(onSessionLost).not.toHaveBeenCalled();
  });
});
