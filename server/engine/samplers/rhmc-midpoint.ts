/**
 * Barrier-metric RHMC with a split integrator: explicit half-kicks of the position-only part and the
 * implicit midpoint rule for the kinetic part ("Unbiased constrained sampling with self-concordant
 * barrier Hamiltonian Monte Carlo", NeurIPS 2023, which also gives the run-back check).
 *
 * H(z, p) = U(z) + K(z, p),  U = −ℓ(z) + ½ log det g(z),  K = ½ pᵀ g(z)⁻¹ p,
 * g(z) = Aᵀ S⁻² A + Λ (rows normalised, slacks s = b − A z, Λ a positive diagonal adapted in warm-up).
 *
 * One step (Strang splitting, symmetric and symplectic since each piece is):
 *   p ← p − ε/2 ∇U(z)                                           explicit
 *   (z, p) ← implicit midpoint step of the K-flow                 implicit (below)
 *   p ← p − ε/2 ∇U(z)                                           explicit
 * with ∇U = −∇ℓ + Aᵀ(ℓev / s³), ℓevᵢ = aᵢᵀ g⁻¹ aᵢ (leverages), and ∇_z K = −Aᵀ((A v)² / s³), v = g⁻¹p.
 *
 * Implicit midpoint for K: z₁ = z₀ + ε v, p₁ = p₀ + ε Aᵀ(a² / s_m³), where v = g(z_m)⁻¹ p_m at the
 * midpoint z_m = z₀ + ε/2 v, a = A v, s_m = s₀ − ε/2 a. Eliminating p_m gives one equation in v:
 *   F(v) = Aᵀ f(a) + Λ v − p₀ = 0,   fᵢ = aᵢ / s_mᵢ² − ε/2 aᵢ² / s_mᵢ³,
 * whose Jacobian Aᵀ diag(φ′) A + Λ with φ′ᵢ = (s₀² − 2 s₀ uᵢ − 2 uᵢ²)/(s₀ − uᵢ)⁴, uᵢ = ε aᵢ/2, is
 * symmetric and has the barrier metric's structure. Per row, with x = u/s₀, fᵢ = (2/ε) x(1 − 2x)/
 * (1 − x)³ / s₀ is increasing exactly on x ∈ (−(1+√3)/2, (√3−1)/2) — the convex branch — where it
 * reaches ±2/(3√3)·(2/ε)/s₀: the equations have a solution while ε |aᵢ| / sᵢ stays below about
 * 4/(3√3) ≈ 0.77 (against about ½ for the generalised leapfrog). On the branch s₁ = s₀(1 − 2x) > 0:
 * the step never leaves the region.
 *
 * Solver (simplified Newton): the first iterate v₁ = g(z₀)⁻¹ p₀ is the Newton step from v = 0 and
 * uses the metric's factor at z₀ (already available); the Newton matrix is factorised once at v₁
 * and reused (chord iterations, stopped by the contraction estimate of "Solving Ordinary
 * Differential Equations II", §IV.8); every update is shortened so each row stays on the convex
 * branch; a poor contraction triggers one more factorisation (at most `maxRefactor`). Each step is
 * then run back from (z₁, −p₁) and must return to z₀ (involution check), so a failed or wrong-root
 * solve only rejects the transition: the chain stays exact. About 3 factorisations per step:
 * Newton matrix forward, g(z₁), Newton matrix backward.
 *
 * All factorisations go through linalg/metric.ts, which exploits the rows' structure (diagonal,
 * banded, plus low rank, or dense).
 */
import type { ChainOptions, ChainOutput } from '../types';
import type { PreparedTarget } from '../geometry';
import type { Rng } from '../rng';
import type { RowMatrix } from '../linalg/sparse';
import { detectStructure, makeMetricFactor, type MetricFactor, type MetricKind, type MetricStructure } from '../linalg/metric';
import { DualAveraging, warmupBuffers, windowEnds } from './adapt';
import { curvatureDiagonal, type StepResult } from './rhmc';

export interface MidpointSettings {
  /** Target Metropolis acceptance for dual averaging (failed solves count as 0). */
  targetAccept: number;
  /** Initial integration time ε·L in metric units. */
  trajectoryLength: number;
  /** Adapt the integration time in warm-up by the ChEES criterion. */
  adaptTrajectory: boolean;
  minTrajectory: number;
  maxTrajectory: number;
  /** Largest number of steps in one trajectory. */
  maxSteps: number;
  /** Tolerance of the implicit solve (Dikin norm of the position error). */
  tolerance: number;
  maxNewton: number;
  /** Extra factorisations of the Newton matrix allowed when the chord iteration contracts poorly. */
  maxRefactor: number;
  /**
   * Refactorise the Newton matrix at every iteration (full Newton) instead of chord iterations.
   * With structured factorisations a factorisation costs about as much as a solve, so this can pay:
   * measured on 2 loaded cores (2 chains × 200 + 300, 50 dimensions), about 11 instead of 22
   * iterations per step and 0.39–0.41 against 0.57–0.58 ms per step on the simplex, but 0.28–0.45
   * against 0.36–0.41 ms on the order simplex (within the noise). Off by default.
   */
  fullNewton: boolean;
  /** Fraction of the convex branch an iterate may use. */
  branchMargin: number;
  /** Dual averaging's shrinkage target as a multiple of the step at each restart (adapt.ts). */
  dualAveragingMu: number;
  /**
   * Dual averaging's γ (0.05 in the paper). With the paper's value one failed solve early in a
   * window moves log ε by about 2.5 and the iterates spend most of the window far below the cliff
   * where acceptance is flat near 1: measured on the uniform 50-simplex (200 warm-up, target 0.9),
   * γ = 0.05 gave ε 0.108 and acceptance 0.966, γ = 0.15 gave ε 0.161 and acceptance 0.923, γ = 0.3
   * gave ε 0.164 and 0.919, all without rejected draws.
   */
  dualAveragingGamma: number;
  /** Factor on dual averaging's final step size. */
  finalStepScale: number;
  involutionCheck: boolean;
  involutionTolerance: number;
  /** Force a factorisation structure (tests, benchmarks); otherwise chosen from the rows. */
  structure?: MetricKind | 'structured';
}

export const DEFAULT_MIDPOINT: MidpointSettings = {
  targetAccept: 0.9,
  trajectoryLength: 3,
  adaptTrajectory: true,
  minTrajectory: 0.5,
  maxTrajectory: 8,
  maxSteps: 128,
  tolerance: 1e-10,
  maxNewton: 40,
  maxRefactor: 2,
  fullNewton: false,
  branchMargin: 0.97,
  dualAveragingMu: 2,
  dualAveragingGamma: 0.15,
  finalStepScale: 1,
  involutionCheck: true,
  involutionTolerance: 1e-7,
};

/** What the integrator needs of a prepared target (the scaling benchmark builds one directly). */
export type BarrierRegion = Pick<PreparedTarget, 'n' | 'm' | 'rows' | 'b' | 'logDensity'>;

const X_HI = (Math.sqrt(3) - 1) / 2;
const X_LO = -(1 + Math.sqrt(3)) / 2;

/** Everything known at one point z. */
export class MidpointPoint {
  readonly z: Float64Array;
  readonly s: Float64Array;
  readonly f: MetricFactor;
  readonly gradL: Float64Array;
  readonly gradU: Float64Array;
  l = NaN;
  logDet = NaN;
  constructor(n: number, m: number, rows: RowMatrix, st: MetricStructure) {
    this.z = new Float64Array(n);
    this.s = new Float64Array(m);
    this.f = makeMetricFactor(rows, st);
    this.gradL = new Float64Array(n);
    this.gradU = new Float64Array(n);
  }
  copyFrom(o: MidpointPoint): void {
    this.z.set(o.z);
    this.s.set(o.s);
    this.f.copyFrom(o.f);
    this.gradL.set(o.gradL);
    this.gradU.set(o.gradU);
    this.l = o.l;
    this.logDet = o.logDet;
  }
}

export class MidpointIntegrator {
  readonly n: number;
  readonly m: number;
  readonly rows: RowMatrix;
  readonly b: Float64Array;
  readonly lambda: Float64Array;
  readonly structure: MetricStructure;
  factorizations = 0;
  steps = 0;
  newtonIterations = 0;
  private readonly J: MetricFactor;
  private readonly wm: Float64Array;
  private readonly am: Float64Array;
  private readonly dm: Float64Array;
  private readonly tm: Float64Array;
  private readonly v: Float64Array;
  private readonly vb: Float64Array;
  private readonly pb: Float64Array;
  private readonly F: Float64Array;
  private readonly delta: Float64Array;
  private readonly tn: Float64Array;

  constructor(
    private readonly p: BarrierRegion,
    lambda: Float64Array,
    readonly settings: MidpointSettings = DEFAULT_MIDPOINT,
    structure?: MetricStructure,
  ) {
    this.n = p.n;
    this.m = p.m;
    this.rows = p.rows;
    this.b = p.b;
    this.lambda = Float64Array.from(lambda);
    this.structure = structure ?? detectStructure(p.rows, settings.structure);
    this.J = makeMetricFactor(p.rows, this.structure);
    const { n, m } = this;
    this.wm = new Float64Array(m);
    this.am = new Float64Array(m);
    this.dm = new Float64Array(m);
    this.tm = new Float64Array(m);
    this.v = new Float64Array(n);
    this.vb = new Float64Array(n);
    this.pb = new Float64Array(n);
    this.F = new Float64Array(n);
    this.delta = new Float64Array(n);
    this.tn = new Float64Array(n);
  }

  newPoint(): MidpointPoint {
    return new MidpointPoint(this.n, this.m, this.rows, this.structure);
  }

  setLambda(lambda: Float64Array): void {
    this.lambda.set(lambda);
  }

  slacks(z: Float64Array, s: Float64Array): boolean {
    this.rows.mul(z, s);
    let ok = true;
    for (let i = 0; i < this.m; i++) {
      s[i] = this.b[i] - s[i];
      if (!(s[i] > 0)) ok = false;
    }
    return ok;
  }

  /** Evaluates the metric's factor, ℓ, ∇ℓ and ∇U at ps.z. */
  evaluate(ps: MidpointPoint): StepResult {
    const { m, n, rows } = this;
    if (!this.slacks(ps.z, ps.s)) return 'left-region';
    const w = this.wm;
    for (let i = 0; i < m; i++) w[i] = 1 / (ps.s[i] * ps.s[i]);
    // Without inequalities g = Λ is diagonal and constant: nothing to factorise (count 0, as before).
    if (m > 0) this.factorizations++;
    if (!ps.f.factor(w, this.lambda)) return 'not-finite';
    ps.logDet = ps.f.logDet();
    const l = this.p.logDensity(ps.z, ps.gradL);
    if (!Number.isFinite(l)) return 'not-finite';
    for (let q = 0; q < n; q++) if (!Number.isFinite(ps.gradL[q])) return 'not-finite';
    ps.l = l;
    for (let q = 0; q < n; q++) ps.gradU[q] = -ps.gradL[q];
    if (m > 0) {
      const lev = ps.f.leverages(this.tm);
      for (let i = 0; i < m; i++) {
        const si = ps.s[i];
        lev[i] = lev[i] / (si * si * si);
      }
      rows.addMulT(lev, ps.gradU, 1);
    }
    return 'ok';
  }

  /** H(z, p) at an evaluated point; v receives g⁻¹ p. */
  energy(ps: MidpointPoint, pm: Float64Array, v: Float64Array = this.tn): number {
    ps.f.solve(pm, v);
    let k = 0;
    for (let q = 0; q < this.n; q++) k += pm[q] * v[q];
    return -ps.l + 0.5 * ps.logDet + 0.5 * k;
  }

  /** out ~ N(0, g(z)): Aᵀ S⁻¹ ξ + Λ^½ η (covariance Aᵀ S⁻² A + Λ), m + n normals. */
  sampleMomentum(ps: MidpointPoint, rng: Rng, xi: Float64Array, eta: Float64Array, out: Float64Array): Float64Array {
    rng.normals(eta);
    for (let q = 0; q < this.n; q++) out[q] = Math.sqrt(this.lambda[q]) * eta[q];
    if (this.m > 0) {
      rng.normals(xi);
      for (let i = 0; i < this.m; i++) xi[i] /= ps.s[i];
      this.rows.addMulT(xi, out, 1);
    }
    return out;
  }

  /**
   * Solves F(v) = 0 for the K-flow from (start.z, p0) (module comment). On success v holds the
   * solution and am holds A v.
   */
  private solveKinetic(start: MidpointPoint, p0: Float64Array, eps: number, v: Float64Array): StepResult {
    const { n, m, rows, settings, lambda } = this;
    const half = 0.5 * eps;
    const s = start.s;
    const a = this.am;
    const hiX = settings.branchMargin * X_HI;
    const loX = settings.branchMargin * X_LO;
    // First iterate: the Newton step from v = 0, with the metric's factor at z₀.
    start.f.solve(p0, v);
    this.newtonIterations++;
    rows.mul(v, a);
    let alpha = 1;
    for (let i = 0; i < m; i++) {
      const x = (half * a[i]) / s[i];
      if (x > hiX) alpha = Math.min(alpha, hiX / x);
      else if (x < loX) alpha = Math.min(alpha, loX / x);
    }
    if (!(alpha > 0)) return 'no-convergence';
    if (alpha < 1) {
      for (let q = 0; q < n; q++) v[q] *= alpha;
      for (let i = 0; i < m; i++) a[i] *= alpha;
    }
    const F = this.F;
    const delta = this.delta;
    const Ad = this.tm;
    const d = this.dm;
    let refactor = true;
    let refactors = 0;
    let errPrev = Infinity;
    for (let it = 0; it < settings.maxNewton; it++) {
      // residual
      for (let i = 0; i < m; i++) {
        const sm = s[i] - half * a[i];
        d[i] = (a[i] / (sm * sm)) * (1 - (half * a[i]) / sm);
      }
      rows.mulT(d, F);
      for (let q = 0; q < n; q++) F[q] += lambda[q] * v[q] - p0[q];
      if (refactor) {
        for (let i = 0; i < m; i++) {
          const si = s[i];
          const u = half * a[i];
          const su = si - u;
          const su2 = su * su;
          d[i] = (si * si - 2 * si * u - 2 * u * u) / (su2 * su2);
        }
        this.factorizations++;
        if (!this.J.factor(d, lambda)) return 'not-pd';
        refactor = false;
        refactors++;
        errPrev = Infinity;
      }
      this.J.solve(F, delta);
      this.newtonIterations++;
      rows.mul(delta, Ad);
      let beta = 1;
      for (let i = 0; i < m; i++) {
        const x = (half * a[i]) / s[i];
        const c = (half * Ad[i]) / s[i];
        if (c > 0 && x - c < loX) beta = Math.min(beta, (x - loX) / c);
        else if (c < 0 && x - c > hiX) beta = Math.min(beta, (hiX - x) / -c);
      }
      if (!(beta > 0)) return 'no-convergence';
      let err = 0;
      for (let q = 0; q < n; q++) {
        const dq = beta * delta[q];
        if (!Number.isFinite(dq)) return 'no-convergence';
        v[q] -= dq;
        err = Math.max(err, Math.sqrt(lambda[q]) * Math.abs(dq));
      }
      for (let i = 0; i < m; i++) {
        const di = beta * Ad[i];
        a[i] -= di;
        err = Math.max(err, Math.abs(di) / s[i]);
      }
      err *= eps;
      let done = beta === 1 && err <= settings.tolerance;
      if (!done && Number.isFinite(errPrev)) {
        const theta = err / errPrev;
        if (beta === 1 && theta < 1) done = (theta / (1 - theta)) * err <= settings.tolerance;
        if (!done && (theta > 0.5 || beta < 1) && !settings.fullNewton) {
          if (refactors > settings.maxRefactor) return 'no-convergence';
          refactor = true;
        }
      }
      if (done) return 'ok';
      if (settings.fullNewton) refactor = true;
      errPrev = err;
    }
    return 'no-convergence';
  }

  /**
   * One step from (cur, pm) into (next, pm); pm is updated in place (its content is unspecified on
   * failure, when the caller rejects the trajectory).
   */
  step(cur: MidpointPoint, next: MidpointPoint, pm: Float64Array, eps: number): StepResult {
    const { n, m, rows } = this;
    const half = 0.5 * eps;
    this.steps++;
    for (let q = 0; q < n; q++) pm[q] -= half * cur.gradU[q];
    const v = this.v;
    if (m === 0) {
      // K = ½ pᵀ Λ⁻¹ p is separable: the midpoint step is explicit and exact.
      for (let q = 0; q < n; q++) next.z[q] = cur.z[q] + (eps * pm[q]) / this.lambda[q];
      const r = this.evaluate(next);
      if (r !== 'ok') return r;
      for (let q = 0; q < n; q++) pm[q] -= half * next.gradU[q];
      return 'ok';
    }
    const r1 = this.solveKinetic(cur, pm, eps, v);
    if (r1 !== 'ok') return r1;
    // p₁ = p₀ + ε Aᵀ(a² / s_m³)
    const a = this.am;
    const t = this.dm;
    for (let i = 0; i < m; i++) {
      const sm = cur.s[i] - half * a[i];
      t[i] = (a[i] * a[i]) / (sm * sm * sm);
    }
    for (let q = 0; q < n; q++) next.z[q] = cur.z[q] + eps * v[q];
    rows.addMulT(t, pm, eps);
    const r = this.evaluate(next);
    if (r !== 'ok') return r;
    if (this.settings.involutionCheck) {
      const pb = this.pb;
      for (let q = 0; q < n; q++) pb[q] = -pm[q];
      const vb = this.vb;
      if (this.solveKinetic(next, pb, eps, vb) !== 'ok') return 'involution';
      // z₀' − z₀ = z₁ + ε v_b − z₀ = ε (v + v_b)
      let err = 0;
      const dz = this.tn;
      for (let q = 0; q < n; q++) {
        dz[q] = eps * (v[q] + vb[q]);
        err = Math.max(err, Math.sqrt(this.lambda[q]) * Math.abs(dz[q]));
      }
      rows.mul(dz, t);
      for (let i = 0; i < m; i++) err = Math.max(err, Math.abs(t[i]) / cur.s[i]);
      if (!(err <= this.settings.involutionTolerance)) return 'involution';
    }
    for (let q = 0; q < n; q++) pm[q] -= half * next.gradU[q];
    return 'ok';
  }

  /** Diagonal of g(z) at an evaluated point. */
  metricDiagonal(ps: MidpointPoint, out: Float64Array): Float64Array {
    out.set(this.lambda);
    const { ptr, idx, val } = this.rows;
    for (let i = 0; i < this.m; i++) {
      const w = 1 / (ps.s[i] * ps.s[i]);
      for (let q = ptr[i]; q < ptr[i + 1]; q++) out[idx[q]] += w * val[q] * val[q];
    }
    return out;
  }
}

/* ----------------------------------------------------------------------------------------------- */
/* The chain                                                                                        */
/* ----------------------------------------------------------------------------------------------- */

function abortError(): Error {
  const e = new Error('The chain was cancelled.');
  e.name = 'AbortError';
  return e;
}

/**
 * Adam on log T for the ChEES criterion ("An adaptive-MCMC scheme for setting trajectory lengths in
 * Hamiltonian Monte Carlo", AISTATS 2021): maximise E[(|z′ − μ|² − |z − μ|²)²] over the jittered
 * integration time, with coordinates standardised by the warm-up's running mean and variance. The
 * per-transition gradient with respect to log T is a · t · (|y′|² − |y|²) · y′ᵀ ẏ′ (t the jittered
 * time, a the acceptance probability, ẏ′ the velocity g⁻¹p′ at the proposal, standardised).
 */
class ChEES {
  logT: number;
  private mom = 0;
  private sq = 0;
  private t = 0;
  constructor(
    T: number,
    private readonly lo: number,
    private readonly hi: number,
    private readonly rate = 0.025,
    private readonly beta1 = 0,
    private readonly beta2 = 0.95,
  ) {
    this.logT = Math.log(T);
  }
  update(grad: number): number {
    if (!Number.isFinite(grad)) return Math.exp(this.logT);
    this.t++;
    this.mom = this.beta1 * this.mom + (1 - this.beta1) * grad;
    this.sq = this.beta2 * this.sq + (1 - this.beta2) * grad * grad;
    const mh = this.mom / (1 - Math.pow(this.beta1, this.t));
    const vh = this.sq / (1 - Math.pow(this.beta2, this.t));
    this.logT += (this.rate * mh) / (Math.sqrt(vh) + 1e-8);
    this.logT = Math.min(Math.log(this.hi), Math.max(Math.log(this.lo), this.logT));
    return Math.exp(this.logT);
  }
}

/** Tally of step outcomes across midpoint chains in this thread (benchmark and diagnosis). */
export const midpointStepCounts: Record<string, number> = {};

export function midpointChain(
  p: PreparedTarget,
  start: Float64Array,
  opts: ChainOptions,
  rng: Rng,
  check: (z: Float64Array, out: Float64Array) => void,
  settings: MidpointSettings = DEFAULT_MIDPOINT,
): ChainOutput {
  const n = p.n;
  const m = p.m;
  const dim = p.target.dim;
  // Initial Λ: curvature at the start, floored relative to the barrier's own scale (as the
  // generalised-leapfrog chain does).
  const s0 = new Float64Array(m);
  p.rows.mul(start, s0);
  let barrierDiagMean = 0;
  {
    const { ptr, idx, val } = p.rows;
    const diag = new Float64Array(n);
    for (let i = 0; i < m; i++) {
      const si = p.b[i] - s0[i];
      if (!(si > 0)) throw new Error('RHMC: the start is not strictly inside the region');
      for (let q = ptr[i]; q < ptr[i + 1]; q++) diag[idx[q]] += (val[q] * val[q]) / (si * si);
    }
    for (let q = 0; q < n; q++) barrierDiagMean += diag[q] / n;
  }
  const floor = m > 0 ? 1e-6 * Math.max(barrierDiagMean, 1e-12) : 1e-3;
  const scale = new Float64Array(n).fill(1 / Math.sqrt(Math.max(barrierDiagMean, 1e-12)));
  const curv = new Float64Array(n);
  const lambda = new Float64Array(n);
  curvatureDiagonal(p, start, scale, curv);
  for (let q = 0; q < n; q++) lambda[q] = Math.max(curv[q], floor);

  const integ = new MidpointIntegrator(p, lambda, settings);
  let state = integ.newPoint();
  let cur = integ.newPoint();
  let next = integ.newPoint();
  state.z.set(start);
  const r0 = integ.evaluate(state);
  if (r0 !== 'ok') {
    if (r0 === 'not-finite') {
      const l = p.logDensity(start, new Float64Array(n));
      throw new Error(`RHMC: the log-density is ${l} at the chain's start (or the metric is singular there).`);
    }
    throw new Error('RHMC: the start is not strictly inside the region');
  }
  const pm = new Float64Array(n);
  const p0 = new Float64Array(n);
  const xiM = new Float64Array(m);
  const etaN = new Float64Array(n);
  const vel = new Float64Array(n);

  // ChEES statistics: running mean and variance of z over warm-up.
  const cMean = new Float64Array(n);
  const cM2 = new Float64Array(n);
  let cCount = 0;

  let lastSteps = 0;
  const transition = (eps: number, steps: number, chees: boolean): { accept: number; divergent: boolean; rejected: boolean; energy: number; grad: number } => {
    integ.sampleMomentum(state, rng, xiM, etaN, p0);
    const h0 = integ.energy(state, p0);
    pm.set(p0);
    cur.copyFrom(state);
    let failure: StepResult = 'ok';
    lastSteps = 0;
    for (let k = 0; k < steps; k++) {
      const r = integ.step(cur, next, pm, eps);
      lastSteps++;
      midpointStepCounts[r] = (midpointStepCounts[r] ?? 0) + 1;
      if (r !== 'ok') {
        failure = r;
        break;
      }
      const t = cur;
      cur = next;
      next = t;
    }
    const u = rng.uniformPositive();
    if (failure === 'not-finite') return { accept: 0, divergent: true, rejected: false, energy: h0, grad: 0 };
    if (failure !== 'ok') return { accept: 0, divergent: false, rejected: true, energy: h0, grad: 0 };
    const h1 = integ.energy(cur, pm, vel);
    const dH = h1 - h0;
    if (!Number.isFinite(dH) || dH > 1000) return { accept: 0, divergent: true, rejected: false, energy: h0, grad: 0 };
    const a = dH <= 0 ? 1 : Math.exp(-dH);
    let grad = 0;
    if (chees && cCount > 10) {
      let y0 = 0;
      let y1 = 0;
      let yv = 0;
      for (let q = 0; q < n; q++) {
        const varq = cM2[q] / (cCount - 1) + 1e-300;
        const d0 = state.z[q] - cMean[q];
        const d1 = cur.z[q] - cMean[q];
        y0 += (d0 * d0) / varq;
        y1 += (d1 * d1) / varq;
        yv += (d1 * vel[q]) / varq;
      }
      grad = a * eps * steps * (y1 - y0) * yv;
    }
    if (u < a) {
      const t = state;
      state = cur;
      cur = t;
      return { accept: a, divergent: false, rejected: false, energy: h1, grad };
    }
    return { accept: a, divergent: false, rejected: false, energy: h0, grad };
  };

  // Initial step size: double or halve until the one-step acceptance crosses ½ (common practice).
  let eps = 0.5;
  {
    const a1 = transition(eps, 1, false).accept;
    const dir = a1 > 0.5 ? 1 : -1;
    for (let k = 0; k < 30; k++) {
      const a = transition(eps, 1, false).accept;
      if (dir === 1 ? !(a > 0.5) : a > 0.5) break;
      eps = dir === 1 ? eps * 2 : eps / 2;
    }
  }
  const da = new DualAveraging(eps, settings.targetAccept, settings.dualAveragingMu, settings.dualAveragingGamma);
  let T = settings.trajectoryLength;
  const chees = new ChEES(T, settings.minTrajectory, settings.maxTrajectory);
  const ends = windowEnds(opts.warmup);
  const { init: initBuf, term } = warmupBuffers(opts.warmup);
  const slowEnd = opts.warmup - term;
  const curvSum = new Float64Array(n);
  let curvCount = 0;
  const wMean = new Float64Array(n);
  const wM2 = new Float64Array(n);
  let wCount = 0;
  let windowStart = initBuf;
  const nextEnd = (it: number) => {
    let e = Infinity;
    for (const x of ends) if (x >= it && x < e) e = x;
    return e;
  };
  let logTSum = 0;
  let logTCount = 0;
  const gdiag = new Float64Array(n);
  const sd = new Float64Array(n);

  const draws = new Float64Array(opts.draws * dim);
  const energy = new Float64Array(opts.draws);
  const divergentOut = new Uint8Array(opts.draws);
  const rejectedOut = new Uint8Array(opts.draws);
  const acceptOut = new Float64Array(opts.draws);
  const theta = new Float64Array(dim);
  const total = opts.warmup + opts.draws;
  let factAtSampling = 0;
  let stepsAtSampling = 0;
  let newtonAtSampling = 0;
  let stepsTaken = 0;

  // Jittered number of steps: integration time uniform on [½T, 3/2 T] (common practice).
  const stepsFor = (e: number, TT: number) => {
    const t = TT * (0.5 + rng.uniform());
    return Math.min(settings.maxSteps, Math.max(1, Math.round(t / e)));
  };

  for (let it = 0; it < total; it++) {
    if (opts.signal?.aborted) throw abortError();
    const warm = it < opts.warmup;
    if (it === opts.warmup) {
      opts.onWarmupEnd?.();
      eps = opts.warmup > 0 ? settings.finalStepScale * da.final() : eps;
      factAtSampling = integ.factorizations;
      stepsAtSampling = integ.steps;
      newtonAtSampling = integ.newtonIterations;
    }
    const adaptT = warm && settings.adaptTrajectory && it >= initBuf && it < slowEnd;
    const L = stepsFor(eps, T);
    const res = transition(eps, L, adaptT);
    if (!warm) stepsTaken += lastSteps;
    if (warm) {
      eps = da.update(res.accept);
      if (it >= Math.floor(initBuf / 2)) {
        cCount++;
        for (let q = 0; q < n; q++) {
          const dd = state.z[q] - cMean[q];
          cMean[q] += dd / cCount;
          cM2[q] += dd * (state.z[q] - cMean[q]);
        }
      }
      if (adaptT && cCount > 10) {
        T = chees.update(res.grad);
        // Polyak average of log T over the second half of the adaptation: a single chain's ChEES
        // gradient is noisy, the average is not.
        if (it >= (initBuf + slowEnd) / 2) {
          logTSum += Math.log(T);
          logTCount++;
        }
      }
      if (it === slowEnd - 1 && logTCount > 0) T = Math.exp(logTSum / logTCount);
      if (it >= initBuf && ends.size > 0) {
        const end = nextEnd(it);
        const len = end - windowStart + 1;
        const every = Math.max(1, Math.floor(len / 5));
        const useVariance = m === 0;
        if (!useVariance && (it - windowStart) % every === every - 1 && Number.isFinite(end)) {
          integ.metricDiagonal(state, gdiag);
          for (let q = 0; q < n; q++) sd[q] = 1 / Math.sqrt(gdiag[q]);
          curvatureDiagonal(p, state.z, sd, curv);
          for (let q = 0; q < n; q++) curvSum[q] += curv[q];
          curvCount++;
        }
        if (useVariance) {
          wCount++;
          for (let q = 0; q < n; q++) {
            const dd = state.z[q] - wMean[q];
            wMean[q] += dd / wCount;
            wM2[q] += dd * (state.z[q] - wMean[q]);
          }
        }
        if (ends.has(it)) {
          let changed = false;
          if (useVariance && wCount > 2) {
            for (let q = 0; q < n; q++) {
              const vq = wM2[q] / (wCount - 1);
              lambda[q] = 1 / ((wCount / (wCount + 5)) * vq + 1e-3 * (5 / (wCount + 5)));
            }
            wMean.fill(0);
            wM2.fill(0);
            wCount = 0;
            changed = true;
          }
          if (!useVariance && curvCount > 0) {
            for (let q = 0; q < n; q++) lambda[q] = Math.max(curvSum[q] / curvCount, floor);
            curvSum.fill(0);
            curvCount = 0;
            changed = true;
          }
          if (changed) {
            integ.setLambda(lambda);
            const r = integ.evaluate(state);
            if (r !== 'ok') throw new Error('RHMC: could not re-evaluate the metric after adaptation');
          }
          da.restart(eps);
          windowStart = it + 1;
        }
      }
    } else {
      const k = it - opts.warmup;
      check(state.z, theta);
      draws.set(theta, k * dim);
      energy[k] = res.energy;
      divergentOut[k] = res.divergent ? 1 : 0;
      rejectedOut[k] = res.rejected ? 1 : 0;
      acceptOut[k] = res.accept;
    }
    if (opts.onProgress && (it % 20 === 0 || it === total - 1)) opts.onProgress(warm ? 'warmup' : 'sampling', it);
  }
  const sSteps = integ.steps - stepsAtSampling;
  let rej = 0;
  for (let k = 0; k < opts.draws; k++) rej += rejectedOut[k];
  return {
    draws,
    energy,
    divergent: divergentOut,
    rejected: rejectedOut,
    acceptStat: acceptOut,
    stepSize: eps,
    factorizationsPerStep: sSteps > 0 ? (integ.factorizations - factAtSampling) / sSteps : NaN,
    stepsPerDraw: opts.draws > 0 ? stepsTaken / opts.draws : NaN,
    solverIterationsPerStep: sSteps > 0 ? (integ.newtonIterations - newtonAtSampling) / sSteps : NaN,
    rejectedFraction: opts.draws > 0 ? rej / opts.draws : NaN,
    integrationTime: T,
    metricStructure: integ.structure.kind,
    integrator: 'midpoint',
  };
}
