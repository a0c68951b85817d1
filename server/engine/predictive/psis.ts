/**
 * Pareto-smoothed importance-sampling leave-one-out cross-validation (PSIS-LOO).
 *
 * Methods: "Practical Bayesian model evaluation using leave-one-out cross-validation and WAIC"
 * (Statistics and Computing 27, 2017) and "Pareto smoothed importance sampling" (JMLR 2024).
 * For row i the raw importance ratios of leaving it out are r_s = 1 / p(y_i | θ_s). The largest
 * M = ⌈min(S/5, 3·√(S/r_eff))⌉ ratios are replaced by the expected order statistics of a
 * generalized Pareto distribution fitted to them, then every weight is truncated at the largest
 * raw weight. The fitted shape k̂ says how far the estimate can be trusted: above 0.7 the
 * leave-one-out estimate of that row is unreliable (the row is highly influential).
 *
 * The generalized Pareto fit is the method of "A new and efficient estimation method for the
 * generalized Pareto distribution" (Technometrics 2009): the posterior mean of θ = −k/σ over a
 * grid of M = 30 + ⌊√n⌋ points with the profile likelihood as weights; then k̂ is shrunk towards
 * 0.5 as by a weak prior worth 10 observations, k̂ ← (n·k̂ + 10·0.5)/(n + 10) (the common
 * regularisation of the PSIS papers' reference implementation).
 *
 * Monte Carlo standard error of each row's elpd_loo: the delta method on the self-normalised
 * importance-sampling estimate of p(y_i | y_−i), var ≈ Σ w̃_s² (p_s − p̂)² / p̂² (w̃ normalised
 * weights), divided by the relative efficiency r_eff (1 for independent draws; ESS/S for a chain).
 */

export interface GpdFit {
  k: number;
  sigma: number;
}

/**
 * Generalized Pareto fit to exceedances x (> 0, sorted ascending), shape k (k > 0: heavy tail)
 * and scale sigma. `regularise` applies the weak prior on k.
 */
export function gpdFit(x: ArrayLike<number>, regularise = true): GpdFit {
  const n = x.length;
  const prior = 3;
  const m = 30 + Math.floor(Math.sqrt(n));
  const xstar = x[Math.max(0, Math.floor(n / 4 + 0.5) - 1)];
  const xmax = x[n - 1];
  const theta = new Float64Array(m);
  const ltheta = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    theta[j] = 1 / xmax + (1 - Math.sqrt(m / (j + 1 - 0.5))) / prior / xstar;
    // profile log-likelihood: n·(log(−θ/k) − k − 1) with k = mean log1p(−θ x)
    const a = -theta[j];
    let kk = 0;
    for (let i = 0; i < n; i++) kk += Math.log1p(a * x[i]);
    kk /= n;
    ltheta[j] = n * (Math.log(a / kk) - kk - 1);
  }
  let mx = -Infinity;
  for (let j = 0; j < m; j++) if (ltheta[j] > mx) mx = ltheta[j];
  let den = 0;
  for (let j = 0; j < m; j++) den += Math.exp(ltheta[j] - mx);
  let thetaHat = 0;
  for (let j = 0; j < m; j++) {
    const w = Math.exp(ltheta[j] - mx) / den;
    if (w === w) thetaHat += theta[j] * w;
  }
  let k = 0;
  for (let i = 0; i < n; i++) k += Math.log1p(-thetaHat * x[i]);
  k /= n;
  const sigma = -k / thetaHat;
  if (regularise) k = (n * k + 10 * 0.5) / (n + 10);
  if (Number.isNaN(k)) k = Infinity;
  return { k, sigma };
}

/** Quantile function of the generalized Pareto distribution (location 0). */
export function gpdQuantile(p: number, k: number, sigma: number): number {
  if (!(sigma > 0)) return NaN;
  return k === 0 ? -sigma * Math.log1p(-p) : (sigma * Math.expm1(-k * Math.log1p(-p))) / k;
}

function logSumExp(x: ArrayLike<number>): number {
  let m = -Infinity;
  for (let i = 0; i < x.length; i++) if (x[i] > m) m = x[i];
  if (m === -Infinity || m === Infinity) return m;
  let s = 0;
  for (let i = 0; i < x.length; i++) s += Math.exp(x[i] - m);
  return m + Math.log(s);
}

/** The element that would sit at index n (0-based) if x were sorted ascending; reorders x. */
export function nthSmallest(x: Float64Array, n: number): number {
  let lo = 0;
  let hi = x.length - 1;
  while (lo < hi) {
    const pivot = x[(lo + hi) >>> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (x[i] < pivot) i++;
      while (x[j] > pivot) j--;
      if (i <= j) {
        const t = x[i];
        x[i] = x[j];
        x[j] = t;
        i++;
        j--;
      }
    }
    if (n <= j) hi = j;
    else if (n >= i) lo = i;
    else return x[n];
  }
  return x[n];
}

/** Tail length for S draws: ⌈min(S/5, 3·√(S/r_eff))⌉. */
export function tailLength(S: number, rEff = 1): number {
  return Math.ceil(Math.min(0.2 * S, 3 * Math.sqrt(S / rEff)));
}

/**
 * Pareto-smoothed log weights from log importance ratios (modified copy), normalised to sum 1
 * on the probability scale, and the shape k̂ (Infinity when the tail has fewer than 5 draws;
 * 0 when every ratio in the tail is the same, which needs no smoothing).
 */
export function psisSmooth(logRatios: ArrayLike<number>, rEff = 1): { logWeights: Float64Array; k: number } {
  const S = logRatios.length;
  const lw = Float64Array.from(logRatios);
  let mx = -Infinity;
  for (let s = 0; s < S; s++) if (lw[s] > mx) mx = lw[s];
  for (let s = 0; s < S; s++) lw[s] -= mx;
  let k = Infinity;
  const M = tailLength(S, rEff);
  if (M >= 5 && S > M) {
    // The M largest values in ascending order (their indices), and the largest value below them.
    const cutoff = nthSmallest(Float64Array.from(lw), S - M - 1);
    const tail: number[] = [];
    for (let s = 0; s < S; s++) if (lw[s] > cutoff) tail.push(s);
    for (let s = 0; s < S && tail.length < M; s++) if (lw[s] === cutoff) tail.push(s); // ties at the cutoff
    tail.sort((a, b) => lw[a] - lw[b]);
    const tailMin = lw[tail[0]];
    const tailMax = lw[tail[M - 1]];
    if (Math.abs(tailMax - tailMin) < Number.EPSILON / 100) {
      k = 0;
    } else {
      const expCut = Math.exp(cutoff);
      const exceed = new Float64Array(M);
      for (let j = 0; j < M; j++) exceed[j] = Math.exp(lw[tail[j]]) - expCut;
      const fit = gpdFit(exceed);
      k = fit.k;
      if (Number.isFinite(k)) {
        for (let j = 0; j < M; j++) lw[tail[j]] = Math.log(gpdQuantile((j + 1 - 0.5) / M, k, fit.sigma) + expCut);
      }
    }
  }
  for (let s = 0; s < S; s++) if (lw[s] > 0) lw[s] = 0; // truncate at the largest raw weight
  const norm = logSumExp(lw);
  for (let s = 0; s < S; s++) lw[s] -= norm;
  return { logWeights: lw, k };
}

export interface LooRow {
  /** elpd_loo of the row: log p(y_i | y_−i), estimated. */
  elpd: number;
  /** Monte Carlo standard error of elpd. */
  mcse: number;
  /** Effective number of parameters of the row: lpd_i − elpd_i. */
  pLoo: number;
  /** Pareto shape k̂ of the row's importance ratios. */
  k: number;
}

export interface LooResult {
  rows: LooRow[];
  /** Σ elpd_i. */
  elpd: number;
  /** Standard error of the total: √(n · var(elpd_i)). */
  se: number;
  /** Monte Carlo standard error of the total: √Σ mcse_i². */
  mcse: number;
  /** Effective number of parameters: Σ (lpd_i − elpd_i). */
  pLoo: number;
  /** Log pointwise predictive density of the data given all of it, Σ log mean_s p(y_i | θ_s). */
  lpd: number;
  /** 0-based indices of the rows with k̂ > `kThreshold`. */
  highK: number[];
  kThreshold: number;
}

/** The k̂ above which a row's leave-one-out estimate is flagged (the 2017 paper's threshold). */
export const K_THRESHOLD = 0.7;

/**
 * PSIS-LOO from a draws × rows matrix of pointwise log-likelihoods (row-major: entry
 * [s·rows + i] is log p(y_i | θ_s)). `rEff` is one relative efficiency for every row or one per
 * row (1 for independent draws).
 */
export function psisLoo(logLik: Float64Array, draws: number, rows: number, rEff: number | ArrayLike<number> = 1): LooResult {
  if (logLik.length !== draws * rows) throw new Error('psisLoo: the matrix must be draws × rows');
  const out: LooRow[] = [];
  const ll = new Float64Array(draws);
  const neg = new Float64Array(draws);
  const tmp = new Float64Array(draws);
  for (let i = 0; i < rows; i++) {
    for (let s = 0; s < draws; s++) {
      ll[s] = logLik[s * rows + i];
      neg[s] = -ll[s];
    }
    const re = typeof rEff === 'number' ? rEff : rEff[i];
    const { logWeights, k } = psisSmooth(neg, re);
    for (let s = 0; s < draws; s++) tmp[s] = logWeights[s] + ll[s];
    const elpd = logSumExp(tmp);
    const lpd = logSumExp(ll) - Math.log(draws);
    // MCSE by the delta method, on a scale that cannot overflow.
    let m = -Infinity;
    for (let s = 0; s < draws; s++) if (ll[s] > m) m = ll[s];
    let e = 0;
    for (let s = 0; s < draws; s++) e += Math.exp(logWeights[s]) * Math.exp(ll[s] - m);
    let v = 0;
    for (let s = 0; s < draws; s++) {
      const w = Math.exp(logWeights[s]);
      const d = Math.exp(ll[s] - m) - e;
      v += w * w * d * d;
    }
    const mcse = Math.sqrt(v / re) / e;
    out.push({ elpd, mcse, pLoo: lpd - elpd, k: Number.isFinite(k) ? k : k });
  }
  let elpd = 0;
  let pLoo = 0;
  let v2 = 0;
  for (const r of out) {
    elpd += r.elpd;
    pLoo += r.pLoo;
    v2 += r.mcse * r.mcse;
  }
  const mean = elpd / rows;
  let ss = 0;
  for (const r of out) ss += (r.elpd - mean) * (r.elpd - mean);
  const se = rows > 1 ? Math.sqrt((rows * ss) / (rows - 1)) : 0;
  return {
    rows: out,
    elpd,
    se,
    mcse: Math.sqrt(v2),
    pLoo,
    lpd: elpd + pLoo,
    highK: out.flatMap((r, i) => (r.k > K_THRESHOLD ? [i] : [])),
    kThreshold: K_THRESHOLD,
  };
}
