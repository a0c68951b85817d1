/**
 * A run worker: claims runs from the database one at a time and fits them with the engine's
 * runFit. Several workers (in several processes or hosts) can share one database. Each chain is
 * stored as soon as it finishes; a run claimed again after a lost lease resumes from its stored
 * chains and runs only the missing ones (same seed, so the same draws as an uninterrupted fit).
 */
import os from 'node:os';
import { and, eq, inArray } from 'drizzle-orm';
import { fitSettingsSchema, type FitProgress } from '../../shared/fit';
import { RUN_LIMITS } from '../../shared/api/notebook';
import type { Db } from '../db/client';
import { datasets } from '../db/schema';
import { runFit } from '../engine/fit';
import { preparedFor } from '../engine/fit-worker';
import type { TargetSpec } from '../engine/types';
import type { Clock } from '../lib/clock';
import { systemClock } from '../lib/clock';
import { newId } from '../lib/ids';
import { toDataTables } from '../notebook/datasets';
import { claimRun, failRun, finishRun, heartbeat, storeChain, storedChains, writeProgress, type DrawNames, type RunRow, type RunSpec } from './queue';

export interface WorkerOptions {
  db: Db;
  clock?: Clock;
  workerId?: string;
  /** Lease length; a worker silent this long loses its run to another worker. */
  leaseMs?: number;
  heartbeatMs?: number;
  /** Pause between polls when the queue is empty. */
  pollMs?: number;
  /** Progress writes at most this often. */
  progressMs?: number;
  /** Run chains on worker threads (the engine's default) or in-process. */
  parallel?: boolean;
  wallSeconds?: number;
  log?: (msg: string) => void;
}

export class RunWorker {
  readonly id: string;
  private readonly db: Db;
  private readonly clock: Clock;
  private readonly leaseMs: number;
  private readonly heartbeatMs: number;
  private readonly pollMs: number;
  private readonly progressMs: number;
  private readonly parallel: boolean;
  private readonly wallSeconds: number;
  private readonly log: (msg: string) => void;
  private stopping = false;
  private loop: Promise<void> | null = null;
  private wake: (() => void) | null = null;
  private current: AbortController | null = null;

  constructor(o: WorkerOptions) {
    this.db = o.db;
    this.clock = o.clock ?? systemClock;
    this.id = o.workerId ?? `${os.hostname()}:${process.pid}:${newId().slice(0, 6)}`;
    this.leaseMs = o.leaseMs ?? 30_000;
    this.heartbeatMs = o.heartbeatMs ?? 5_000;
    this.pollMs = o.pollMs ?? 1_000;
    this.progressMs = o.progressMs ?? 750;
    this.parallel = o.parallel ?? true;
    this.wallSeconds = o.wallSeconds ?? RUN_LIMITS.wallSeconds;
    this.log = o.log ?? ((m) => console.log(`[slackline worker ${this.id}] ${m}`));
  }

  start(): void {
    if (this.loop) return;
    this.stopping = false;
    this.loop = (async () => {
      while (!this.stopping) {
        let worked = false;
        try {
          worked = await this.runOnce();
        } catch (e) {
          this.log(`error: ${(e as Error).message}`);
        }
        if (!worked && !this.stopping) await new Promise<void>((r) => {
          const t = setTimeout(r, this.pollMs);
          this.wake = () => {
            clearTimeout(t);
            r();
          };
        });
      }
    })();
  }

  /** Stop after the current run (which is abandoned to its lease if `abandon`). */
  async stop(abandon = false): Promise<void> {
    this.stopping = true;
    if (abandon) this.current?.abort();
    this.wake?.();
    await this.loop;
    this.loop = null;
  }

  /** Claim and process one run. Returns false when the queue had nothing claimable. */
  async runOnce(): Promise<boolean> {
    const run = await claimRun(this.db, this.id, this.clock.now(), this.leaseMs);
    if (!run) return false;
    await this.process(run);
    return true;
  }

  private async process(run: RunRow): Promise<void> {
    const started = performance.now();
    const ac = new AbortController();
    this.current = ac;
    let why: 'lost' | 'wall' | null = null;
    const progress = new Map<number, FitProgress>();
    let chainWrites: Promise<void> = Promise.resolve();
    let lastWrite = 0;
    let writing = false;
    const flush = async (force = false) => {
      const now = Date.now();
      if (writing || (!force && now - lastWrite < this.progressMs)) return;
      writing = true;
      lastWrite = now;
      try {
        await writeProgress(this.db, run.id, this.id, [...progress.values()].sort((a, b) => a.chain - b.chain));
      } finally {
        writing = false;
      }
    };
    const beat = setInterval(() => {
      heartbeat(this.db, run.id, this.id, this.clock.now(), this.leaseMs)
        .then((ok) => {
          if (!ok && !ac.signal.aborted) {
            why = 'lost';
            ac.abort();
          }
        })
        .catch(() => undefined);
    }, this.heartbeatMs);
    const wall = setTimeout(() => {
      why = 'wall';
      ac.abort();
    }, this.wallSeconds * 1000);
    try {
      const spec = run.spec as RunSpec;
      const settings = fitSettingsSchema.parse(run.settings);
      const ids = Object.values(spec.tables);
      const rows = ids.length ? await this.db.select().from(datasets).where(and(eq(datasets.workspaceId, run.workspaceId), inArray(datasets.id, ids))) : [];
      const byId = new Map(rows.map((d) => [d.id, d]));
      const missing = Object.entries(spec.tables).filter(([, id]) => !byId.has(id)).map(([name]) => name);
      if (missing.length) throw new Error(`The data of table ${missing.map((m) => `"${m}"`).join(', ')} was deleted before the fit ran.`);
      const tables = toDataTables(Object.entries(spec.tables).map(([name, id]) => ({ ...byId.get(id)!, name })));
      const target: TargetSpec = { kind: 'program', source: spec.source, tables };
      // The column names every stored chain carries (the engine caches the prepared target).
      const prepared = (await preparedFor(target)).target;
      const names: DrawNames = { unknownNames: prepared.names.slice(), derivedNames: prepared.derived?.names.slice() ?? [] };
      const resume = await storedChains(this.db, run);
      const total = settings.warmup + settings.draws;
      for (const c of resume) progress.set(c.chain, { chain: c.chain + 1, phase: 'done', iteration: total, total, itersPerSecond: 0 });
      if (resume.length) this.log(`run ${run.id}: resuming with ${resume.length} stored chain(s)`);
      const tLoad = performance.now();
      const result = await runFit(target, settings, {
        signal: ac.signal,
        parallel: this.parallel,
        resume,
        onProgress: (p) => {
          // The engine numbers chains from 0 in progress; the API shows them from 1.
          progress.set(p.chain, { ...p, chain: p.chain + 1 });
          void flush();
        },
        onChainDone: (ch) => {
          this.log(`run ${run.id}: chain ${ch.chain + 1} finished`);
          // One write at a time, in order; finishRun stores any chain whose write failed.
          chainWrites = chainWrites
            .then(async () => {
              if (!(await storeChain(this.db, run, this.id, names, ch, this.clock.now())) && !ac.signal.aborted) {
                why = 'lost';
                ac.abort();
              }
            })
            .catch((e: unknown) => this.log(`run ${run.id}: storing chain ${ch.chain + 1} failed: ${(e as Error).message}`));
        },
      });
      await chainWrites;
      const tFit = performance.now();
      const ok = await finishRun(this.db, run, this.id, result, this.clock.now(), {
        load: Math.round(tLoad - started),
        fit: Math.round(tFit - tLoad),
        total: Math.round(performance.now() - started),
      });
      this.log(ok ? `run ${run.id} done in ${((performance.now() - started) / 1000).toFixed(1)} s` : `run ${run.id} finished but its lease was lost; result discarded`);
    } catch (e) {
      if (why === 'lost') this.log(`run ${run.id} stopped: cancelled or lease lost`);
      else if (why === 'wall') await failRun(this.db, run.id, this.id, `The fit ran longer than the limit of ${this.wallSeconds} s and was stopped. Try fewer draws or chains.`, this.clock.now());
      else if (ac.signal.aborted) this.log(`run ${run.id} abandoned`);
      else {
        const message = e instanceof Error ? e.message : String(e);
        await failRun(this.db, run.id, this.id, message, this.clock.now());
        this.log(`run ${run.id} failed: ${message}`);
      }
    } finally {
      // A chain write still under way ends before the run is let go (it is fenced either way).
      await chainWrites;
      clearInterval(beat);
      clearTimeout(wall);
      this.current = null;
    }
  }
}
