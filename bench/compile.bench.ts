/**
 * Compiled log-density + gradient of a normal regression (N = 10 000 rows, 10 coefficients, an
 * intercept and a scale) against a hand-written Float64Array loop doing the same arithmetic.
 * Figures are medians of repeated timed calls (microseconds per call).
 */
import { compileProgram } from '../server/engine/compile/index';
import { Rng } from '../server/engine/rng';
import type { DataTables } from '../server/engine/types';

const N = 10_000;
const K = 10;
const HALF_LOG_2PI = 0.5 * Math.log(2 * Math.PI);

function makeData(): { tables: DataTables; X: Float64Array; y: Float64Array } {
  const rng = new Rng(20261202);
  const X = new Float64Array(N * K);
  const y = new Float64Array(N);
  const columns: DataTables[string]['columns'] = {};
  const cols: Float64Array[] = [];
  for (let k = 0; k < K; k++) cols.push(new Float64Array(N));
  for (let i = 0; i < N; i++) {
    let m = 0.5;
    for (let k = 0; k < K; k++) {
      const v = rng.uniform() * 2 - 1;
      X[i * K + k] = v;
      cols[k][i] = v;
      m += (k + 1) * 0.1 * v;
    }
    y[i] = m + 0.7 * (rng.uniform() - 0.5);
  }
  for (let k = 0; k < K; k++) columns[`moisture${k + 1}`] = { type: 'numeric', values: cols[k] };
  columns.growth = { type: 'numeric', values: y };
  return { tables: { plots: { rows: N, columns } }, X, y };
}

/** Same arithmetic as the compiled model, written by hand. */
function handLoop(X: Float64Array, y: Float64Array) {
  return (theta: Float64Array, grad: Float64Array): number => {
    grad.fill(0);
    const alpha = theta[K];
    const sigma = theta[K + 1];
    const logSigma = Math.log(sigma);
    let lp = 0;
    let gAlpha = 0;
    let gSigma = 0;
    for (let i = 0; i < N; i++) {
      const r = i * K;
      let mu = alpha;
      for (let k = 0; k < K; k++) mu += X[r + k] * theta[k];
      const z = (y[i] - mu) / sigma;
      lp += -0.5 * z * z - logSigma - HALF_LOG_2PI;
      const dmu = z / sigma;
      for (let k = 0; k < K; k++) grad[k] += dmu * X[r + k];
      gAlpha += dmu;
      gSigma += (z * z - 1) / sigma;
    }
    grad[K] = gAlpha;
    grad[K + 1] = gSigma;
    return lp;
  };
}

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function time(f: (t: Float64Array, g: Float64Array) => number, theta: Float64Array, grad: Float64Array, reps: number): number {
  for (let w = 0; w < 50; w++) f(theta, grad);
  const ts: number[] = [];
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    f(theta, grad);
    ts.push((performance.now() - t0) * 1000);
  }
  return median(ts);
}

export async function run(): Promise<Record<string, number | string>> {
  const { tables, X, y } = makeData();
  const names = Array.from({ length: K }, (_, k) => `moisture${k + 1}`).join(', ');
  const source = [
    'table plots',
    `unknown beta[${K}], alpha, sigma`,
    `let X = [${names}]`,
    'term ld_normal(growth, X * beta + alpha, sigma)',
    'constrain sigma >= 0.001',
  ].join('\n');
  const t0 = performance.now();
  const model = compileProgram(source, tables);
  const compileMs = performance.now() - t0;
  const hand = handLoop(X, y);
  const theta = new Float64Array(K + 2);
  for (let k = 0; k < K; k++) theta[k] = 0.1 * k;
  theta[K] = 0.3;
  theta[K + 1] = 0.8;
  const g1 = new Float64Array(K + 2);
  const g2 = new Float64Array(K + 2);
  const v1 = model.logDensity(theta, g1);
  const v2 = hand(theta, g2);
  let maxGradDiff = 0;
  for (let k = 0; k < K + 2; k++) maxGradDiff = Math.max(maxGradDiff, Math.abs(g1[k] - g2[k]) / Math.max(1, Math.abs(g2[k])));
  const reps = 300;
  // Interleave to share any machine noise between the two.
  const compiledUs = time(model.logDensity, theta, g1, reps);
  const handUs = time(hand, theta, g2, reps);
  const compiledUs2 = time(model.logDensity, theta, g1, reps);
  const handUs2 = time(hand, theta, g2, reps);
  const c = Math.min(compiledUs, compiledUs2);
  const h = Math.min(handUs, handUs2);
  return {
    'compile.regression.rows': N,
    'compile.regression.coefficients': K,
    'compile.regression.compile_ms': Number(compileMs.toFixed(2)),
    'compile.regression.compiled_us_per_call': Number(c.toFixed(1)),
    'compile.regression.hand_loop_us_per_call': Number(h.toFixed(1)),
    'compile.regression.ratio_compiled_over_hand': Number((c / h).toFixed(3)),
    'compile.regression.value_difference': Math.abs(v1 - v2),
    'compile.regression.max_relative_gradient_difference': maxGradDiff,
    'compile.regression.goal': 'ratio <= 2',
  };
}

const invokedDirectly = typeof process !== 'undefined' && process.argv[1] !== undefined && /compile\.bench\.ts$/.test(process.argv[1]);
if (invokedDirectly) {
  run().then((r) => {
    for (const [k, v] of Object.entries(r)) console.log(`${k}: ${v}`);
  });
}
