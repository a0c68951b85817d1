/**
 * The compute pool: a few worker threads (node:worker_threads) for everything heavy the server
 * does besides fitting — parsing tables, model and region checks, reading stored draws — so the
 * main thread only does I/O and /api/health answers at once whatever runs.
 *
 * Limits: `size` threads (COMPUTE_THREADS, default 2), at most `maxQueue` tasks waiting
 * (COMPUTE_QUEUE, default 64; more are refused as busy), and a time limit per task
 * (COMPUTE_TIMEOUT_MS, default 20 s, or per call): a task past it has its thread terminated and
 * is answered with ComputeTimeoutError; a fresh thread takes its place.
 */
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import type { TaskInput, TaskName, TaskOutput } from './tasks';

const BOOT = new URL('./boot.mjs', import.meta.url);

export class ComputeTimeoutError extends Error {
  constructor(readonly ms: number) {
    super(`stopped at the time limit of ${ms} ms`);
    this.name = 'ComputeTimeoutError';
  }
}
export class ComputeBusyError extends Error {
  constructor() {
    super('The server is busy with other checks; try again in a moment.');
    this.name = 'ComputeBusyError';
  }
}

export interface ComputePoolOptions {
  size?: number;
  timeoutMs?: number;
  maxQueue?: number;
}

interface Job {
  name: TaskName;
  input: unknown;
  transfer: ArrayBuffer[];
  timeoutMs: number;
  resolve: (v: unknown) => void;
  reject: (e: unknown) => void;
}

interface Lane {
  worker: Worker;
  busy: boolean;
}

export class ComputePool {
  readonly size: number;
  readonly timeoutMs: number;
  readonly maxQueue: number;
  private lanes: Lane[] = [];
  private queue: Job[] = [];
  private nextId = 1;
  private closed = false;

  constructor(o: ComputePoolOptions = {}) {
    this.size = Math.max(1, Math.floor(o.size ?? 2));
    this.timeoutMs = o.timeoutMs ?? 20_000;
    this.maxQueue = o.maxQueue ?? 64;
  }

  /** Run a task on a pool thread. `transfer` hands buffers over instead of copying them. */
  run<K extends TaskName>(name: K, input: TaskInput<K>, opts: { timeoutMs?: number; transfer?: ArrayBuffer[] } = {}): Promise<TaskOutput<K>> {
    if (this.closed) return Promise.reject(new Error('the compute pool is closed'));
    if (this.queue.length >= this.maxQueue) return Promise.reject(new ComputeBusyError());
    return new Promise<TaskOutput<K>>((resolve, reject) => {
      this.queue.push({ name, input, transfer: opts.transfer ?? [], timeoutMs: opts.timeoutMs ?? this.timeoutMs, resolve: resolve as (v: unknown) => void, reject });
      this.pump();
    });
  }

  /** Threads alive now (idle threads are unref'd: they never keep the process alive). */
  threads(): number {
    return this.lanes.length;
  }

  async close(): Promise<void> {
    this.closed = true;
    for (const j of this.queue.splice(0)) j.reject(new Error('the compute pool is closed'));
    const lanes = this.lanes.splice(0);
    await Promise.all(lanes.map((l) => l.worker.terminate()));
  }

  private pump(): void {
    while (this.queue.length) {
      let lane = this.lanes.find((l) => !l.busy);
      if (!lane) {
        if (this.lanes.length >= this.size) return;
        lane = this.spawn();
      }
      this.start(lane, this.queue.shift()!);
    }
  }

  private spawn(): Lane {
    const lane: Lane = { worker: new Worker(BOOT), busy: false };
    lane.worker.unref();
    this.lanes.push(lane);
    return lane;
  }

  private retire(lane: Lane): void {
    this.lanes = this.lanes.filter((l) => l !== lane);
    void lane.worker.terminate();
  }

  private start(lane: Lane, job: Job): void {
    lane.busy = true;
    lane.worker.ref();
    const id = this.nextId++;
    const w = lane.worker;
    let settled = false;
    const finish = (fn: () => void, keep: boolean) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      w.off('message', onMessage);
      w.off('error', onError);
      w.off('exit', onExit);
      if (keep) {
        lane.busy = false;
        w.unref();
      } else this.retire(lane);
      fn();
      this.pump();
    };
    const onMessage = (m: { id: number; ok: boolean; output?: unknown; error?: { name: string; message: string } }) => {
      if (m.id !== id) return;
      if (m.ok) finish(() => job.resolve(m.output), true);
      else {
        const e = new Error(m.error!.message);
        e.name = m.error!.name;
        finish(() => job.reject(e), true);
      }
    };
    const onError = (e: Error) => finish(() => job.reject(e), false);
    const onExit = (code: number) => finish(() => job.reject(new Error(`a compute thread exited (code ${code})`)), false);
    const timer = setTimeout(() => finish(() => job.reject(new ComputeTimeoutError(job.timeoutMs)), false), job.timeoutMs);
    w.on('message', onMessage);
    w.on('error', onError);
    w.on('exit', onExit);
    w.postMessage({ id, name: job.name, input: job.input }, job.transfer);
  }
}

let shared: ComputePool | null = null;

/** The process's pool, sized from COMPUTE_THREADS, COMPUTE_TIMEOUT_MS and COMPUTE_QUEUE. */
export function computePool(env: NodeJS.ProcessEnv = process.env): ComputePool {
  if (!shared) {
    const num = (v: string | undefined, d: number) => (v && Number.isFinite(Number(v)) && Number(v) > 0 ? Number(v) : d);
    shared = new ComputePool({
      size: num(env.COMPUTE_THREADS, Math.max(1, Math.min(2, os.availableParallelism() - 1))),
      timeoutMs: num(env.COMPUTE_TIMEOUT_MS, 20_000),
      maxQueue: num(env.COMPUTE_QUEUE, 64),
    });
  }
  return shared;
}

/** Stop the process's pool threads (shutdown and tests; they are unref'd, so this is optional). */
export async function closeComputePool(): Promise<void> {
  const p = shared;
  shared = null;
  await p?.close();
}
