/**
 * Annealing on a polytope in a fixed affine frame: the two building blocks of the evidence.
 *
 * Frame. Reduced coordinates z (see geometry/index.ts) are mapped to frame coordinates y by
 * z = origin + L⁻ᵀ y, with L a lower-triangular factor chosen so that the body is round in y (the
 * Dikin factor at the analytic centre) or so that a reference Gaussian is standard in y (the factor of
 * −∇²ℓ at the mode). Integrals in z are integrals in y times |det L⁻ᵀ| = exp(logJac).
 *
 * 1. gaussianAnneal: the integral over P (in y) of
 *        q_β(y) = exp(−β |y − c|² / 2 − κ |y|² / 2),    κ ∈ {0, 1},
 *    from a large β₀, where the Gaussian sits deep inside P and its integral is known in closed form
 *    (the mass it leaves outside is bounded by a union bound over the rows and kept below 1e-10),
 *    down to β = 0: the volume of P (κ = 0) or the mass of the standard Gaussian on P (κ = 1). Each
 *    ratio Z(β′)/Z(β) = E_β[exp((β − β′)|y − c|²/2)] is estimated from draws of q_β. This is the
 *    cooling scheme of "Gaussian cooling and O*(n³) algorithms for volume and Gaussian volume"
 *    (STOC 2015) and "A practical volume algorithm" (Mathematical Programming Computation 2016), with
 *    the next β chosen adaptively so the importance weights keep a set effective sample size.
 *    Draws: hit-and-run along isotropic directions with exact chords, the 1-D conditional being a
 *    normal restricted to the chord (sampled exactly, see truncnormal.ts).
 *
 * 2. temper: the ratio Z(π)/Z(r) of the target π = exp(ℓ) to the reference r = exp(−κ|y|²/2) on P by
 *    stepping-stone sampling ("Improving marginal likelihood estimation for Bayesian phylogenetic
 *    model selection", Systematic Biology 2011) along the path r^(1−t) π^t, t from 0 to 1, each step
 *    again chosen adaptively. Draws: the engine's hit-and-run sampler (samplers/hitrun.ts), slice
 *    sampling along the chord, run on the frame.
 *
 * Both run a population of walkers carried from stage to stage; each stage first moves every walker
 * (burn-in) and then records thinned draws.
 */
import type { PreparedTarget } from '../geometry';
import { backwardL, dot } from '../geometry';
import { RowMatrix } from '../linalg/sparse';
import type { Rng } from '../rng';
import { hitRunStep, makeHitRunState, type HitRunState } from '../samplers/hitrun';
import { truncatedStdNormal } from './truncnormal';

export interface Frame {
  n: number;
  m: number;
  /** Constraint rows in y: A L⁻ᵀ (row-compressed) and b − A·origin. */
  rows: RowMatrix;
  Ay: Float64Array;
  b: Float64Array;
  rowNorm: Float64Array;
  /**
   * Move directions (columns of D, n × n row-major) and their squared lengths; null = the frame's
   * axes. The chord coefficients of direction j are column j of A·D, stored by column below.
   */
  D: Float64Array | null;
  dirNorm2: Float64Array;
  /** Lower factor G with D = G⁻ᵀ (identity when D is null), handed to the slice sampler. */
  G: Float64Array;
  /** A·D (or A) stored by column, for the moves. */
  colPtr: Int32Array;
  colIdx: Int32Array;
  colVal: Float64Array;
  /** 1 / colVal. */
  colInv: Float64Array;
  origin: Float64Array;
  /** Lower factor, row-major n × n. */
  L: Float64Array;
  /** log |det dz/dy| = −Σ log Lᵢᵢ. */
  logJac: number;
  toZ(y: Float64Array, out: Float64Array): Float64Array;
  toY(z: Float64Array, out: Float64Array): Float64Array;
  /**
   * A body given by an oracle instead of rows (m = 0): the chord along an axis and a bound on the
   * Gaussian mass outside. Used for bodies whose H-representation is too large to read per move
   * (the cross-polytope {Σ|yⱼ| ≤ r} has 2^d rows); only the Gaussian cooling (volume) reads it.
   */
  oracle?: BodyOracle;
}

export interface BodyOracle {
  /** The interval of t with y + t·eⱼ inside (y inside), written to out[0], out[1]. */
  chord(y: Float64Array, j: number, out: Float64Array): void;
  inside(y: Float64Array): boolean;
  /** An upper bound on the mass of N(μ, sd² I) outside the body. */
  outsideMass(mu: Float64Array, sd: number): number;
}

/**
 * The ℓ1 ball {Σ|yⱼ| ≤ r} as an oracle: a chord costs O(d) instead of reading 2^d rows. The outside
 * mass bound: the ball holds the ℓ2 ball of radius ρ/√d around μ, ρ = r − |μ|₁, and
 * P(χ²_d ≥ d + 2√(dx) + 2x) ≤ e^(−x) ("Adaptive estimation of a quadratic functional by model
 * selection", Annals of Statistics 2000).
 */
export function l1BallOracle(d: number, r: number): BodyOracle {
  const l1 = (y: Float64Array) => {
    let s = 0;
    for (let q = 0; q < d; q++) s += Math.abs(y[q]);
    return s;
  };
  return {
    chord(y, j, out) {
      const rho = r - (l1(y) - Math.abs(y[j]));
      out[0] = -rho - y[j];
      out[1] = rho - y[j];
    },
    inside: (y) => l1(y) < r,
    outsideMass(mu, sd) {
      const rho = r - l1(mu);
      if (!(rho > 0)) return Infinity;
      const u = (rho * rho) / (d * sd * sd);
      if (u <= d) return 1;
      const sx = (-Math.sqrt(d) + Math.sqrt(2 * u - d)) / 2;
      return Math.exp(-sx * sx);
    },
  };
}

/** The frame of an oracle body in its own coordinates (identity map, no rows). */
export function oracleFrame(n: number, oracle: BodyOracle): Frame {
  const I = identity(n);
  return {
    n,
    m: 0,
    rows: new RowMatrix(new Float64Array(0), 0, n),
    Ay: new Float64Array(0),
    b: new Float64Array(0),
    rowNorm: new Float64Array(0),
    D: null,
    dirNorm2: new Float64Array(n).fill(1),
    G: I,
    colPtr: new Int32Array(n + 1),
    colIdx: new Int32Array(0),
    colVal: new Float64Array(0),
    colInv: new Float64Array(0),
    origin: new Float64Array(n),
    L: I,
    logJac: 0,
    toZ: (y, out) => (out.set(y), out),
    toY: (z, out) => (out.set(z), out),
    oracle,
  };
}

function identity(n: number): Float64Array {
  const I = new Float64Array(n * n);
  for (let q = 0; q < n; q++) I[q * n + q] = 1;
  return I;
}

/** Column-compressed copy of an m × n row-major matrix, with reciprocals of the entries. */
function columns(B: Float64Array, m: number, n: number) {
  const colPtr = new Int32Array(n + 1);
  for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) if (B[i * n + j] !== 0) colPtr[j + 1]++;
  for (let j = 0; j < n; j++) colPtr[j + 1] += colPtr[j];
  const colIdx = new Int32Array(colPtr[n]);
  const colVal = new Float64Array(colPtr[n]);
  const fill = colPtr.slice(0, n);
  for (let i = 0; i < m; i++)
    for (let j = 0; j < n; j++) {
      const v = B[i * n + j];
      if (v !== 0) {
        colIdx[fill[j]] = i;
        colVal[fill[j]++] = v;
      }
    }
  return { colPtr, colIdx, colVal, colInv: colVal.map((v) => 1 / v) };
}

/**
 * The same frame with moves along the columns of D = G⁻ᵀ (G lower triangular): directions that are
 * round for the metric G Gᵀ. Used when the frame whitens a reference Gaussian but the region is far
 * from round in it (a thin strip, a near-equality): moves along the frame's axes would barely move.
 */
export function withRounding(f: Frame, G: Float64Array): Frame {
  const { n, m } = f;
  const D = new Float64Array(n * n);
  const e = new Float64Array(n);
  const col = new Float64Array(n);
  const dirNorm2 = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    backwardL(G, n, e, col);
    let s2 = 0;
    for (let q = 0; q < n; q++) {
      D[q * n + j] = col[q];
      s2 += col[q] * col[q];
    }
    dirNorm2[j] = s2;
  }
  const B = new Float64Array(m * n);
  for (let i = 0; i < m; i++)
    for (let k = 0; k < n; k++) {
      const a = f.Ay[i * n + k];
      if (a === 0) continue;
      for (let j = 0; j < n; j++) B[i * n + j] += a * D[k * n + j];
    }
  for (let k = 0; k < m * n; k++) if (Math.abs(B[k]) < 1e-300) B[k] = 0;
  return { ...f, D, dirNorm2, G, ...columns(B, m, n) };
}

export function makeFrame(p: PreparedTarget, origin: Float64Array, L: Float64Array): Frame {
  const { n, m } = p;
  const Ay = new Float64Array(m * n);
  const b = new Float64Array(m);
  const rowNorm = new Float64Array(m);
  const w = new Float64Array(n);
  for (let i = 0; i < m; i++) {
    // Row i of A L⁻ᵀ is (L⁻¹ aᵢ)ᵀ: forward substitution.
    let bi = p.b[i];
    for (let j = 0; j < n; j++) {
      let s = p.A[i * n + j];
      bi -= s * origin[j];
      for (let k = 0; k < j; k++) s -= L[j * n + k] * w[k];
      w[j] = s / L[j * n + j];
    }
    let nn = 0;
    for (let j = 0; j < n; j++) {
      const v = Math.abs(w[j]) < 1e-300 ? 0 : w[j];
      Ay[i * n + j] = v;
      nn += v * v;
    }
    rowNorm[i] = Math.sqrt(nn);
    b[i] = bi;
  }
  let logJac = 0;
  for (let j = 0; j < n; j++) logJac -= Math.log(L[j * n + j]);
  const tmp = new Float64Array(n);
  return {
    n,
    m,
    rows: new RowMatrix(Ay, m, n),
    Ay,
    b,
    rowNorm,
    D: null,
    dirNorm2: new Float64Array(n).fill(1),
    G: identity(n),
    ...columns(Ay, m, n),
    origin: Float64Array.from(origin),
    L,
    logJac,
    toZ(y, out) {
      backwardL(L, n, y, out);
      for (let j = 0; j < n; j++) out[j] += origin[j];
      return out;
    },
    toY(z, out) {
      // y = Lᵀ (z − origin)
      for (let j = 0; j < n; j++) tmp[j] = z[j] - origin[j];
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let k = j; k < n; k++) s += L[k * n + j] * tmp[k];
        out[j] = s;
      }
      return out;
    },
  };
}

export interface AnnealSettings {
  /** Draws recorded per stage (over all walkers). */
  drawsPerStage: number;
  walkers: number;
  /** Chord moves per walker between recorded draws. */
  thin: number;
  /** Chord moves per walker at the start of each stage. */
  burn: number;
  /** Each step keeps the weights' effective sample size at least this fraction of the draws. */
  essTarget: number;
  /** Refuse to run more stages than this (the schedule did not converge). */
  maxStages: number;
  signal?: AbortSignal;
  /** Called at the start of every stage (for progress). */
  onStage?(): void;
}

export interface StageLog {
  stages: number;
  draws: number;
  moves: number;
  densityEvaluations: number;
}

function abortIfNeeded(signal?: AbortSignal): void {
  if (signal?.aborted) {
    const e = new Error('The evidence computation was cancelled.');
    e.name = 'AbortError';
    throw e;
  }
}

/** log mean exp(a·vᵢ) and the weights' effective sample size fraction. */
function weightStats(v: Float64Array, a: number): { logMean: number; essFrac: number } {
  const N = v.length;
  let mx = -Infinity;
  for (let j = 0; j < N; j++) mx = Math.max(mx, a * v[j]);
  let s1 = 0;
  let s2 = 0;
  for (let j = 0; j < N; j++) {
    const w = Math.exp(a * v[j] - mx);
    s1 += w;
    s2 += w * w;
  }
  return { logMean: mx + Math.log(s1 / N), essFrac: (s1 * s1) / (N * s2) };
}

/**
 * The draws of one walker in four pick the next step; the draws of the other walkers estimate the
 * ratio for it. Picking and estimating with the same draws biases log Z downwards (a sample that
 * misses the weights' tail both allows a longer step and underestimates its ratio). The picking
 * walkers rotate from stage to stage.
 */
function splitHalves(v: Float64Array, perWalker: number, stage: number): [Float64Array, Float64Array] {
  const W = v.length / perWalker;
  const a: number[] = [];
  const b: number[] = [];
  for (let w = 0; w < W; w++) {
    const dst = (w + stage) % 4 === 0 ? a : b;
    for (let r = 0; r < perWalker; r++) dst.push(v[w * perWalker + r]);
  }
  return [Float64Array.from(a), Float64Array.from(b)];
}

/**
 * Largest step a ∈ (0, aMax] with ESS fraction of exp(a·v) ≥ target (aMax itself when it passes),
 * by bisection on log a.
 */
function chooseStep(v: Float64Array, aMax: number, target: number): number {
  if (weightStats(v, aMax).essFrac >= target) return aMax;
  let lo = Math.log(aMax) - 60;
  let hi = Math.log(aMax);
  if (weightStats(v, Math.exp(lo)).essFrac < target) return Math.exp(lo);
  for (let k = 0; k < 60; k++) {
    const mid = 0.5 * (lo + hi);
    if (weightStats(v, Math.exp(mid)).essFrac >= target) lo = mid;
    else hi = mid;
    if (hi - lo < 1e-3) break;
  }
  return Math.exp(lo);
}

/* ---------------------------------------------------------------------------------------------- */
/* Gaussian walkers with exact chords                                                              */
/* ---------------------------------------------------------------------------------------------- */

export interface Walker {
  y: Float64Array;
  s: Float64Array;
}

export function makeWalker(f: Frame, y: Float64Array): Walker {
  const s = new Float64Array(f.m);
  const w = { y: Float64Array.from(y), s };
  resetSlacks(f, w);
  return w;
}

function resetSlacks(f: Frame, w: Walker): void {
  if (f.oracle) {
    if (!f.oracle.inside(w.y)) throw new Error('Internal error: an annealing walker left the region.');
    return;
  }
  f.rows.mul(w.y, w.s);
  for (let i = 0; i < f.m; i++) {
    w.s[i] = f.b[i] - w.s[i];
    if (!(w.s[i] > 0)) throw new Error('Internal error: an annealing walker left the region.');
  }
}

/**
 * One hit-and-run move along a uniformly chosen direction of the frame's fixed set (its axes, or the
 * rounded directions of withRounding; each used forwards and backwards alike) for
 * q(y) ∝ exp(−P |y − μ|²/2) on the polytope (P = β + κ, μ = βc/P), or the uniform distribution when
 * P = 0: the point on the chord is drawn exactly. Costs one column of the rows.
 */
const chordBuf = new Float64Array(2);

function gaussMove(f: Frame, w: Walker, P: number, mu: Float64Array | null, rng: Rng): void {
  const n = f.n;
  const j = rng.int(n);
  const { colPtr, colIdx, colVal, colInv, D } = f;
  const s = w.s;
  const q0 = colPtr[j];
  const q1 = colPtr[j + 1];
  let tmin = -Infinity;
  let tmax = Infinity;
  if (f.oracle) {
    f.oracle.chord(w.y, j, chordBuf);
    tmin = chordBuf[0];
    tmax = chordBuf[1];
  }
  for (let q = q0; q < q1; q++) {
    const r = s[colIdx[q]] * colInv[q];
    if (colVal[q] > 0) {
      if (r < tmax) tmax = r;
    } else if (r > tmin) tmin = r;
  }
  let t: number;
  if (P === 0) {
    if (!Number.isFinite(tmin) || !Number.isFinite(tmax)) {
      throw new Error('The region is unbounded, so it has no finite volume.');
    }
    t = tmin + (tmax - tmin) * rng.uniformPositive();
  } else {
    // Along y + t d: exponent −P/2 |y + t d − μ|², a normal in t with precision P|d|².
    const d2 = f.dirNorm2[j];
    let proj: number;
    if (D) {
      proj = 0;
      for (let q = 0; q < n; q++) proj += D[q * n + j] * (w.y[q] - (mu ? mu[q] : 0));
    } else proj = w.y[j] - (mu ? mu[j] : 0);
    const sd = 1 / Math.sqrt(P * d2);
    const m0 = -proj / d2;
    t = m0 + sd * truncatedStdNormal((tmin - m0) / sd, (tmax - m0) / sd, rng);
  }
  if (f.oracle) {
    const before = w.y[j];
    w.y[j] = before + t;
    // Round-off put the point on the boundary: undo the move.
    if (!f.oracle.inside(w.y)) w.y[j] = before;
    return;
  }
  let ok = true;
  for (let q = q0; q < q1; q++) {
    const v = (s[colIdx[q]] -= t * colVal[q]);
    if (!(v > 0)) ok = false;
  }
  if (!ok) {
    // Round-off put the point on a face: undo the move.
    for (let q = q0; q < q1; q++) s[colIdx[q]] += t * colVal[q];
    return;
  }
  if (D) for (let q = 0; q < n; q++) w.y[q] += t * D[q * n + j];
  else w.y[j] += t;
}

/** Union bound on the mass of N(μ, sd² I) outside the polytope: Σ Φ̄(sᵢ / (|aᵢ| sd)), with Φ̄(x) ≤ φ(x)/x. */
function outsideMassBound(f: Frame, mu: Float64Array, sd: number): number {
  if (f.oracle) return f.oracle.outsideMass(mu, sd);
  let total = 0;
  for (let i = 0; i < f.m; i++) {
    let s = f.b[i];
    for (let q = 0; q < f.n; q++) s -= f.Ay[i * f.n + q] * mu[q];
    if (!(s > 0)) return Infinity;
    if (f.rowNorm[i] === 0) continue;
    const x = s / (f.rowNorm[i] * sd);
    total += x > 1 ? Math.exp(-0.5 * x * x) / (x * Math.sqrt(2 * Math.PI)) : 1;
  }
  return total;
}

const OUTSIDE_MASS = 1e-10;

export interface GaussianAnnealResult extends StageLog {
  /** log ∫_P exp(−κ|y|²/2) dy (κ = 0: the volume of P in y). */
  logZ: number;
  /** Walkers distributed (approximately) as the end point q₀ restricted to P. */
  walkers: Walker[];
}

export function gaussianAnneal(f: Frame, c: Float64Array, kappa: 0 | 1, rng: Rng, cfg: AnnealSettings): GaussianAnnealResult {
  const n = f.n;
  const log2pi = Math.log(2 * Math.PI);
  const muOf = (beta: number, out: Float64Array) => {
    const P = beta + kappa;
    for (let q = 0; q < n; q++) out[q] = P > 0 ? (beta * c[q]) / P : 0;
    return out;
  };
  const logZClosed = (beta: number) => {
    const P = beta + kappa;
    let cc = 0;
    for (let q = 0; q < n; q++) cc += c[q] * c[q];
    return (-beta * kappa * cc) / (2 * P) + 0.5 * n * (log2pi - Math.log(P));
  };
  const mu = new Float64Array(n);
  const log: StageLog = { stages: 0, draws: 0, moves: 0, densityEvaluations: 0 };
  // The whole Gaussian already inside (κ = 1 with no binding rows): exact.
  if (kappa === 1 && outsideMassBound(f, muOf(0, mu), 1) <= OUTSIDE_MASS) {
    const walkers: Walker[] = [];
    for (let k = 0; k < cfg.walkers; k++) walkers.push(makeWalker(f, exactInside(f, mu, 1, rng)));
    return { logZ: logZClosed(0), walkers, ...log };
  }
  let beta = 1;
  for (let k = 0; k < 400 && outsideMassBound(f, muOf(beta, mu), 1 / Math.sqrt(beta + kappa)) > OUTSIDE_MASS; k++) beta *= 2;
  if (outsideMassBound(f, muOf(beta, mu), 1 / Math.sqrt(beta + kappa)) > OUTSIDE_MASS) {
    throw new Error('Internal error: no starting Gaussian fits inside the region.');
  }
  let logZ = logZClosed(beta);
  const walkers: Walker[] = [];
  const sd0 = 1 / Math.sqrt(beta + kappa);
  for (let k = 0; k < cfg.walkers; k++) walkers.push(makeWalker(f, exactInside(f, mu, sd0, rng)));
  const N = cfg.drawsPerStage;
  const perWalker = Math.ceil(N / cfg.walkers);
  const v = new Float64Array(perWalker * cfg.walkers);
  for (;;) {
    abortIfNeeded(cfg.signal);
    cfg.onStage?.();
    if (log.stages >= cfg.maxStages) throw new Error(`The annealing schedule needed more than ${cfg.maxStages} stages.`);
    const P = beta + kappa;
    muOf(beta, mu);
    let j = 0;
    for (const w of walkers) {
      resetSlacks(f, w);
      for (let k = 0; k < cfg.burn; k++) gaussMove(f, w, P, mu, rng);
      log.moves += cfg.burn;
      for (let r = 0; r < perWalker; r++) {
        for (let k = 0; k < cfg.thin; k++) gaussMove(f, w, P, mu, rng);
        log.moves += cfg.thin;
        let d2 = 0;
        for (let q = 0; q < n; q++) d2 += (w.y[q] - c[q]) ** 2;
        v[j++] = 0.5 * d2;
      }
    }
    log.draws += v.length;
    const [pick, est] = splitHalves(v, perWalker, log.stages);
    log.stages++;
    const step = chooseStep(pick, beta, cfg.essTarget);
    const next = step >= beta ? 0 : beta - step;
    logZ += weightStats(est, beta - next).logMean;
    beta = next;
    if (beta === 0) break;
  }
  // Move the walkers once at β = 0 so they start the next phase from the end point.
  for (const w of walkers) {
    resetSlacks(f, w);
    for (let k = 0; k < cfg.burn; k++) gaussMove(f, w, kappa, null, rng);
    log.moves += cfg.burn;
  }
  return { logZ, walkers, ...log };
}

/** An exact draw of N(μ, sd² I) conditioned on the polytope (rejection; the outside mass is tiny). */
function exactInside(f: Frame, mu: Float64Array, sd: number, rng: Rng): Float64Array {
  const y = new Float64Array(f.n);
  const s = new Float64Array(f.m);
  for (let tries = 0; tries < 1000; tries++) {
    for (let q = 0; q < f.n; q++) y[q] = mu[q] + sd * rng.normal();
    f.rows.mul(y, s);
    let ok = true;
    for (let i = 0; i < f.m; i++) if (!(f.b[i] - s[i] > 0)) ok = false;
    if (f.oracle && !f.oracle.inside(y)) ok = false;
    if (ok) return y;
  }
  throw new Error('Internal error: could not place a walker inside the region.');
}

/* ---------------------------------------------------------------------------------------------- */
/* Tempering from the reference to the target                                                      */
/* ---------------------------------------------------------------------------------------------- */

export interface TemperResult extends StageLog {
  /** log Z(π) − log Z(r), both over P in y. */
  logRatio: number;
}

/**
 * ell(y) is the target's log-density in frame coordinates (with any constant subtracted); the
 * reference is −κ|y|²/2. `walkers` are draws of the reference on P (from gaussianAnneal).
 */
export function temper(
  p: PreparedTarget,
  f: Frame,
  ell: (y: Float64Array) => number,
  kappa: 0 | 1,
  walkers: Walker[],
  rng: Rng,
  cfg: AnnealSettings,
): TemperResult {
  const n = f.n;
  const ref = (y: Float64Array) => (kappa === 0 ? 0 : -0.5 * dot(y, y));
  let t = 0;
  const log: StageLog = { stages: 0, draws: 0, moves: 0, densityEvaluations: 0 };
  const zBuf = new Float64Array(n);
  const frameTarget: PreparedTarget = {
    target: p.target,
    n,
    A: f.Ay,
    b: f.b,
    m: f.m,
    toTheta: (y, out) => p.toTheta(f.toZ(y, zBuf), out),
    logDensity: (y) => {
      const e = ell(y);
      log.densityEvaluations++;
      return (1 - t) * ref(y) + t * e;
    },
    centre: walkers[0].y,
    rowLabels: p.rowLabels,
    bounded: p.bounded,
    dikinL: f.G,
    rows: f.rows,
    theta0: p.theta0,
    N: p.N,
    flat: false,
  };
  const N = cfg.drawsPerStage;
  const perWalker = Math.ceil(N / cfg.walkers);
  const v = new Float64Array(perWalker * cfg.walkers);
  let states: HitRunState[] | null = null;
  let width = kappa === 1 ? 2.5 : 1;
  let logRatio = 0;
  for (;;) {
    abortIfNeeded(cfg.signal);
    cfg.onStage?.();
    if (log.stages >= cfg.maxStages) throw new Error(`The tempering schedule needed more than ${cfg.maxStages} stages.`);
    let j = 0;
    if (t === 0) {
      // The reference itself: exact chords.
      for (const w of walkers) {
        resetSlacks(f, w);
        for (let r = 0; r < perWalker; r++) {
          for (let k = 0; k < cfg.thin; k++) gaussMove(f, w, kappa, null, rng);
          log.moves += cfg.thin;
          v[j++] = ell(w.y) - ref(w.y);
          log.densityEvaluations++;
        }
      }
    } else {
      if (!states) states = walkers.map((w) => makeHitRunState(frameTarget, w.y, false));
      let jumpSum = 0;
      let jumpCount = 0;
      for (const st of states) {
        st.width = width;
        st.l = frameTarget.logDensity(st.z, st.grad);
        for (let k = 0; k < cfg.burn; k++) {
          jumpSum += hitRunStep(frameTarget, st, rng, false);
          jumpCount++;
        }
        log.moves += cfg.burn;
        for (let r = 0; r < perWalker; r++) {
          for (let k = 0; k < cfg.thin; k++) hitRunStep(frameTarget, st, rng, false);
          log.moves += cfg.thin;
          v[j++] = ell(st.z) - ref(st.z);
          log.densityEvaluations++;
        }
      }
      // Slice width for the next stage: a few typical jumps (as in the fit's warm-up).
      if (jumpCount > 0 && jumpSum > 0) width = Math.max(1e-8, (3 * jumpSum) / jumpCount);
    }
    log.draws += v.length;
    const [pick, est] = splitHalves(v, perWalker, log.stages);
    log.stages++;
    const step = chooseStep(pick, 1 - t, cfg.essTarget);
    const next = step >= 1 - t ? 1 : t + step;
    logRatio += weightStats(est, next - t).logMean;
    t = next;
    if (t === 1) break;
  }
  return { logRatio, ...log };
}
