/**
 * Model checks after a fit of a model-language program: predictive checks from its `replicate`
 * statements and PSIS leave-one-out from its likelihood terms.
 *
 * Reproducibility: replicate k (k = 0 … N − 1) is simulated from pooled draw ⌊k·S/N⌋ (draws
 * pooled chain after chain) with its own seeded stream Rng(seed, REPLICATE_STREAM + k), so the
 * same seed gives the same replicates whatever the parallelism of the fit.
 */
import type { CheckResult } from '../../../shared/lang/index';
import type { DataTables, FitResult } from '../types';
import { Rng } from '../rng';
import { essMean } from '../diagnostics';
import { compilePointwise, compileReplicates, type ReplicateSpec } from '../compile/predictive';
import { BUILTIN_STATS, predictiveCheck, statistic, type PredictiveCheck } from './ppc';
import { psisLoo, type LooResult } from './psis';

/** Stream offset of the replicate streams (chains use 0, 1, …; the starts 0x5eed). */
export const REPLICATE_STREAM = 0x7e91_0000;

/** Largest draws × rows matrix of pointwise log-likelihoods kept for leave-one-out (doubles). */
export const LOO_MAX_CELLS = 20_000_000;

export interface ModelCheckOptions {
  seed: number;
  /** Number of replicated data sets (default 500, at most the number of draws). */
  replicates?: number;
  /** Statistics beyond the built-in mean, sd, min, max and share of zeros (see ppc.statistic). */
  extraStats?: string[];
  /** 'prior' when the fit dropped the likelihood terms: no leave-one-out then. */
  kind?: 'posterior' | 'prior';
  /** Largest draws × rows matrix of pointwise log-likelihoods (default LOO_MAX_CELLS); more draws are thinned. */
  looMaxCells?: number;
}

/** What the checks read of a fit: the unknowns' names and each chain's draws (draws × unknowns, row-major). */
export type CheckedFit = Pick<FitResult, 'unknownNames'> & { chains: { draws: Float64Array }[] };

export interface ReplicatedData {
  spec: ReplicateSpec;
  /** Pooled draw index of each replicate. */
  draws: number[];
  values: Float64Array[];
}

export interface LooRowReport {
  table: string;
  /** 1-based data row of its table. */
  row: number;
  elpd: number;
  pLoo: number;
  k: number;
}

export interface LooReport {
  elpd: number;
  se: number;
  mcse: number;
  pLoo: number;
  lpd: number;
  kThreshold: number;
  /** Draws used (all kept draws, or every t-th when the matrix would be too large). */
  draws: number;
  /** Rows with k̂ above the threshold, named by table and row. */
  highK: { table: string; row: number; k: number }[];
  rows: LooRowReport[];
}

export interface ModelChecks {
  kind: 'posterior' | 'prior';
  replicated: ReplicatedData[];
  predictive: PredictiveCheck[];
  loo?: LooReport;
  /** Why leave-one-out was not computed, when it was not. */
  looUnavailable?: string;
}

/** Pooled draw θ_s (chain after chain) as a view. */
function drawAt(result: CheckedFit, dim: number, s: number): Float64Array {
  let k = s;
  for (const c of result.chains) {
    const n = c.draws.length / dim;
    if (k < n) return c.draws.subarray(k * dim, (k + 1) * dim);
    k -= n;
  }
  throw new Error('draw index out of range');
}

export function runModelChecks(check: CheckResult, tables: DataTables, result: CheckedFit, opts: ModelCheckOptions): ModelChecks {
  const kind = opts.kind ?? 'posterior';
  const dim = result.unknownNames.length;
  const total = result.chains.reduce((n, c) => n + (dim > 0 ? c.draws.length / dim : 0), 0);
  const out: ModelChecks = { kind, replicated: [], predictive: [] };
  const stats = [...BUILTIN_STATS, ...(opts.extraStats ?? [])].map(statistic);

  const rep = compileReplicates(check, tables);
  if (rep && total > 0) {
    const N = Math.max(1, Math.min(opts.replicates ?? 500, total));
    const draws = Array.from({ length: N }, (_, k) => Math.floor((k * total) / N));
    const sims = draws.map((s, k) => rep.simulate(drawAt(result, dim, s), new Rng(opts.seed, REPLICATE_STREAM + k)));
    rep.specs.forEach((spec, j) => {
      const values = sims.map((x) => x[j]);
      out.replicated.push({ spec, draws, values });
      out.predictive.push(predictiveCheck(spec.name, spec.observed, values, stats, spec.groups));
    });
  }

  if (kind === 'prior') return out;
  const pw = compilePointwise(check, tables);
  if (!pw.ok) {
    out.looUnavailable = pw.reason;
    return out;
  }
  const { rows, tables: order } = pw.pointwise;
  const thin = Math.max(1, Math.ceil((total * rows) / (opts.looMaxCells ?? LOO_MAX_CELLS)));
  // Per chain, every thin-th draw; r_eff per row from the ESS of exp(ll) within the chains.
  const perChain: number[][] = result.chains.map((c) => {
    const n = c.draws.length / dim;
    const idx: number[] = [];
    for (let t = 0; t < n; t += thin) idx.push(t);
    return idx;
  });
  const S = perChain.reduce((n, l) => n + l.length, 0);
  const ll = new Float64Array(S * rows);
  const row = new Float64Array(rows);
  let s = 0;
  result.chains.forEach((c, ci) => {
    for (const t of perChain[ci]) {
      pw.pointwise.evaluate(c.draws.subarray(t * dim, (t + 1) * dim), row);
      ll.set(row, s * rows);
      s++;
    }
  });
  const rEff = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    let m = -Infinity;
    for (let q = 0; q < S; q++) if (ll[q * rows + i] > m) m = ll[q * rows + i];
    const chains: Float64Array[] = [];
    let q = 0;
    for (const idx of perChain) {
      const x = new Float64Array(idx.length);
      for (let j = 0; j < idx.length; j++, q++) x[j] = Math.exp(ll[q * rows + i] - m);
      chains.push(x);
    }
    const ess = chains.every((x) => x.length >= 4) ? essMean(chains) : S;
    rEff[i] = Number.isFinite(ess) && ess > 0 ? ess / S : 1;
  }
  const loo: LooResult = psisLoo(ll, S, rows, rEff);
  const where = (i: number) => {
    const t = order.find((o) => i >= o.offset && i < o.offset + o.rows)!;
    return { table: t.table, row: i - t.offset + 1 };
  };
  out.loo = {
    elpd: loo.elpd,
    se: loo.se,
    mcse: loo.mcse,
    pLoo: loo.pLoo,
    lpd: loo.lpd,
    kThreshold: loo.kThreshold,
    draws: S,
    highK: loo.highK.map((i) => ({ ...where(i), k: loo.rows[i].k })),
    rows: loo.rows.map((r, i) => ({ ...where(i), elpd: r.elpd, pLoo: r.pLoo, k: r.k })),
  };
  return out;
}
