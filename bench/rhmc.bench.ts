/**
 * RHMC integrators: the implicit-midpoint default against the generalised leapfrog (`rhmc-gl`) on
 * the uniform 50-simplex and the uniform 50-order-simplex (step size, steps per draw, solver
 * iterations per step, rejected share, ESS per draw and per second), and how the cost of one
 * integrator step (gradient, factorisations, implicit solves and run-back check) grows with the
 * dimension for each structure of the metric, with the log-log slope.
 *
 * Environment (to keep it short on busy machines): RHMC_BENCH_WARMUP, RHMC_BENCH_DRAWS (per chain,
 * default 200 / 300), RHMC_BENCH_MAXDIM (largest dimension of the scaling table, default 10000),
 * RHMC_BENCH_FIT_DIM (the fit-sized check's dimension, default 1000), RHMC_BENCH_ONLY=fit (that check only).
 * Runnable alone: `npx tsx bench/rhmc.bench.ts`; recorded by `npm run bench -- rhmc`.
 */
import { fileURLToPath } from 'node:url';
import { dispersedStarts, prepareTarget } from '../server/engine/geometry';
import { chooseEngine, evaluationCostOf, makeDrawCheck, sampleChain } from '../server/engine/samplers';
import { compileProgram } from '../server/engine/compile';
import type { SamplerName } from '../server/engine/types';
import { rhmcChain, type RhmcVariant } from '../server/engine/samplers/rhmc';
import { DEFAULT_MIDPOINT, MidpointIntegrator, midpointChain, type BarrierRegion } from '../server/engine/samplers/rhmc-midpoint';
import type { MetricKind } from '../server/engine/linalg/metric';
import { RowMatrix } from '../server/engine/linalg/sparse';
import { essBulk, essTail } from '../server/engine/diagnostics';
import { Rng } from '../server/engine/rng';
import type { ModelTarget } from '../server/engine/types';
import { orderSimplexTarget, uniformSimplexTarget } from '../tests/unit/samplers/targets';

const CHAINS = 2;
const WARMUP = Number(process.env.RHMC_BENCH_WARMUP ?? 200);
const DRAWS = Number(process.env.RHMC_BENCH_DRAWS ?? 300);
const MAXDIM = Number(process.env.RHMC_BENCH_MAXDIM ?? 10000);
const FIT_DIM = Number(process.env.RHMC_BENCH_FIT_DIM ?? 1000);

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : 0.5 * (s[s.length / 2 - 1] + s[s.length / 2]);
};

function measureChains(target: ModelTarget, variant: RhmcVariant | 'midpoint-dense', seed: number) {
  const p = prepareTarget(target);
  const starts = dispersedStarts(p, CHAINS, new Rng(seed, 999));
  const check = makeDrawCheck(p);
  const t0 = performance.now();
  const o = (c: number) => ({ warmup: WARMUP, draws: DRAWS, seed, chain: c });
  const outs = starts.map((s, c) =>
    variant === 'midpoint-dense'
      ? midpointChain(p, s, o(c), new Rng(seed, c), check, { ...DEFAULT_MIDPOINT, structure: 'dense' })
      : rhmcChain(p, s, o(c), new Rng(seed, c), check, variant),
  );
  const seconds = (performance.now() - t0) / 1000;
  const dim = target.dim;
  let minEss = Infinity;
  for (let j = 0; j < dim; j++) {
    const ch = outs.map((o) => Float64Array.from({ length: DRAWS }, (_, k) => o.draws[k * dim + j]));
    minEss = Math.min(minEss, essBulk(ch), essTail(ch));
  }
  const mean = (f: (o: (typeof outs)[number]) => number | undefined) => outs.reduce((s, o) => s + (f(o) ?? NaN), 0) / CHAINS;
  return {
    stepSize: mean((o) => o.stepSize),
    integrationTime: mean((o) => o.integrationTime),
    stepsPerDrawMedian: median(outs.map((o) => o.stepsPerDraw ?? NaN)),
    solverIterationsPerStep: mean((o) => o.solverIterationsPerStep),
    factorizationsPerStep: mean((o) => o.factorizationsPerStep),
    rejectedFraction: mean((o) => o.rejectedFraction),
    acceptance: mean((o) => o.acceptStat.reduce((a, b) => a + b, 0) / DRAWS),
    essPerDraw: minEss / (CHAINS * DRAWS),
    essPerSecond: minEss / seconds,
    seconds,
    structure: outs[0].metricStructure ?? '',
  };
}

/* Scaling: a region built directly in row-compressed form (the dense presolve is not the point). */

function orderRegion(d: number): { region: BarrierRegion; z: Float64Array } {
  // 0 ≤ x₁ ≤ … ≤ x_d ≤ 1, rows normalised; uniform density.
  const m = d + 1;
  const ptr = new Int32Array(m + 1);
  const idx: number[] = [];
  const val: number[] = [];
  const b = new Float64Array(m);
  idx.push(0), val.push(-1);
  ptr[1] = 1;
  for (let j = 0; j + 1 < d; j++) {
    idx.push(j, j + 1), val.push(Math.SQRT1_2, -Math.SQRT1_2);
    ptr[j + 2] = idx.length;
  }
  idx.push(d - 1), val.push(1);
  b[m - 1] = 1;
  ptr[m] = idx.length;
  const rows = RowMatrix.fromCsr(m, d, ptr, Int32Array.from(idx), Float64Array.from(val));
  const z = Float64Array.from({ length: d }, (_, k) => (k + 1) / (d + 1));
  const logDensity = (_z: Float64Array, g: Float64Array) => (g.fill(0), 0);
  return { region: { n: d, m, rows, b, logDensity }, z };
}

function boxRegion(d: number): { region: BarrierRegion; z: Float64Array } {
  // Standard normals truncated to [−1, 1]^d.
  const m = 2 * d;
  const ptr = new Int32Array(m + 1);
  const idx = new Int32Array(m);
  const val = new Float64Array(m);
  const b = new Float64Array(m).fill(1);
  for (let j = 0; j < d; j++) {
    idx[2 * j] = j;
    val[2 * j] = -1;
    idx[2 * j + 1] = j;
    val[2 * j + 1] = 1;
    ptr[2 * j + 1] = 2 * j + 1;
    ptr[2 * j + 2] = 2 * j + 2;
  }
  const rows = RowMatrix.fromCsr(m, d, ptr, idx, val);
  const logDensity = (z: Float64Array, g: Float64Array) => {
    let l = 0;
    for (let q = 0; q < d; q++) {
      g[q] = -z[q];
      l -= 0.5 * z[q] * z[q];
    }
    return l;
  };
  return { region: { n: d, m, rows, b, logDensity }, z: new Float64Array(d) };
}

/** Seconds per 1,000 integrator steps (ε = 0.1, momentum refreshed every 10 steps). */
function secondsPer1000Steps(region: BarrierRegion, z0: Float64Array, structure: MetricKind | 'structured', budgetSteps: number) {
  const n = region.n;
  const integ = new MidpointIntegrator(region, new Float64Array(n).fill(1e-3), { ...DEFAULT_MIDPOINT, structure });
  let cur = integ.newPoint();
  let next = integ.newPoint();
  cur.z.set(z0);
  if (integ.evaluate(cur) !== 'ok') throw new Error('bad start');
  const rng = new Rng(5);
  const xi = new Float64Array(region.m);
  const eta = new Float64Array(n);
  const pm = new Float64Array(n);
  const keep = integ.newPoint();
  let steps = 0;
  let failed = 0;
  const t0 = performance.now();
  while (steps < budgetSteps) {
    integ.sampleMomentum(cur, rng, xi, eta, pm);
    keep.copyFrom(cur);
    for (let k = 0; k < 10 && steps < budgetSteps; k++) {
      steps++;
      if (integ.step(cur, next, pm, 0.1) !== 'ok') {
        failed++;
        cur.copyFrom(keep);
        break;
      }
      [cur, next] = [next, cur];
    }
  }
  const seconds = (performance.now() - t0) / 1000;
  return { per1000: (1000 * seconds) / steps, steps, failed, kind: integ.structure.kind };
}

function slope(ds: number[], ts: number[]): number {
  const x = ds.map(Math.log);
  const y = ts.map(Math.log);
  const mx = x.reduce((a, b) => a + b, 0) / x.length;
  const my = y.reduce((a, b) => a + b, 0) / y.length;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < x.length; i++) {
    sxy += (x[i] - mx) * (y[i] - my);
    sxx += (x[i] - mx) ** 2;
  }
  return sxy / sxx;
}

/**
 * The fit-sized scaling check: the uniform order simplex at d = FIT_DIM (beyond the product's
 * MAX_UNKNOWNS = 500, so the engine is called directly), 4 chains × 1,000 warm-up + 1,000 draws, one
 * after another on one thread, with the engine `auto` picks (its choice's time included), then RHMC
 * on the same starts. Target: min ESS (bulk and tail) ≥ 400 within 60 s. RHMC gets
 * RHMC_BENCH_FIT_RHMC_ITERATIONS (default 100 + 100) per chain and its time is also given scaled to
 * 1,000 + 1,000 (its cost per iteration is steady after warm-up's first windows).
 */
async function fitScaling(out: Record<string, number | string>): Promise<void> {
  const d = FIT_DIM;
  const t0 = performance.now();
  const target = compileProgram(`unknown x[${d}]\nconstrain 0 <= x[1]\nconstrain diff(x) >= 0\nconstrain x[${d}] <= 1\n`, {});
  const p = prepareTarget(target);
  const starts = dispersedStarts(p, 4, new Rng(2026, 0x5eed));
  const prepared = (performance.now() - t0) / 1000;
  const t1 = performance.now();
  const choice = await chooseEngine(p, { start: starts[0], fitIterations: 8000, evalCost: evaluationCostOf(null, d), chains: 4, seed: 2026 }, async (jobs) =>
    jobs.map((j) => sampleChain(p, j.engine, j.start, { warmup: j.warmup, draws: j.draws, seed: 2026, chain: j.chain })),
  );
  const chainsFor = (engine: SamplerName, warmup: number, draws: number) => {
    const ts = performance.now();
    const outs = (choice.starts ?? starts).map((st, c) => sampleChain(p, engine, st, { warmup, draws, seed: 2026, chain: c }));
    const seconds = (performance.now() - ts) / 1000;
    let minEss = Infinity;
    for (let j = 0; j < d; j++) {
      const ch = outs.map((o) => Float64Array.from({ length: draws }, (_, k) => o.draws[k * d + j]));
      minEss = Math.min(minEss, essBulk(ch), essTail(ch));
    }
    return { seconds, minEss };
  };
  const a = chainsFor(choice.sampler, 1000, 1000);
  const autoSeconds = (performance.now() - t1) / 1000;
  out[`fit.order${d}.prepareSeconds`] = prepared;
  out[`fit.order${d}.auto.engine`] = choice.sampler;
  out[`fit.order${d}.auto.seconds`] = autoSeconds;
  out[`fit.order${d}.auto.minEss`] = a.minEss;
  out[`fit.order${d}.auto.target(minEss>=400,<=60s)`] = a.minEss >= 400 && autoSeconds + prepared <= 60 ? 'met' : 'missed';
  const it = Number(process.env.RHMC_BENCH_FIT_RHMC_ITERATIONS ?? 100);
  const r = chainsFor('rhmc', it, it);
  out[`fit.order${d}.rhmc.iterations`] = `${it}+${it} per chain`;
  out[`fit.order${d}.rhmc.seconds`] = r.seconds;
  out[`fit.order${d}.rhmc.minEss`] = r.minEss;
  out[`fit.order${d}.rhmc.secondsScaledTo1000+1000`] = (r.seconds * 1000) / it;
}

export async function run(): Promise<Record<string, number | string>> {
  const out: Record<string, number | string> = { chains: CHAINS, warmupDraws: `${WARMUP}/${DRAWS}` };
  await fitScaling(out);
  if (process.env.RHMC_BENCH_ONLY === 'fit') return out;
  const cases: [string, ModelTarget][] = [
    ['simplex50', uniformSimplexTarget(50)],
    ['order50', orderSimplexTarget(50)],
  ];
  for (const [name, t] of cases) {
    const res: Record<string, ReturnType<typeof measureChains>> = {};
    // 'midpoint-dense': the midpoint integrator with the dense factorisation, which separates the
    // integrator's gain from the structured solver's.
    for (const integrator of ['midpoint', 'leapfrog', 'midpoint-dense'] as const) {
      const r = measureChains(t, integrator === 'midpoint-dense' ? integrator : { integrator }, 2026);
      res[integrator] = r;
      const key = `${name}.${integrator === 'midpoint' ? 'rhmc' : integrator === 'leapfrog' ? 'rhmc-gl' : 'rhmc-dense'}`;
      out[`${key}.structure`] = r.structure;
      out[`${key}.stepSize`] = r.stepSize;
      out[`${key}.integrationTime`] = r.integrationTime;
      out[`${key}.stepsPerDrawMedian`] = r.stepsPerDrawMedian;
      out[`${key}.solverIterationsPerStep`] = r.solverIterationsPerStep;
      out[`${key}.factorizationsPerStep`] = r.factorizationsPerStep;
      out[`${key}.rejectedFraction`] = r.rejectedFraction;
      out[`${key}.acceptance`] = r.acceptance;
      out[`${key}.essPerDraw`] = r.essPerDraw;
      out[`${key}.essPerSecond`] = r.essPerSecond;
      out[`${key}.seconds`] = r.seconds;
    }
    out[`${name}.essPerSecondRatio`] = res.midpoint.essPerSecond / res.leapfrog.essPerSecond;
    out[`${name}.essPerSecondRatio.denseMidpointOverLeapfrog`] = res['midpoint-dense'].essPerSecond / res.leapfrog.essPerSecond;
  }
  // Scaling of one step with the dimension.
  const dims = [10, 100, 1000, 10000].filter((d) => d <= MAXDIM);
  for (const [name, make] of [
    ['order', orderRegion],
    ['box', boxRegion],
  ] as const) {
    const ts: number[] = [];
    for (const d of dims) {
      const { region, z } = make(d);
      const r = secondsPer1000Steps(region, z, 'structured', Math.max(100, Math.min(3000, Math.round(3e6 / d))));
      out[`scaling.${name}.${r.kind}.d${d}.secondsPer1000Steps`] = r.per1000;
      out[`scaling.${name}.d${d}.failedSteps`] = `${r.failed}/${r.steps}`;
      ts.push(r.per1000);
    }
    const big = dims.filter((d) => d >= 100);
    out[`scaling.${name}.structured.logLogSlope(d>=100)`] = slope(big, ts.slice(dims.length - big.length));
    // The dense fallback for comparison (d ≤ 200: its cost grows like d³).
    const dd = [10, 100, 200];
    const td: number[] = [];
    for (const d of dd) {
      const { region, z } = make(d);
      const r = secondsPer1000Steps(region, z, 'dense', Math.max(30, Math.round(2e5 / (d * d))));
      out[`scaling.${name}.dense.d${d}.secondsPer1000Steps`] = r.per1000;
      td.push(r.per1000);
    }
    out[`scaling.${name}.dense.logLogSlope(d=100..200)`] = slope(dd.slice(1), td.slice(1));
  }
  return out;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  run().then((r) => {
    for (const [k, v] of Object.entries(r)) console.log(k.padEnd(58), typeof v === 'number' ? Number(v.toPrecision(4)) : v);
  });
}
