import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApiServer, type TestServer } from '../helpers/server';
import { createApp } from '../../server/app';
import { defaultConfig } from '../../server/config';
import { systemClock } from '../../server/lib/clock';
import type { AddressInfo } from 'node:net';

describe('GET /api/health', () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await startApiServer();
  });
  afterAll(() => server.close());

  it('answers 200 with the database up', async () => {
    const res = await server.client().get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok', database: 'up' });
  });

  it('answers 503 when the database does not answer', async () => {
    const app = createApp({
      db: server.db.db,
      mailer: { send: async () => undefined, close: () => undefined },
      clock: systemClock,
      config: defaultConfig({ logErrors: false }),
      pingDb: async () => false,
    });
    const s = app.listen(0, '127.0.0.1');
    await new Promise((r) => s.once('listening', r));
    try {
      const res = await fetch(`http://127.0.0.1:${(s.address() as AddressInfo).port}/api/health`);
      expect(res.status).toBe(503);
      expect(await res.json()).toEqual({ status: 'degraded', database: 'down' });
    } finally {
      s.close();
    }
  });
});
