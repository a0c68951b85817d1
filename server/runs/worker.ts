/**
 * A run worker: fit slots that claim run units from the database (units.ts) — one chain of a fit
 * at a time, a fit's summary, or a job that runs whole — and run them. Several workers (in several
 * processes or hosts) can share one database, and one fit's chains spread over all their slots.
 *
 * Each chain is stored as soon as it finishes; a chain whose slot vanished is claimed again once
 * its lease expires and runs again from the same start and seed (the same draws). The slot that
 * stores a fit's last chain summarises the fit (finishFit, off the event loop) and marks it done.
 *
 * Database outages: every write (progress, heartbeat, chain store, finish, fail) retries
 * transient errors with backoff (retry.ts), so a restart of MariaDB under a fit delays its writes
 * but loses nothing; a heartbeat the database answers with "not yours" (lease taken over or run
 * cancelled) stops the chain. Nothing here rejects unhandled.
 *
 * Time limit: a chain that runs longer than wallSeconds is stopped and dropped; the fit ends with
 * the chains that finished, marked partial (failed when none did).
 */
import os from 'node:os';
import { and, eq, inArray } from 'drizzle-orm';
import { fitSettingsSchema, type FitProgress, type FitSettings } from '../../shared/fit';
import { RUN_HEARTBEAT, RUN_LIMITS } from '../../shared/api/notebook';
import type { Db } from '../db/client';
import { datasets } from '../db/schema';
import { FitCancelledError, planFit, runFitChain, summariseFitChains, type FitPlan } from '../engine/fit';
import { preparedFor } from '../engine/fit-worker';
import type { ChainResult, TargetSpec } from '../engine/types';
import type { Clock } from '../lib/clock';
import { systemClock } from '../lib/clock';
import { newId } from '../lib/ids';
import { datasetMetaColumns, loadDataTables } from '../notebook/datasets';
import { storedChains, type DrawNames, type EncodedChain, type RunRow } from './queue';
import { claimUnit, endChainUnit, failUnitRun, finishUnitRun, heartbeatUnit, storePlan, writeUnitProgress, type Claim } from './units';
import { wholeRunJobs } from './jobs';
import { computePool } from '../compute/pool';
import { describe, isTransientDbError, retryDb } from './retry';
import './compare-job';
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
  /** Units (chains) run at once by this worker (default 1). */
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

  /** Stop after the current units (which are abandoned to their leases if `abandon`). */
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

  /** Claim and run one unit. Returns false when the queue had nothing claimable. */
  async runOnce(slot = 0): Promise<boolean> {
    const claim = await claimUnit(this.db, this.id, this.clock.now(), this.leaseMs);
    if (!claim) return false;
    const { run, unit } = claim;
    const what = unit.kind === 'chain' ? `chain ${unit.unit + 1}` : unit.kind === 'finish' ? 'the summary' : 'the job';
    this.log(`slot ${slot + 1}: claimed ${what} of run ${run.id} (attempt ${unit.attempts})`);
    if (unit.kind === 'chain') await this.processChain(claim);
    else if (unit.kind === 'finish') await this.finishFit(claim);
    else await this.processJob(claim);
    return true;
  }

  /** A write retried through database outages until it succeeds, or the worker abandons its runs. */
  private write<T>(what: string, fn: () => Promise<T>, giveUp?: () => boolean): Promise<T> {
    return retryDb(fn, { what, log: this.log, maxDelayMs: this.maxRetryDelayMs, giveUp: () => this.abandoning || (giveUp?.() ?? false) });
  }

  /**
   * Hold a unit while `body` runs: its heartbeat (a definite "not yours" stops the body with
   * 'lost'), progress writes at most every progressMs (the newest values win; a failed write is
   * superseded by the next), an optional time limit ('wall') and the worker's shutdown ('abandon').
   */
  private async leased<T>(
    claim: Claim,
    limitMs: number | null,
    body: (h: { signal: AbortSignal; progress: (p: FitProgress[]) => void; why: () => StopReason | null; pastLimit: () => boolean }) => Promise<T>,
  ): Promise<T> {
    const { run } = claim;
    const heldSince = performance.now();
    const ac = new AbortController();
    this.current.add(ac);
    let why: StopReason | null = null;
    const stop = (reason: StopReason) => {
      if (ac.signal.aborted) return;
      why = reason;
      ac.abort();
    };
    const onAbort = () => {
      if (this.abandoning) why ??= 'abandon';
    };
    ac.signal.addEventListener('abort', onAbort);

    let latest: FitProgress[] | null = null;
    let lastWrite = 0;
    let writing = false;
    let progressFailing = false;
    const progress = (p: FitProgress[]) => {
      latest = p;
      const now = Date.now();
      if (writing || now - lastWrite < this.progressMs) return;
      writing = true;
      lastWrite = now;
      writeUnitProgress(this.db, claim, this.id, latest)
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

    // Only a definite "not yours" stops the unit; an unreachable database is not a lost lease
    // (the lease is fenced by owner, so it can be renewed on return unless another slot took it).
    let beating = false;
    let beatFailing = false;
    const beat = setInterval(() => {
      if (beating) return;
      beating = true;
      heartbeatUnit(this.db, claim, this.id, this.clock.now(), this.leaseMs)
        .then((ok) => {
          if (beatFailing) this.log(`run ${run.id}: heartbeat answered again${ok ? '' : ' — the unit is no longer ours'}`);
          beatFailing = false;
          if (!ok) stop('lost');
        })
        .catch((e: unknown) => {
          if (!beatFailing) this.log(`run ${run.id}: heartbeat failed (${describe(e)}); retrying every ${this.heartbeatMs} ms`);
          beatFailing = true;
        })
        .finally(() => {
          beating = false;
        });
    }, this.heartbeatMs);
    const wall = limitMs === null ? null : setTimeout(() => stop('wall'), Math.max(0, limitMs));
    try {
      // pastLimit: the limit checked at a step boundary (its timer may not have had a turn yet).
      const pastLimit = () => {
        if (limitMs !== null && performance.now() - heldSince >= limitMs) stop('wall');
        return ac.signal.aborted;
      };
      return await body({ signal: ac.signal, progress, why: () => why, pastLimit });
    } finally {
      clearInterval(beat);
      if (wall) clearTimeout(wall);
      ac.signal.removeEventListener('abort', onAbort);
      this.current.delete(ac);
    }
  }

  /** The model and data a run fits, loaded as the run's spec froze them. */
  private async targetOf(run: RunRow, settings: FitSettings): Promise<TargetSpec> {
    const spec = run.spec;
    if (!spec) throw new Error(`Run ${run.id} was queued without its model and data`);
    const ids = Object.values(spec.tables);
    const rows = ids.length
      ? await this.write(`loading the data of run ${run.id}`, () => this.db.select(datasetMetaColumns).from(datasets).where(and(eq(datasets.workspaceId, run.workspaceId), inArray(datasets.id, ids))))
      : [];
    const byId = new Map(rows.map((d) => [d.id, d]));
    const missing = Object.entries(spec.tables).filter(([, id]) => !byId.has(id)).map(([name]) => name);
    if (missing.length) throw new Error(`The data of table ${missing.map((m) => `"${m}"`).join(', ')} was deleted before the fit ran.`);
    const tables = await loadDataTables(this.db, Object.entries(spec.tables).map(([name, id]) => ({ ...byId.get(id)!, name })));
    // Before the data: the engine fits the program with its likelihood terms left out.
    return { kind: 'program', source: spec.source, tables, ...(settings.priorOnly ? { priorOnly: true } : {}) };
  }

  /** The engine every chain of the run uses: stored by the first chain that decided it. */
  private async planOf(claim: Claim, target: TargetSpec, settings: FitSettings, signal?: AbortSignal): Promise<FitPlan> {
    const stored = claim.run.plan as FitPlan | null;
    if (stored?.sampler) return stored;
    // The automatic choice is deterministic in the seed, so two chains deciding at once agree.
    const plan = await planFit(target, settings, { parallel: this.parallel, signal });
    await this.write(`storing the engine of run ${claim.run.id}`, () => storePlan(this.db, claim.run.id, plan));
    return plan;
  }

  /** One chain of a fit: run it, store it, and summarise the fit if it was the last one. */
  private async processChain(claim: Claim): Promise<void> {
    const { run, unit } = claim;
    const chainIndex = unit.unit;
    const started = performance.now();
    let stopped: StopReason | null = null;
    let ended: { mine: boolean; finish: Claim | null } | null = null;
    try {
      ended = await this.leased(claim, this.wallSeconds * 1000, async (h) => {
        try {
          const settings = fitSettingsSchema.parse(run.settings);
          const target = await this.targetOf(run, settings);
          const prepared = (await preparedFor(target)).target;
          const names: DrawNames = { unknownNames: prepared.names.slice(), derivedNames: prepared.derived?.names.slice() ?? [] };
          const plan = await this.planOf(claim, target, settings, h.signal);
          if (h.pastLimit()) throw new FitCancelledError();
          const chain = await runFitChain(target, settings, chainIndex, plan, {
            signal: h.signal,
            parallel: this.parallel,
            // The engine numbers chains from 0 in progress; the API shows them from 1.
            onProgress: (p) => h.progress([{ ...p, chain: p.chain + 1 }]),
          });
          this.log(`run ${run.id}: chain ${chainIndex + 1} finished`);
          const enc = await this.encoded(names, chain);
          return await this.write(`storing chain ${chainIndex + 1} of run ${run.id}`, () => endChainUnit(this.db, claim, this.id, { names, chain: enc }, this.clock.now(), this.leaseMs));
        } catch (e) {
          stopped = h.why();
          throw e;
        }
      });
      if (!ended.mine) this.log(`run ${run.id}: chain ${chainIndex + 1} finished but is no longer ours (cancelled or lease lost); not stored`);
    } catch (e) {
      const why = stopped as StopReason | null;
      try {
        if (why === 'lost') this.log(`run ${run.id}: chain ${chainIndex + 1} stopped: cancelled or lease lost`);
        else if (why === 'abandon') this.log(`run ${run.id}: chain ${chainIndex + 1} abandoned; another slot runs it again when its lease expires`);
        else if (why === 'wall') {
          this.log(`run ${run.id}: chain ${chainIndex + 1} ran longer than the limit of ${this.wallSeconds} s and was dropped`);
          ended = await this.write(`dropping chain ${chainIndex + 1} of run ${run.id}`, () => endChainUnit(this.db, claim, this.id, 'dropped', this.clock.now(), this.leaseMs));
        } else {
          const message = e instanceof Error ? e.message : String(e);
          await this.write(`failing run ${run.id}`, () => failUnitRun(this.db, claim, this.id, message, this.clock.now()));
          this.log(`run ${run.id} failed: ${message}`);
        }
      } catch (e2) {
        this.log(`run ${run.id}: could not record the end of chain ${chainIndex + 1}: ${describe(e2)}`);
      }
    }
    this.log(`run ${run.id}: chain ${chainIndex + 1} took ${((performance.now() - started) / 1000).toFixed(1)} s`);
    // The slot that ended the last chain summarises the fit at once (its finish unit is claimed).
    if (ended?.finish && !this.abandoning) await this.finishFit(ended.finish);
  }

  /**
   * The fit-finishing step, in one place: the stored chains are summarised (diagnostics and
   * verdict on a worker thread), and the run is marked done — partial when chains were dropped at
   * the time limit, failed when none finished. Further post-fit steps (e.g. model checks) belong
   * here, before the run is marked done.
   */
  private async finishFit(claim: Claim): Promise<void> {
    const { run } = claim;
    const started = performance.now();
    let stopped: StopReason | null = null;
    try {
      await this.leased(claim, null, async (h) => {
        try {
          const settings = fitSettingsSchema.parse(run.settings);
          const target = await this.targetOf(run, settings);
          const stored = await this.write(`reading the stored chains of run ${run.id}`, () => storedChains(this.db, run));
          if (stored.length === 0) {
            const ok = await this.write(`failing run ${run.id}`, () =>
              failUnitRun(this.db, claim, this.id, `The fit ran longer than the limit of ${this.wallSeconds} s before any chain finished, and was stopped. Try fewer draws.`, this.clock.now()),
            );
            this.log(ok ? `run ${run.id} failed: no chain finished within the time limit` : `run ${run.id}: no longer ours`);
            return;
          }
          const plan = await this.planOf(claim, target, settings, h.signal);
          // The summary is computed over the chains numbered 0..k-1; the stored rows keep their own numbers.
          const sorted = stored.sort((a, b) => a.chain - b.chain);
          const tSummary = performance.now();
          const result = await summariseFitChains(target, settings, sorted.map((c, k) => ({ ...c, chain: k })), plan, { onWorker: this.parallel });
          const tChecks = performance.now();
          // Model checks on the compute pool (a failure or the time limit is reported in the checks).
          const checks = target.kind === 'program' ? await computeRunChecks(target.source, target.tables, { unknownNames: result.unknownNames, chains: sorted }, settings) : undefined;
          const partial = sorted.length < settings.chains;
          const start = run.startedAt?.getTime() ?? this.clock.now().getTime();
          const ok = await this.write(`finishing run ${run.id}`, () =>
            finishUnitRun(
              this.db,
              claim,
              this.id,
              { summary: { ...result.summary, ...(checks ? { checks } : {}) }, chainsDone: sorted.length, total: settings.warmup + settings.draws },
              this.clock.now(),
              { summary: Math.round(tChecks - tSummary), checks: Math.round(performance.now() - tChecks), total: Math.max(0, this.clock.now().getTime() - start) },
              partial,
            ),
          );
          this.log(
            !ok
              ? `run ${run.id} finished but is no longer ours; result discarded`
              : partial
                ? `run ${run.id} done: kept ${sorted.length} of ${settings.chains} chains (partial)`
                : `run ${run.id} done (summary in ${((performance.now() - started) / 1000).toFixed(1)} s)`,
          );
        } catch (e) {
          stopped = h.why();
          throw e;
        }
      });
    } catch (e) {
      await this.endWholeUnit(claim, 'summary', stopped as StopReason | null, e instanceof Error ? e.message : String(e));
    }
  }

  /** A run that is one unit of work (a job kind of jobs.ts): run its function, store its summary. */
  private async processJob(claim: Claim): Promise<void> {
    const { run } = claim;
    const kind = String((run.spec as { kind?: unknown } | null)?.kind);
    const job = wholeRunJobs[kind];
    let stopped: StopReason | null = null;
    const started = performance.now();
    try {
      if (!job) throw new Error(`This worker cannot run jobs of kind "${kind}".`);
      await this.leased(claim, this.wallSeconds * 1000, async (h) => {
        try {
          const out = await job({ db: this.db, run, signal: h.signal, progress: h.progress, log: this.log });
          const start = run.startedAt?.getTime() ?? this.clock.now().getTime();
          const ok = await this.write(`finishing run ${run.id}`, () =>
            finishUnitRun(this.db, claim, this.id, { summary: out.summary, chainsDone: 0, total: 0 }, this.clock.now(), { job: Math.round(performance.now() - started), total: Math.max(0, this.clock.now().getTime() - start) }, out.partial ?? false),
          );
          this.log(ok ? `run ${run.id} done` : `run ${run.id} finished but is no longer ours; result discarded`);
        } catch (e) {
          stopped = h.why();
          throw e;
        }
      });
    } catch (e) {
      const why = stopped as StopReason | null;
      const message = why === 'wall' ? `The job ran longer than the limit of ${this.wallSeconds} s and was stopped.` : e instanceof Error ? e.message : String(e);
      await this.endWholeUnit(claim, 'job', why, message);
    }
  }

  /**
   * A summary or job unit that ended early: stopped (cancelled, lease lost, worker stopping) leaves
   * the run to whoever holds it now; anything else fails the run with `message`.
   */
  private async endWholeUnit(claim: Claim, what: 'summary' | 'job', why: StopReason | null, message: string): Promise<void> {
    const { run } = claim;
    if (why === 'lost' || why === 'abandon') {
      this.log(`run ${run.id}: ${what} stopped (${why === 'lost' ? 'cancelled or lease lost' : 'worker stopping'})`);
      return;
    }
    try {
      await this.write(`failing run ${run.id}`, () => failUnitRun(this.db, claim, this.id, message, this.clock.now()));
    } catch (e2) {
      this.log(`run ${run.id}: could not record its failure: ${describe(e2)}`);
    }
    this.log(`run ${run.id} failed: ${message}`);
  }

  /** A chain encoded on the compute pool (as the engine gave it if the pool fails: it is encoded while stored then). */
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
}
