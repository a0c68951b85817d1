/**
 * A run worker: fit slots that claim runs from the database and fit them with the engine's runFit.
 * Several workers (in several processes or hosts) can share one database. Each chain is stored as
 * soon as it finishes; a run claimed again after a lost lease resumes from its stored chains and
 * runs only the missing ones (same seed, so the same draws as an uninterrupted fit).
 *
 * Database outages: every write (progress, heartbeat, chain store, finish, fail) retries
 * transient errors with backoff (retry.ts), so a restart of MariaDB under a fit delays its writes
 * but loses nothing; a heartbeat the database answers with "not yours" (lease taken over or run
 * cancelled) stops the fit. Nothing here rejects unhandled.
 *
 * Slots: `slots` loops each hold at most one run; a run's chains share the engine's thread pool.
 * At the time limit the chains that finished are kept and the run is done and marked partial.
 */
import os from 'node:os';
import { and, eq, inArray } from 'drizzle-orm';
import { fitSettingsSchema, type FitProgress, type FitSettings } from '../../shared/fit';
import { RUN_HEARTBEAT, RUN_LIMITS } from '../../shared/api/notebook';
import type { Db } from '../db/client';
import { datasets } from '../db/schema';
import { runFit } from '../engine/fit';
import { preparedFor } from '../engine/fit-worker';
import type { ChainResult, TargetSpec } from '../engine/types';
import type { Clock } from '../lib/clock';
import { systemClock } from '../lib/clock';
import { newId } from '../lib/ids';
import { datasetMetaColumns, loadDataTables } from '../notebook/datasets';
import { claimRun, failRun, finishRun, heartbeat, storeChain, storedChains, writeProgress, type DrawNames, type EncodedChain, type RunRow } from './queue';
import { computePool } from '../compute/pool';
import { describe, isTransientDbError, retryDb } from './retry';
import { isCompareSpec, runCompareJob } from './compare-job';
import { computeRunChecks } from './checks';

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
  /** Runs fitted at once by this worker (default 1). */
  slots?: number;
  /** Longest pause between retries of a write while the database is unreachable. */
  maxRetryDelayMs?: number;
  log?: (msg: string) => void;
}

/** Why a fit was stopped before it ended by itself. */
type StopReason = 'lost' | 'wall' | 'abandon';

export class RunWorker {
  readonly id: string;
  readonly slots: number;
  private readonly db: Db;
  private readonly clock: Clock;
  private readonly leaseMs: number;
  private readonly heartbeatMs: number;
  private readonly pollMs: number;
  private readonly progressMs: number;
  private readonly parallel: boolean;
  private readonly wallSeconds: number;
  private readonly maxRetryDelayMs: number;
  private readonly log: (msg: string) => void;
  private stopping = false;
  private abandoning = false;
  private loops: Promise<void>[] = [];
  private wakers = new Set<() => void>();
  private current = new Set<AbortController>();

  constructor(o: WorkerOptions) {
    this.db = o.db;
    this.clock = o.clock ?? systemClock;
    this.id = o.workerId ?? `${os.hostname()}:${process.pid}:${newId().slice(0, 6)}`;
    this.leaseMs = o.leaseMs ?? RUN_HEARTBEAT.leaseMs;
    this.heartbeatMs = o.heartbeatMs ?? RUN_HEARTBEAT.intervalMs;
    this.pollMs = o.pollMs ?? 1_000;
    this.progressMs = o.progressMs ?? 750;
    this.parallel = o.parallel ?? true;
    this.wallSeconds = o.wallSeconds ?? RUN_LIMITS.wallSeconds;
    this.slots = Math.max(1, Math.floor(o.slots ?? 1));
    this.maxRetryDelayMs = o.maxRetryDelayMs ?? 5_000;
    this.log = o.log ?? ((m) => console.log(`[slackline worker ${this.id}] ${m}`));
  }

  start(): void {
    if (this.loops.length) return;
    this.stopping = false;
    this.abandoning = false;
    for (let s = 0; s < this.slots; s++) this.loops.push(this.slotLoop(s));
  }

  private async slotLoop(slot: number): Promise<void> {
    let idleDelay = this.pollMs;
    while (!this.stopping) {
      let worked = false;
      try {
        worked = await this.runOnce(slot);
        idleDelay = this.pollMs;
      } catch (e) {
        // A claim that failed (database down): wait longer each time, up to the retry cap.
        if (isTransientDbError(e)) {
          if (idleDelay === this.pollMs) this.log(`slot ${slot + 1}: cannot reach the database (${describe(e)}); polling more slowly until it answers`);
          idleDelay = Math.min(Math.max(this.pollMs, this.maxRetryDelayMs), idleDelay * 2);
        } else this.log(`slot ${slot + 1} error: ${describe(e)}`);
      }
      if (!worked && !this.stopping) {
        await new Promise<void>((r) => {
          const t = setTimeout(done, idleDelay);
          function done() {
            clearTimeout(t);
            r();
          }
          this.wakers.add(done);
        });
        this.wakers.clear();
      }
    }
  }

  /** Stop after the current runs (which are abandoned to their leases if `abandon`). */
  async stop(abandon = false): Promise<void> {
    this.stopping = true;
    if (abandon) {
      this.abandoning = true;
      for (const ac of this.current) ac.abort();
    }
    for (const w of this.wakers) w();
    await Promise.all(this.loops);
    this.loops = [];
  }

  /** Claim and process one run. Returns false when the queue had nothing claimable. */
  async runOnce(slot = 0): Promise<boolean> {
    const run = await claimRun(this.db, this.id, this.clock.now(), this.leaseMs);
    if (!run) return false;
    this.log(`slot ${slot + 1}: claimed run ${run.id} (attempt ${run.attempts})`);
    await this.process(run);
    return true;
  }

  /** A write retried through database outages until it succeeds, or the worker abandons its runs. */
  private write<T>(what: string, fn: () => Promise<T>, giveUp?: () => boolean): Promise<T> {
    return retryDb(fn, { what, log: this.log, maxDelayMs: this.maxRetryDelayMs, giveUp: () => this.abandoning || (giveUp?.() ?? false) });
  }

  private async process(run: RunRow): Promise<void> {
    const started = performance.now();
    const ac = new AbortController();
    this.current.add(ac);
    let why: StopReason | null = null;
    const stopFit = (reason: StopReason) => {
      if (ac.signal.aborted) return;
      why = reason;
      ac.abort();
    };
    const onAbandon = () => {
      if (this.abandoning) why ??= 'abandon';
    };
    ac.signal.addEventListener('abort', onAbandon);

    // Progress: the newest values are written at most every progressMs, one write at a time; a
    // write that fails (database down) is simply superseded by the next one.
    const progress = new Map<number, FitProgress>();
    let lastWrite = 0;
    let writing = false;
    let progressFailing = false;
    const flush = (force = false) => {
      const now = Date.now();
      if (writing || (!force && now - lastWrite < this.progressMs)) return;
      writing = true;
      lastWrite = now;
      writeProgress(this.db, run.id, this.id, [...progress.values()].sort((a, b) => a.chain - b.chain))
        .then(() => {
          if (progressFailing) this.log(`run ${run.id}: progress writes work again`);
          progressFailing = false;
        })
        .catch((e: unknown) => {
          if (!progressFailing) this.log(`run ${run.id}: progress write failed (${describe(e)}); the next one will catch up`);
          progressFailing = true;
        })
        .finally(() => {
          writing = false;
        });
    };

    // Heartbeat: only a definite "not yours" from the database stops the fit; an unreachable
    // database is not a lost lease (the lease is fenced by owner, so it can be renewed on return
    // unless another worker took the run meanwhile).
    let beating = false;
    let beatFailing = false;
    const beat = setInterval(() => {
      if (beating) return;
      beating = true;
      heartbeat(this.db, run.id, this.id, this.clock.now(), this.leaseMs)
        .then((ok) => {
          if (beatFailing) this.log(`run ${run.id}: heartbeat answered again${ok ? '' : ' — the run is no longer ours'}`);
          beatFailing = false;
          if (!ok) stopFit('lost');
        })
        .catch((e: unknown) => {
          if (!beatFailing) this.log(`run ${run.id}: heartbeat failed (${describe(e)}); retrying every ${this.heartbeatMs} ms`);
          beatFailing = true;
        })
        .finally(() => {
          beating = false;
        });
    }, this.heartbeatMs);
    const wall = setTimeout(() => stopFit('wall'), this.wallSeconds * 1000);

    // Chains are stored one at a time, in order, each retried through outages.
    let chainWrites: Promise<void> = Promise.resolve();
    const storedOk = new Set<number>();
    const finished = new Map<number, ChainResult>();
    let settings: FitSettings | null = null;
    let target: TargetSpec | null = null;
    let names: DrawNames | null = null;

    try {
      if (isCompareSpec(run.spec)) {
        await runCompareJob(
          { db: this.db, workerId: this.id, now: () => this.clock.now(), signal: ac.signal, progressMs: this.progressMs, write: (what, fn) => this.write(what, fn), log: this.log },
          run,
        );
        return;
      }
      const spec = run.spec;
      if (!spec) throw new Error(`Run ${run.id} was queued without its model and data`);
      settings = fitSettingsSchema.parse(run.settings);
      const ids = Object.values(spec.tables);
      const rows = ids.length
        ? await this.write(`loading the data of run ${run.id}`, () => this.db.select(datasetMetaColumns).from(datasets).where(and(eq(datasets.workspaceId, run.workspaceId), inArray(datasets.id, ids))))
        : [];
      const byId = new Map(rows.map((d) => [d.id, d]));
      const missing = Object.entries(spec.tables).filter(([, id]) => !byId.has(id)).map(([name]) => name);
      if (missing.length) throw new Error(`The data of table ${missing.map((m) => `"${m}"`).join(', ')} was deleted before the fit ran.`);
      const tables = await loadDataTables(this.db, Object.entries(spec.tables).map(([name, id]) => ({ ...byId.get(id)!, name })));
      // Before the data: the engine fits the program with its likelihood terms left out.
      target = { kind: 'program', source: spec.source, tables, ...(settings.priorOnly ? { priorOnly: true } : {}) };
      // The column names every stored chain carries (the engine caches the prepared target).
      const prepared = (await preparedFor(target)).target;
      const drawNames: DrawNames = { unknownNames: prepared.names.slice(), derivedNames: prepared.derived?.names.slice() ?? [] };
      names = drawNames;
      const resume = await this.write(`reading the stored chains of run ${run.id}`, () => storedChains(this.db, run));
      const total = settings.warmup + settings.draws;
      for (const c of resume) {
        progress.set(c.chain, { chain: c.chain + 1, phase: 'done', iteration: total, total, itersPerSecond: 0 });
        finished.set(c.chain, c);
        storedOk.add(c.chain);
      }
      if (resume.length) this.log(`run ${run.id}: resuming with ${resume.length} stored chain(s)`);
      const tLoad = performance.now();
      const result = await runFit(target, settings, {
        signal: ac.signal,
        parallel: this.parallel,
        // Summaries of millions of draws take seconds: off this process's event loop, which
        // keeps every slot's heartbeat and writes going.
        summaryOnWorker: true,
        // No cap per run: the engine's thread pool is shared by every slot of this process and
        // hands a freed thread to the chain that waited longest, so chains, not runs, take turns
        // on the cores.
        resume,
        onProgress: (p) => {
          // The engine numbers chains from 0 in progress; the API shows them from 1.
          progress.set(p.chain, { ...p, chain: p.chain + 1 });
          flush();
        },
        onChainDone: (ch) => {
          this.log(`run ${run.id}: chain ${ch.chain + 1} finished`);
          finished.set(ch.chain, ch);
          chainWrites = chainWrites.then(async () => this.storeOne(run, drawNames, await this.encoded(drawNames, ch), storedOk, stopFit));
        },
      });
      await chainWrites;
      const tFit = performance.now();
      // Model checks on the compute pool (a failure or the time limit is reported in the checks).
      const checks = await computeRunChecks(spec.source, tables, result, settings);
      const tChecks = performance.now();
      const ok = await this.write(`finishing run ${run.id}`, () =>
        finishRun(this.db, run, this.id, { ...result, summary: { ...result.summary, checks } }, this.clock.now(), {
          load: Math.round(tLoad - started),
          fit: Math.round(tFit - tLoad),
          checks: Math.round(tChecks - tFit),
          total: Math.round(performance.now() - started),
        }),
      );
      this.log(ok ? `run ${run.id} done in ${((performance.now() - started) / 1000).toFixed(1)} s` : `run ${run.id} finished but its lease was lost; result discarded`);
    } catch (e) {
      await chainWrites;
      await this.afterStop(run, e, why, { settings, target, names, finished, started });
    } finally {
      // A chain write still under way ends before the run is let go (it is fenced either way).
      await chainWrites;
      clearInterval(beat);
      clearTimeout(wall);
      ac.signal.removeEventListener('abort', onAbandon);
      this.current.delete(ac);
    }
  }

  /** A chain encoded on the compute pool (as the engine gave it if the pool fails: storeChain encodes it then). */
  private async encoded(names: DrawNames, ch: ChainResult): Promise<ChainResult | EncodedChain> {
    try {
      const enc = await computePool().run('encodeChain', { names, chain: ch }, { timeoutMs: 120_000 });
      const d = enc.draws as Uint8Array;
      return { ...enc, draws: Buffer.from(d.buffer, d.byteOffset, d.byteLength) };
    } catch (e) {
      this.log(`encoding chain ${ch.chain + 1} on the compute pool failed (${describe(e)}); encoding it here`);
      return ch;
    }
  }

  /** Store one finished chain, retrying through outages; a fenced-out write stops the fit. */
  private async storeOne(run: RunRow, names: DrawNames, ch: ChainResult | EncodedChain, storedOk: Set<number>, stopFit: (r: StopReason) => void): Promise<void> {
    try {
      const mine = await this.write(`storing chain ${ch.chain + 1} of run ${run.id}`, () => storeChain(this.db, run, this.id, names, ch, this.clock.now()));
      if (mine) storedOk.add(ch.chain);
      else stopFit('lost');
    } catch (e) {
      // Not a connection problem (or the worker is abandoning): finishRun stores what is missing.
      this.log(`run ${run.id}: storing chain ${ch.chain + 1} failed: ${describe(e)}`);
    }
  }

  /** The fit ended early: the time limit (keep finished chains), a lost lease, a shutdown or an error. */
  private async afterStop(
    run: RunRow,
    e: unknown,
    why: StopReason | null,
    s: { settings: FitSettings | null; target: TargetSpec | null; names: DrawNames | null; finished: Map<number, ChainResult>; started: number },
  ): Promise<void> {
    try {
      if (why === 'lost') {
        this.log(`run ${run.id} stopped: cancelled or lease lost`);
      } else if (why === 'abandon') {
        this.log(`run ${run.id} abandoned; another worker resumes it from its stored chains`);
      } else if (why === 'wall') {
        if (s.settings && s.target && s.finished.size > 0) await this.finishPartial(run, s.settings, s.target, [...s.finished.values()], s.started);
        else
          await this.write(`failing run ${run.id}`, () =>
            failRun(
              this.db, run.id, this.id,
              isCompareSpec(run.spec)
                ? `The comparison ran longer than the limit of ${this.wallSeconds} s and was stopped. Try fewer replicates, models or tested lines.`
                : `The fit ran longer than the limit of ${this.wallSeconds} s before any chain finished, and was stopped. Try fewer draws.`,
              this.clock.now(),
            ),
          );
      } else {
        const message = e instanceof Error ? e.message : String(e);
        await this.write(`failing run ${run.id}`, () => failRun(this.db, run.id, this.id, message, this.clock.now()));
        this.log(`run ${run.id} failed: ${message}`);
      }
    } catch (e2) {
      this.log(`run ${run.id}: could not record its end: ${describe(e2)}`);
    }
  }

  /**
   * At the time limit: summarise the chains that finished (the engine runs none, all are given
   * to it as resumed chains numbered 0..k-1) and mark the run done and partial, keeping their draws
   * under their own chain numbers.
   */
  private async finishPartial(run: RunRow, settings: FitSettings, target: TargetSpec, chains: ChainResult[], started: number): Promise<void> {
    const sorted = chains.sort((a, b) => a.chain - b.chain);
    const reindexed = sorted.map((c, k) => ({ ...c, chain: k }));
    const sub = await runFit(target, { ...settings, chains: sorted.length }, { parallel: this.parallel, summaryOnWorker: true, resume: reindexed });
    // The summary's settings name the chains it covers; the run keeps the settings it was queued with.
    const checks = target.kind === 'program' ? await computeRunChecks(target.source, target.tables, { unknownNames: sub.unknownNames, chains: sorted }, settings) : undefined;
    const result = { ...sub, chains: sorted, summary: { ...sub.summary, ...(checks ? { checks } : {}) } };
    const ok = await this.write(`finishing run ${run.id} (partial)`, () =>
      finishRun(this.db, run, this.id, result, this.clock.now(), { fit: Math.round(performance.now() - started), total: Math.round(performance.now() - started) }, { partial: true }),
    );
    this.log(
      ok
        ? `run ${run.id} reached the limit of ${this.wallSeconds} s: kept ${sorted.length} of ${settings.chains} chains (partial)`
        : `run ${run.id} reached the time limit but its lease was lost`,
    );
  }
}
