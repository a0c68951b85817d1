/**
 * Work that runs as one unit rather than chain by chain: a run whose spec has a `kind` other than
 * a fit (e.g. `kind: 'compare'`) is queued with a single 'job' unit (units.ts), claimed like a
 * chain, and executed by the function registered here for its kind. The worker holds the unit's
 * lease and heartbeat while it runs, and stores what it returns as the run's summary.
 */
import type { FitProgress, FitSummary } from '../../shared/fit';
import type { Db } from '../db/client';
import type { RunRow } from './queue';

export interface WholeRunJobContext {
  db: Db;
  run: RunRow;
  /** Aborted when the run is cancelled, its lease is lost, or the worker shuts down. */
  signal: AbortSignal;
  /** Per-step progress shown while the job runs (written at most every progressMs). */
  progress(p: FitProgress[]): void;
  log(message: string): void;
}

export interface WholeRunJobResult {
  /** Stored in run_summaries as the run's summary (that column holds a FitSummary). */
  summary: FitSummary;
  partial?: boolean;
}

export type WholeRunJob = (ctx: WholeRunJobContext) => Promise<WholeRunJobResult>;

/** Job kinds and the functions that execute them (e.g. compare: server/runs/compare-job.ts). */
export const wholeRunJobs: Record<string, WholeRunJob> = {};

export function registerWholeRunJob(kind: string, job: WholeRunJob): void {
  wholeRunJobs[kind] = job;
}
