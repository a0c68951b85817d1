/**
 * Small targets for the fit orchestration tests, loaded by module path so worker threads can
 * rebuild them. Each factory takes plain JSON arguments.
 */
import { isMainThread } from 'node:worker_threads';
import type { LinearSystem, ModelTarget } from '../../../server/engine/types';

function system(cols: number, rows: { a: number[]; b: number; label: string }[]): LinearSystem {
  const A = new Float64Array(rows.length * cols);
  rows.forEach((r, i) => r.a.forEach((v, j) => (A[i * cols + j] = v)));
  return { rows: rows.length, cols, A, b: Float64Array.from(rows.map((r) => r.b)), labels: rows.map((r) => r.label) };
}

/** Uniform on {0 ≤ lo ≤ hi ≤ 1}, with the derived spacing gap = hi − lo. */
export function orderedPair(): ModelTarget {
  return {
    dim: 2,
    names: ['x[1]', 'x[2]'],
    logDensity: (_theta, grad) => {
      grad.fill(0);
      return 0;
    },
    inequalities: system(2, [
      { a: [-1, 0], b: 0, label: 'x[1] >= 0' },
      { a: [1, -1], b: 0, label: 'x[1] <= x[2]' },
      { a: [0, 1], b: 1, label: 'x[2] <= 1' },
    ]),
    equalities: system(2, []),
    derived: {
      names: ['gap'],
      evaluate: (theta, out) => {
        out[0] = theta[1] - theta[0];
      },
    },
  };
}

/** Standard normal truncated to [lo, hi] (one unknown), with derived square. */
export function truncatedNormal(args: { lo: number; hi: number }): ModelTarget {
  return {
    dim: 1,
    names: ['z'],
    logDensity: (theta, grad) => {
      grad[0] = -theta[0];
      return -0.5 * theta[0] * theta[0];
    },
    inequalities: system(1, [
      { a: [-1], b: -args.lo, label: `z >= ${args.lo}` },
      { a: [1], b: args.hi, label: `z <= ${args.hi}` },
    ]),
    equalities: system(1, []),
    derived: {
      names: ['z_squared'],
      evaluate: (theta, out) => {
        out[0] = theta[0] * theta[0];
      },
    },
  };
}

/** Builds in the main thread but throws inside a worker thread: tests error propagation. */
export function failsInWorker(): ModelTarget {
  if (!isMainThread) throw new Error('This target refuses to be built in a worker thread on purpose.');
  return orderedPair();
}
