/**
 * Run progress by server-sent events: a member's stream tells a queued fit's place, then its
 * per-chain progress, then the finished run with its summary; a share-link reader's stream tells
 * only finished runs; outsiders are refused as for the notebook. The stream format is the
 * text/event-stream of the HTML standard's server-sent events ("event:" and "data:" lines, a
 * blank line ending each event).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunWorker } from '../../../server/runs/worker';
import { runEventsData, type RunEventsData } from '../../../shared/api/notebook-page';
import type { TestClient } from '../../helpers/http';
import { notebookWorld, type NotebookWorld } from './setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(() => w.server.close());

/** Read events from a stream until `until` holds for the runs seen so far (or 60 s pass). */
async function readEvents(client: TestClient, path: string, until: (all: RunEventsData[]) => boolean): Promise<RunEventsData[]> {
  const ac = new AbortController();
  const res = await fetch(`${w.server.url}${path}`, { headers: { cookie: client.cookieHeader, accept: 'text/event-stream' }, signal: ac.signal });
  expect(res.status).toBe(200);
  expect(res.headers.get('content-type')).toMatch(/^text\/event-stream/);
  const reader = res.body!.getReader();
  const dec = new TextDecoder();
  let buf = '';
  const out: RunEventsData[] = [];
  const deadline = Date.now() + 60_000;
  try {
    while (!until(out)) {
      if (Date.now() > deadline) throw new Error(`no such events within 60 s: ${JSON.stringify(out).slice(0, 500)}`);
      const { value, done } = await reader.read();
      if (done) break;
      buf += dec.decode(value, { stream: true });
      let end: number;
      while ((end = buf.indexOf('\n\n')) >= 0) {
        const block = buf.slice(0, end);
        buf = buf.slice(end + 2);
        const lines = block.split('\n');
        if (lines[0] !== 'event: runs') continue; // keep-alive comments
        out.push(runEventsData.parse(JSON.parse(lines.filter((l) => l.startsWith('data: ')).map((l) => l.slice(6)).join('\n'))));
      }
    }
  } finally {
    ac.abort();
  }
  return out;
}

describe('run events', () => {
  it('push queue place, chain progress and the finished run to members; finished runs only to share-link readers', async () => {
    const model = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source: 'unknown a\nterm ld_normal(a, 0, 1)\nconstrain a >= 0\n' })).body.cell;
    // RHMC: a few seconds per chain, so the notebook's poller (about once a second) sees it running
    // (at 2,000 + 5,000 iterations a chain could finish before the first progress event).
    const settings = { chains: 2, warmup: 2000, draws: 20000, seed: 9, sampler: 'rhmc' };
    const fit = (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings } })).body.cell;
    const queued = await w.editor.post(`${w.base}/cells/${fit.id}/runs`, {});
    expect(queued.status).toBe(201);
    const runId: string = queued.body.run.id;

    const link = await w.owner.post(`${w.base}/share-links`, {});
    expect(link.status).toBe(201);
    const token: string = link.body.token;

    // The first event tells the queued run and its place.
    const [first] = await readEvents(w.viewer, `${w.base}/events`, (all) => all.length >= 1);
    expect(first.runs.map((r) => [r.id, r.status, r.queuePosition])).toEqual([[runId, 'queued', 1]]);
    // Share-link readers: nothing unfinished.
    const [shareFirst] = await readEvents(w.viewer, `/api/share/${token}/events`, (all) => all.length >= 1);
    expect(shareFirst.runs).toEqual([]);

    const worker = new RunWorker({ db: w.server.db.db, slots: 1, pollMs: 50, progressMs: 100, heartbeatMs: 500, log: () => {} });
    const streaming = readEvents(w.viewer, `${w.base}/events`, (all) => all.some((e) => e.runs.some((r) => r.id === runId && r.status === 'done')));
    const shareStreaming = readEvents(w.outsider, `/api/share/${token}/events`, (all) => all.some((e) => e.runs.some((r) => r.id === runId)));
    worker.start();
    const events = await streaming;
    const shareEvents = await shareStreaming;
    await worker.stop();
    const mine = events.flatMap((e) => e.runs.filter((r) => r.id === runId));
    // Running with per-chain progress before the end, then done with its summary.
    expect(mine.some((r) => r.status === 'running' && r.progress.length > 0 && r.progress.every((p) => p.total === 22000)), JSON.stringify(mine.map((r) => [r.status, r.progress]))).toBe(true);
    const done = mine[mine.length - 1];
    expect(done.status).toBe('done');
    expect(done.summary?.quantities[0].name).toBe('a');
    expect(done).toEqual((await w.viewer.get(`/api/workspaces/${w.ws}/runs/${runId}`)).body.run);
    // The share-link reader saw the run only once it was done.
    expect(shareEvents.flatMap((e) => e.runs).map((r) => r.status)).toEqual(['done']);

    expect((await w.outsider.get(`${w.base}/events?once=1`)).status).toBe(404);
  });
});
