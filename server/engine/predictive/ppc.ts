/**
 * Posterior (or prior) predictive checks: a test statistic of the observed data against the same
 * statistic of every replicated data set, with the predictive p-value
 *   p = Pr(T(y_rep) > T(y)) + ½·Pr(T(y_rep) = T(y))
 * over the replicates (ties counted half — our choice, so discrete statistics such as the minimum
 * or the share of zeros are not pushed towards 1 by ties). p near 0 or 1 says the model rarely
 * reproduces that feature of the data.
 *
 * Reading p: a posterior predictive p-value is not uniform under a correctly specified model; for
 * a statistic the model fits directly (the mean of a normal model) it concentrates near 0.5
 * ("Bayesian Data Analysis", 3rd ed., section 6.3). A prior predictive p-value (replicates from a
 * prior-only run) is uniform when the data come from the model.
 */

/** The built-in statistics. */
export const BUILTIN_STATS = ['mean', 'sd', 'min', 'max', 'zeros'] as const;

export interface Statistic {
  /** Display name, e.g. "mean", "q0.9", "above:10". */
  name: string;
  /** The statistic of the values at the given positions (all when idx is undefined). */
  of(values: ArrayLike<number>, idx?: ArrayLike<number>): number;
}

function pick(values: ArrayLike<number>, idx?: ArrayLike<number>): Float64Array {
  if (!idx) return Float64Array.from(values);
  const out = new Float64Array(idx.length);
  for (let j = 0; j < idx.length; j++) out[j] = values[idx[j]];
  return out;
}

/** Quantile by linear interpolation between order statistics at h = (n − 1)p (definition 7 of the common taxonomy; as the fit summaries). */
export function quantile(x: Float64Array, p: number): number {
  const s = x.slice().sort();
  if (s.length === 0) return NaN;
  const h = (s.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, s.length - 1);
  return s[lo] + (h - lo) * (s[hi] - s[lo]);
}

const mean = (x: Float64Array) => {
  let s = 0;
  for (const v of x) s += v;
  return s / x.length;
};

/**
 * A statistic by name: mean, sd (divisor n − 1), min, max, zeros (share of values equal to 0),
 * median, iqr (q0.75 − q0.25), qP (quantile at 0 < P < 1, e.g. q0.9), above:X (share of values > X),
 * below:X (share of values < X). Throws with the list of names for anything else.
 */
export function statistic(name: string): Statistic {
  const make = (f: (x: Float64Array) => number): Statistic => ({ name, of: (v, idx) => f(pick(v, idx)) });
  switch (name) {
    case 'mean':
      return make(mean);
    case 'sd':
      return make((x) => {
        const m = mean(x);
        let s = 0;
        for (const v of x) s += (v - m) * (v - m);
        return x.length > 1 ? Math.sqrt(s / (x.length - 1)) : 0;
      });
    case 'min':
      return make((x) => x.reduce((a, b) => Math.min(a, b), Infinity));
    case 'max':
      return make((x) => x.reduce((a, b) => Math.max(a, b), -Infinity));
    case 'zeros':
      return make((x) => x.filter((v) => v === 0).length / x.length);
    case 'median':
      return make((x) => quantile(x, 0.5));
    case 'iqr':
      return make((x) => quantile(x, 0.75) - quantile(x, 0.25));
    default:
      break;
  }
  let m = /^q(0?\.[0-9]+)$/.exec(name);
  if (m) {
    const p = Number(m[1]);
    if (p > 0 && p < 1) return make((x) => quantile(x, p));
  }
  m = /^(above|below):(-?[0-9]+(?:\.[0-9]+)?(?:e[+-]?[0-9]+)?)$/.exec(name);
  if (m) {
    const t = Number(m[2]);
    const above = m[1] === 'above';
    return make((x) => x.filter((v) => (above ? v > t : v < t)).length / x.length);
  }
  throw new Error(
    `unknown statistic "${name}": use mean, sd, min, max, zeros, median, iqr, a quantile such as q0.9, or a share such as above:10 or below:0`,
  );
}

export interface StatCheck {
  stat: string;
  observed: number;
  /** Mean and sd of the statistic over the replicates. */
  replicatedMean: number;
  replicatedSd: number;
  /** 5% and 95% quantiles of the statistic over the replicates (finite values only). */
  replicatedQ05: number;
  replicatedQ95: number;
  /** Predictive p-value, ties counted half. */
  p: number;
}

/** One statistic: observed value, replicated mean and sd, p-value. */
export function checkStatistic(stat: Statistic, observed: ArrayLike<number>, replicates: ArrayLike<number>[], idx?: ArrayLike<number>): StatCheck {
  const t = stat.of(observed, idx);
  let above = 0;
  let ties = 0;
  let s = 0;
  let s2 = 0;
  let n = 0;
  const finite = new Float64Array(replicates.length);
  for (const r of replicates) {
    const v = stat.of(r, idx);
    if (v > t) above++;
    else if (v === t) ties++;
    if (Number.isFinite(v)) {
      s += v;
      s2 += v * v;
      finite[n++] = v;
    }
  }
  const m = n ? s / n : NaN;
  const sd = n > 1 ? Math.sqrt(Math.max(0, (s2 - n * m * m) / (n - 1))) : 0;
  const fin = finite.subarray(0, n);
  return {
    stat: stat.name,
    observed: t,
    replicatedMean: m,
    replicatedSd: sd,
    replicatedQ05: quantile(fin, 0.05),
    replicatedQ95: quantile(fin, 0.95),
    p: (above + 0.5 * ties) / replicates.length,
  };
}

export interface GroupCheck {
  column: string;
  level: string;
  rows: number;
  checks: StatCheck[];
}

export interface PredictiveCheck {
  /** Name of the replicate statement. */
  name: string;
  replicates: number;
  checks: StatCheck[];
  /** Per level of each category column that groups the rows. */
  groups: GroupCheck[];
}

/**
 * Every statistic of one replicated data vector, overall and per level of each grouping column
 * (codes 1…K; `levels[k − 1]` names level k).
 */
export function predictiveCheck(
  name: string,
  observed: ArrayLike<number>,
  replicates: ArrayLike<number>[],
  stats: Statistic[],
  groups: { column: string; codes: ArrayLike<number>; levels: string[] }[] = [],
): PredictiveCheck {
  const out: PredictiveCheck = {
    name,
    replicates: replicates.length,
    checks: stats.map((s) => checkStatistic(s, observed, replicates)),
    groups: [],
  };
  for (const g of groups) {
    const byLevel = new Map<number, number[]>();
    for (let i = 0; i < g.codes.length; i++) {
      const c = g.codes[i];
      if (!Number.isInteger(c)) continue;
      const l = byLevel.get(c) ?? [];
      l.push(i);
      byLevel.set(c, l);
    }
    for (const code of [...byLevel.keys()].sort((a, b) => a - b)) {
      const idx = byLevel.get(code)!;
      out.groups.push({
        column: g.column,
        level: g.levels[code - 1] ?? String(code),
        rows: idx.length,
        checks: stats.map((s) => checkStatistic(s, observed, replicates, idx)),
      });
    }
  }
  return out;
}
