/**
 * Run events of notebooks, pushed to subscribers as server-sent events. One poller per notebook
 * (however many pages have it open) reads the notebook's live runs about once a second — the runs
 * queued or running, and those that ended since the last look — and sends each subscriber the runs
 * whose view changed. Only database reads happen here; nothing is computed on the main thread
 * beyond comparing small JSON texts.
 */
import type { Response } from 'express';
import { and, eq, gte, inArray, or, desc } from 'drizzle-orm';
import type { Run } from '../../shared/api/notebook';
import type { Db } from '../db/client';
import { runs, users } from '../db/schema';
import type { Clock } from '../lib/clock';
import { withSummaries } from './read';
import { isCompareSpec } from './compare-job';

export interface RunEventsOptions {
  db: Db;
  clock: Clock;
  pollMs?: number;
  /** A comment line this often keeps proxies from closing an idle stream. */
  keepAliveMs?: number;
}

/** The runs of a notebook worth telling about now: active ones, and those that ended since `since`. */
export async function liveNotebookRuns(db: Db, workspaceId: string, notebookId: string, since: Date, now: Date): Promise<Run[]> {
  const rows = await db
    .select({ r: runs, name: users.name })
    .from(runs)
    .leftJoin(users, eq(users.id, runs.requestedBy))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.notebookId, notebookId), or(inArray(runs.status, ['queued', 'running']), gte(runs.finishedAt, since))))
    .orderBy(desc(runs.createdAt), desc(runs.id))
    .limit(200);
  // Fits only: a compare cell follows its comparisons through its own list (compare-job.ts).
  return withSummaries(db, rows.filter((x) => !isCompareSpec(x.r.spec)), now);
}

interface Subscriber {
  res: Response;
  /** Share-link readers see finished runs only. */
  doneOnly: boolean;
  sent: Map<string, string>;
}

interface Poller {
  subs: Set<Subscriber>;
  timer: NodeJS.Timeout;
  since: Date;
  busy: boolean;
}

export class RunEventHub {
  private pollers = new Map<string, Poller>();
  private readonly pollMs: number;
  private readonly keepAliveMs: number;

  constructor(private readonly o: RunEventsOptions) {
    this.pollMs = o.pollMs ?? 1_000;
    this.keepAliveMs = o.keepAliveMs ?? 15_000;
  }

  /** Hold `res` open as an event stream of the notebook's runs until the client goes away. */
  async subscribe(res: Response, workspaceId: string, notebookId: string, opts: { doneOnly: boolean; once: boolean }): Promise<void> {
    res.status(200);
    res.setHeader('Content-Type', 'text/event-stream; charset=utf-8');
    res.setHeader('Cache-Control', 'no-cache, no-transform');
    res.setHeader('X-Accel-Buffering', 'no');
    const sub: Subscriber = { res, doneOnly: opts.doneOnly, sent: new Map() };
    // The first event: the notebook's live runs now (and those that ended in the last minute).
    const now = this.o.clock.now();
    const first = await liveNotebookRuns(this.o.db, workspaceId, notebookId, new Date(now.getTime() - 60_000), now);
    this.send(sub, first, true);
    if (opts.once) {
      res.end();
      return;
    }
    res.flushHeaders?.();
    const key = `${workspaceId}/${notebookId}`;
    let p = this.pollers.get(key);
    if (!p) {
      const poller: Poller = { subs: new Set(), since: now, busy: false, timer: setInterval(() => void this.tick(key, workspaceId, notebookId), this.pollMs) };
      poller.timer.unref();
      this.pollers.set(key, poller);
      p = poller;
    }
    p.subs.add(sub);
    const alive = setInterval(() => res.write(': keep-alive\n\n'), this.keepAliveMs);
    alive.unref();
    res.on('close', () => {
      clearInterval(alive);
      const q = this.pollers.get(key);
      if (!q) return;
      q.subs.delete(sub);
      if (q.subs.size === 0) {
        clearInterval(q.timer);
        this.pollers.delete(key);
      }
    });
  }

  private async tick(key: string, workspaceId: string, notebookId: string): Promise<void> {
    const p = this.pollers.get(key);
    if (!p || p.busy) return;
    p.busy = true;
    try {
      const now = this.o.clock.now();
      // Runs that ended since the previous look (a little overlap: finished_at is the worker's clock).
      const list = await liveNotebookRuns(this.o.db, workspaceId, notebookId, new Date(p.since.getTime() - 5_000), now);
      p.since = now;
      for (const s of p.subs) this.send(s, list, false);
    } catch {
      // The database is away: the next tick tries again; clients keep their last state.
    } finally {
      p.busy = false;
    }
  }

  private send(sub: Subscriber, list: Run[], always: boolean): void {
    const changed = list.filter((r) => (!sub.doneOnly || r.status === 'done') && sub.sent.get(r.id) !== JSON.stringify(r));
    for (const r of changed) sub.sent.set(r.id, JSON.stringify(r));
    if (changed.length === 0 && !always) return;
    sub.res.write(`event: runs\ndata: ${JSON.stringify({ runs: changed })}\n\n`);
  }

  close(): void {
    for (const p of this.pollers.values()) {
      clearInterval(p.timer);
      for (const s of p.subs) s.res.end();
    }
    this.pollers.clear();
  }
}
