/**
 * The model checks of a run in the compact form stored with its summary (shared/checks.ts): test
 * statistics with their replicated 5–95% interval and p-value, per group, a binned overlay of the
 * observed values against the replicated data sets, and leave-one-out with the rows whose Pareto k
 * is too high named.
 */
import { LOO_LISTED_ROWS, LOO_PLOTTED_ROWS, type LooSummary, type Overlay, type RunChecks, type StatCheckSummary } from '../../../shared/checks';
import type { ModelChecks } from './checks';
import { quantile, type StatCheck } from './ppc';

/** Replicated data sets whose binned shares are kept one by one in the overlay. */
export const OVERLAY_SAMPLE = 20;
/** Pooled replicated values looked at to place the overlay's bins (every t-th beyond this). */
const EDGE_POOL = 200_000;

const fin = (x: number): number | null => (Number.isFinite(x) ? x : null);
/** Four significant digits: the overlay's shares are for the eye. */
const r4 = (x: number) => (x === 0 || !Number.isFinite(x) ? x : Number(x.toPrecision(4)));

function statSummary(c: StatCheck): StatCheckSummary {
  return { stat: c.stat, observed: fin(c.observed), mean: fin(c.replicatedMean), lo: fin(c.replicatedQ05), hi: fin(c.replicatedQ95), p: c.p };
}

/**
 * Bin edges shared by the observed values and every replicate: one bin per whole number when the
 * values are whole numbers over a short range (counts), otherwise Rice's rule ⌈2·n^(1/3)⌉ bins
 * (between 8 and 40) of equal width over the observed range widened to the 0.5%–99.5% quantiles
 * of the replicated values (common practice for histograms).
 */
export function overlayEdges(observed: ArrayLike<number>, replicates: ArrayLike<number>[]): number[] | null {
  const L = observed.length;
  const total = replicates.length * L;
  const step = Math.max(1, Math.ceil(total / EDGE_POOL));
  const pool: number[] = [];
  let whole = true;
  for (let q = 0; q < total; q += step) {
    const v = replicates[Math.floor(q / L)][q % L];
    if (Number.isFinite(v)) {
      pool.push(v);
      if (whole && !Number.isInteger(v)) whole = false;
    }
  }
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < L; i++) {
    const v = observed[i];
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
    if (whole && !Number.isInteger(v)) whole = false;
  }
  if (pool.length) {
    const sorted = Float64Array.from(pool);
    lo = Math.min(lo, quantile(sorted, 0.005));
    hi = Math.max(hi, quantile(sorted, 0.995));
  }
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return null;
  if (whole) {
    lo = Math.floor(lo);
    hi = Math.ceil(hi);
    if (hi - lo <= 60) return Array.from({ length: hi - lo + 2 }, (_, k) => lo - 0.5 + k);
  }
  if (hi === lo) {
    lo -= 0.5;
    hi += 0.5;
  }
  const bins = Math.min(40, Math.max(8, Math.ceil(2 * Math.cbrt(L))));
  const edges = Array.from({ length: bins + 1 }, (_, k) => lo + ((hi - lo) * k) / bins);
  edges[bins] = hi; // exactly, so the largest value is inside
  return edges;
}

/** Shares of the values in each bin; values outside the edges are counted in `out.clipped`. */
function shares(values: ArrayLike<number>, edges: number[], out: { clipped: number }): number[] {
  const bins = edges.length - 1;
  const lo = edges[0];
  const width = (edges[bins] - lo) / bins;
  const counts = new Array<number>(bins).fill(0);
  let n = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    n++;
    if (v < lo || v > edges[bins]) {
      out.clipped++;
      continue;
    }
    // Rounding can put a value at an edge one bin off: keep it inside the range.
    const b = Math.min(bins - 1, Math.max(0, Math.floor((v - lo) / width)));
    counts[b]++;
  }
  return counts.map((c) => (n ? c / n : 0));
}

/** The observed values' shares per bin against the quantiles of the replicated data sets' shares. */
export function overlayOf(observed: ArrayLike<number>, replicates: ArrayLike<number>[]): Overlay | null {
  if (observed.length < 3 || replicates.length === 0) return null;
  const edges = overlayEdges(observed, replicates);
  if (!edges) return null;
  const ignore = { clipped: 0 };
  const clip = { clipped: 0 };
  const obs = shares(observed, edges, ignore);
  const per = replicates.map((r) => shares(r, edges, clip));
  const bins = edges.length - 1;
  const q = (p: number) =>
    Array.from({ length: bins }, (_, b) => {
      const col = new Float64Array(per.length);
      per.forEach((s, k) => (col[k] = s[b]));
      return r4(quantile(col, p));
    });
  const m = Math.min(OVERLAY_SAMPLE, per.length);
  const sample = Array.from({ length: m }, (_, j) => per[Math.floor((j * per.length) / m)].map(r4));
  return { edges, observed: obs.map(r4), q05: q(0.05), q25: q(0.25), q50: q(0.5), q75: q(0.75), q95: q(0.95), sample, clipped: clip.clipped };
}

function looSummary(l: NonNullable<ModelChecks['loo']>): LooSummary {
  const worst = l.highK.slice().sort((a, b) => b.k - a.k);
  let kMax = -Infinity;
  for (const r of l.rows) if (r.k > kMax) kMax = r.k;
  return {
    elpd: l.elpd,
    se: l.se,
    mcse: l.mcse,
    pLoo: l.pLoo,
    kThreshold: l.kThreshold,
    draws: l.draws,
    rows: l.rows.length,
    kMax: l.rows.length ? (Number.isFinite(kMax) ? kMax : null) : null,
    highKCount: l.highK.length,
    highK: worst.slice(0, LOO_LISTED_ROWS).map((h) => ({ table: h.table, row: h.row, k: fin(h.k) })),
    // Per-row k to three decimals for the plot (the named rows keep their full value).
    ...(l.rows.length <= LOO_PLOTTED_ROWS ? { k: l.rows.map((r) => (Number.isFinite(r.k) ? Math.round(r.k * 1000) / 1000 : null)) } : {}),
  };
}

/** The stored form of a run's model checks. */
export function summariseChecks(c: ModelChecks, statistics: string[], use: { draws: number; thin: number }): RunChecks {
  const out: RunChecks = {
    kind: c.kind,
    replicates: c.replicated[0]?.values.length ?? 0,
    statistics,
    items: c.replicated.map((r, j) => {
      const pc = c.predictive[j];
      return {
        name: r.spec.name,
        line: r.spec.line,
        density: r.spec.density,
        rows: r.spec.length,
        ...(r.spec.table ? { table: r.spec.table } : {}),
        stats: pc.checks.map(statSummary),
        groups: pc.groups.map((g) => ({ column: g.column, level: g.level, rows: g.rows, stats: g.checks.map(statSummary) })),
        overlay: overlayOf(r.spec.observed, r.values),
      };
    }),
    draws: use.draws,
    thin: use.thin,
  };
  if (!c.replicated.length) out.skipped = 'the model has no replicate line, so there are no replicated data to compare with the data';
  if (c.loo) {
    const finiteTotals = [c.loo.elpd, c.loo.se, c.loo.mcse, c.loo.pLoo].every(Number.isFinite);
    if (finiteTotals) out.loo = looSummary(c.loo);
    else out.looUnavailable = 'the leave-one-out estimate is not finite (a row has zero likelihood under some draw)';
  }
  if (c.looUnavailable) out.looUnavailable = c.looUnavailable;
  if (c.kind === 'prior' && !out.looUnavailable) out.looUnavailable = 'a prior-only run has no likelihood to leave rows out of';
  return out;
}
