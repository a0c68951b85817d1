/**
 * Riemannian HMC with the barrier metric (DESIGN §6.3).
 *
 * `rhmcChain` dispatches on RhmcVariant: the default 'midpoint' integrator lives in
 * rhmc-midpoint.ts; this module holds the generalised-leapfrog variant ('leapfrog', engine id
 * `rhmc-gl`) described below, with its own settings (DEFAULT_RHMC) unchanged.
 *
 * Region {z : A z ≤ b} (rows normalised), slacks s = b − A z, metric
 *   g(z) = Aᵀ S⁻² A + Λ,   S = diag(s),  Λ a positive diagonal adapted in warm-up,
 * Hamiltonian
 *   H(z, p) = U(z) + ½ pᵀ g(z)⁻¹ p,   U(z) = −ℓ(z) + ½ log det g(z).
 * Gradients (derived in the module's tests against finite differences):
 *   ∂g/∂z_k = 2 Aᵀ diag(A_{·k} / s³) A
 *   ∇U = −∇ℓ + Aᵀ(σ / s),  σᵢ = aᵢᵀ g⁻¹ aᵢ / sᵢ²            (½ ∂ log det g = ½ tr(g⁻¹ ∂g))
 *   ∇_z(½ pᵀ g⁻¹ p) = −Aᵀ((A v)² / s³),  v = g⁻¹ p            (−½ vᵀ ∂g v)
 *
 * Integrator: generalised leapfrog ("Simulating Hamiltonian Dynamics", Cambridge University Press 2004;
 * "Riemann manifold Langevin and Hamiltonian Monte Carlo methods", JRSS B 2011), symplectic
 * and reversible for non-separable H:
 *   p½ = p − ε/2 ∇_z H(z, p½)                 implicit in p½: fixed point, reusing the Cholesky of g(z)
 *   z' = z + ε/2 (g(z)⁻¹ + g(z')⁻¹) p½         implicit in z': Newton in w = g(z')⁻¹ p½ (below)
 *   p' = p½ − ε/2 ∇_z H(z', p½)                explicit
 * The z' equation is solved for w: with c = z + ε/2 g(z)⁻¹p½ and z' = c + ε/2 w,
 *   F(w) = g(c + ε/2 w) w − p½ = 0,   ∂F/∂w = Aᵀ diag((1 + ε (A w)ᵢ / sᵢ) / sᵢ²) A + Λ =: M(w),
 * a symmetric matrix; F itself costs only matrix–vector products. M is factorised once, at the
 * predictor w₀ = g(z)⁻¹ p½, and reused for the following (chord) iterations, stopped by the
 * contraction estimate of "Solving Ordinary Differential Equations II" (Springer, §IV.8). One more factorisation, of g(z'), gives the leverages for ∇U(z')
 * and serves the next step's p½ fixed point.
 *
 * Exactness: each step is run back from (z', −p') with the same solvers and must land on z (the
 * involution check of "Unbiased constrained sampling with self-concordant barrier Hamiltonian
 * Monte Carlo", NeurIPS 2023, one more factorisation of M). A step whose
 * fixed point or Newton iteration does not converge, whose M is not positive definite, that leaves
 * the region or fails the run-back check rejects the whole trajectory and is counted as *rejected*
 * (ChainOutput.rejected), not as a divergence: the proposal map restricted to where the forward and
 * backward solves succeed is an involution, so the Metropolis step stays exact and such rejections
 * only cost efficiency, which ESS measures. A *divergence* (ChainOutput.divergent) is the energy
 * error blowing up, as in common practice: H non-finite along the trajectory (a step reaching a
 * point where ℓ or the metric is not finite) or an energy error above 1000 at its end. Every kept
 * draw is checked against the constraints by the caller. Factorisations per step: 3 (forward M,
 * g(z'), run-back M).
 *
 * Step-size limit (measured, see bench/samplers.bench.ts): for a row whose Dikin velocity
 * c = (A v)ᵢ / sᵢ has ε|c| beyond about ½, the implicit equations have no solution (in one dimension they
 * reduce to a quadratic with negative discriminant), whatever the solver. Under the ½ log det g
 * "gravity" |c| grows along a trajectory, so near faces the usable ε shrinks; dual averaging settles
 * just below that cliff (ε ≈ 0.05 in 50 dimensions, acceptance ≈ 0.98).
 *
 * Without inequalities the metric is the constant Λ and the step is the explicit leapfrog (no
 * factorisation, no run-back needed).
 */
import type { ChainOptions, ChainOutput } from '../types';
import type { PreparedTarget } from '../geometry';
import { Rng } from '../rng';
import { Cholesky } from '../linalg/cholesky';
import type { RowMatrix } from '../linalg/sparse';
import { rowLeverages } from '../linalg/metric';
import { DualAveraging, warmupBuffers, windowEnds } from './adapt';
import { curvatureByDifferences } from './common';
import { DEFAULT_MIDPOINT, midpointChain } from './rhmc-midpoint';

/**
 * Which RHMC integrator a chain uses. 'midpoint' (default): explicit half-kicks of U and the
 * implicit midpoint rule for the kinetic energy, structured factorisations, ChEES-adapted
 * integration time (rhmc-midpoint.ts). 'leapfrog': the generalised leapfrog below with its own
 * settings (DEFAULT_RHMC), as before the midpoint integrator existed (engine id `rhmc-gl`).
 */
export interface RhmcVariant {
  integrator?: 'midpoint' | 'leapfrog';
}

/** One RHMC chain with the chosen integrator. */
export function rhmcChain(
  p: PreparedTarget,
  start: Float64Array,
  opts: ChainOptions,
  rng: Rng,
  check: (z: Float64Array, out: Float64Array) => void,
  variant: RhmcVariant = {},
): ChainOutput {
  if ((variant.integrator ?? 'midpoint') === 'leapfrog') return leapfrogChain(p, start, opts, rng, check, DEFAULT_RHMC);
  return midpointChain(p, start, opts, rng, check, DEFAULT_MIDPOINT);
}

export interface RhmcSettings {
  /** Target Metropolis acceptance for dual averaging. */
  targetAccept: number;
  /** Mean integration time ε·L. */
  trajectoryLength: number;
  /** Largest number of leapfrog steps in one trajectory. */
  maxSteps: number;
  /** Tolerance of the implicit solves (Dikin norm of the last correction). */
  tolerance: number;
  /** Newton iterations that refactorise M; later iterations reuse the last factor (chord method). */
  fullNewton: number;
  maxNewton: number;
  maxFixedPoint: number;
  /**
   * How Λ is adapted in warm-up when there are inequalities: the diagonal of −∇²ℓ averaged over a
   * few points per window ('curvature'), or the inverse warm-up variances ('variance'). Without
   * inequalities the inverse variances are always used. Compared in bench/samplers.bench.ts.
   */
  metricAdaptation: 'curvature' | 'variance';
  /** Newton iterations that refactorise M in the run-back solve (then the chord method). */
  checkFullNewton: number;
  /**
   * Factor applied to dual averaging's final step size: solver failures rise steeply just above the
   * adapted size (module notes), so a slightly smaller step keeps rejections rare after warm-up.
   * Measured (4 seeds × 2 chains × 500 draws each on a Gaussian on the 10-simplex, the normal on
   * [−1, 1] and the ordered-groups posterior; solver failures and energy blow-ups counted together):
   * failed draws 36 / 26 / 5 with factor 1, 2 / 2 / 0 with 0.7, at similar ESS per draw and run time.
   */
  finalStepScale: number;
  /** Run each step back and require the start ("Unbiased constrained sampling with self-concordant barrier HMC", NeurIPS 2023). */
  involutionCheck: boolean;
  /** Largest Dikin-norm distance between the start and the run-back point. */
  involutionTolerance: number;
}

export const DEFAULT_RHMC: RhmcSettings = {
  // 0.95 rather than the usual 0.8: a failed implicit solve rejects the whole trajectory, and those
  // failures rise steeply past a step-size cliff (see the module notes). Measured on the
  // ordered-groups posterior (3 chains × 1000 draws), when solver failures were still counted as
  // divergences: target 0.9 gave 96 such draws, 0.95 gave 2; on the truncated normal 0.8 let chains
  // stick near a face.
  targetAccept: 0.95,
  // Integration time in metric units: on the 50-simplex 1.2 gave ESS/draw 0.08, 2.5 gave 0.32 and 3
  // gave 0.43 (same seed), the best ESS per second of the three; the step cap only guards runaways.
  trajectoryLength: 3,
  maxSteps: 128,
  tolerance: 1e-10,
  // One factorisation of M per solve, then chord iterations (cheap O(n²) solves with the same
  // factor): measured on the 50-simplex, 3 factorisations per step and ~1.5× faster end to end than
  // refactorising twice, with the same step size and ESS.
  fullNewton: 1,
  maxNewton: 30,
  maxFixedPoint: 60,
  involutionCheck: true,
  finalStepScale: 0.7,
  checkFullNewton: 1,
  metricAdaptation: 'curvature',
  involutionTolerance: 1e-7,
};

/** Everything known at one point z. */
export class PointState {
  readonly z: Float64Array;
  readonly s: Float64Array;
  readonly chol: Cholesky;
  readonly gradL: Float64Array;
  /** ∇U = −∇ℓ + Aᵀ(σ/s). */
  readonly gradU: Float64Array;
  l = NaN;
  logDet = NaN;
  constructor(n: number, m: number) {
    this.z = new Float64Array(n);
    this.s = new Float64Array(m);
    this.chol = new Cholesky(n);
    this.gradL = new Float64Array(n);
    this.gradU = new Float64Array(n);
  }
  copyFrom(o: PointState): void {
    this.z.set(o.z);
    this.s.set(o.s);
    this.chol.L.set(o.chol.L);
    this.chol.first.set(o.chol.first);
    this.gradL.set(o.gradL);
    this.gradU.set(o.gradU);
    this.l = o.l;
    this.logDet = o.logDet;
  }
}

export type StepResult = 'ok' | 'left-region' | 'no-convergence' | 'not-finite' | 'no-convergence-p' | 'not-pd' | 'involution';

/** The generalised-leapfrog integrator for the barrier-metric Hamiltonian. */
export class BarrierIntegrator {
  readonly n: number;
  readonly m: number;
  readonly rows: RowMatrix;
  readonly b: Float64Array;
  /** Λ (diagonal). */
  readonly lambda: Float64Array;
  factorizations = 0;
  steps = 0;
  /** Fixed-point and Newton iterations (run-back included). */
  iterations = 0;
  private readonly G: Float64Array;
  private readonly wts: Float64Array;
  private readonly rowTmp: Float64Array;
  private readonly vn1: Float64Array;
  private readonly vn2: Float64Array;
  private readonly vn3: Float64Array;
  private readonly vn4: Float64Array;
  private readonly vm1: Float64Array;
  private readonly vm2: Float64Array;
  private readonly mChol: Cholesky;
  private readonly bk1: Float64Array;
  private readonly bk2: Float64Array;
  private readonly bk3: Float64Array;
  private readonly bk4: Float64Array;
  private readonly bkZ: Float64Array;
  private readonly bkS: Float64Array;

  constructor(
    private readonly p: PreparedTarget,
    lambda: Float64Array,
    readonly settings: RhmcSettings = DEFAULT_RHMC,
  ) {
    this.n = p.n;
    this.m = p.m;
    this.rows = p.rows;
    this.b = p.b;
    this.lambda = Float64Array.from(lambda);
    const n = this.n;
    this.G = new Float64Array(n * n);
    this.wts = new Float64Array(this.m);
    this.rowTmp = new Float64Array(n);
    this.vn1 = new Float64Array(n);
    this.vn2 = new Float64Array(n);
    this.vn3 = new Float64Array(n);
    this.vn4 = new Float64Array(n);
    this.vm1 = new Float64Array(this.m);
    this.vm2 = new Float64Array(this.m);
    this.mChol = new Cholesky(n);
    this.bk1 = new Float64Array(n);
    this.bk2 = new Float64Array(n);
    this.bk3 = new Float64Array(n);
    this.bk4 = new Float64Array(n);
    this.bkZ = new Float64Array(n);
    this.bkS = new Float64Array(this.m);
  }

  /** Slacks of z into s; false if any is not positive. */
  slacks(z: Float64Array, s: Float64Array): boolean {
    this.rows.mul(z, s);
    let ok = true;
    for (let i = 0; i < this.m; i++) {
      s[i] = this.b[i] - s[i];
      if (!(s[i] > 0)) ok = false;
    }
    return ok;
  }

  /** Evaluates everything at ps.z. */
  evaluate(ps: PointState): StepResult {
    const { m, n, rows } = this;
    if (!this.slacks(ps.z, ps.s)) return 'left-region';
    if (m === 0) {
      // Euclidean metric g = Λ: its factor is diagonal, no factorisation needed.
      const L = ps.chol.L;
      let ld = 0;
      for (let q = 0; q < n; q++) {
        L[q * n + q] = Math.sqrt(this.lambda[q]);
        ld += Math.log(this.lambda[q]);
      }
      ps.logDet = ld;
    } else {
      for (let i = 0; i < m; i++) this.wts[i] = 1 / (ps.s[i] * ps.s[i]);
      rows.gram(this.wts, this.lambda, this.G);
      this.factorizations++;
      if (!ps.chol.factor(this.G)) return 'not-finite';
      ps.logDet = ps.chol.logDet();
    }
    const l = this.p.logDensity(ps.z, ps.gradL);
    if (!Number.isFinite(l)) return 'not-finite';
    for (let q = 0; q < n; q++) if (!Number.isFinite(ps.gradL[q])) return 'not-finite';
    ps.l = l;
    // leverages: σᵢ = |L⁻¹ aᵢ|² / sᵢ²; ∇U = −∇ℓ + Aᵀ(σ/s)
    const sig = rowLeverages(rows, ps.chol.L, this.rowTmp, this.vm1);
    for (let i = 0; i < m; i++) {
      const si = ps.s[i];
      sig[i] = sig[i] / (si * si) / si;
    }
    for (let q = 0; q < n; q++) ps.gradU[q] = -ps.gradL[q];
    rows.addMulT(sig, ps.gradU, 1);
    return 'ok';
  }

  /** H(z, p) at an evaluated point; v receives g⁻¹ p. */
  energy(ps: PointState, pm: Float64Array, v: Float64Array = this.vn4): number {
    ps.chol.solve(pm, v);
    let k = 0;
    for (let q = 0; q < this.n; q++) k += pm[q] * v[q];
    return -ps.l + 0.5 * ps.logDet + 0.5 * k;
  }

  /** out = ∇_z H(z, p) at an evaluated point given v = g⁻¹ p. */
  gradH(ps: PointState, v: Float64Array, out: Float64Array): Float64Array {
    const Av = this.vm2;
    this.rows.mul(v, Av);
    for (let i = 0; i < this.m; i++) {
      const si = ps.s[i];
      Av[i] = (Av[i] * Av[i]) / (si * si * si);
    }
    out.set(ps.gradU);
    this.rows.addMulT(Av, out, -1);
    return out;
  }

  /**
   * p½ = pm − ε/2 ∇_z H(z, p½) by fixed-point iteration with the factor of g(z) (no factorisation).
   * On success ph holds p½ and v holds g(z)⁻¹ p½.
   */
  private halfMomentum(cur: PointState, pm: Float64Array, eps: number, ph: Float64Array, v: Float64Array, gH: Float64Array): boolean {
    const { n, settings } = this;
    const half = 0.5 * eps;
    ph.set(pm);
    let pScale = 1;
    for (let q = 0; q < n; q++) pScale = Math.max(pScale, Math.abs(pm[q]));
    for (let it = 0; it < settings.maxFixedPoint; it++) {
      this.iterations++;
      cur.chol.solve(ph, v);
      this.gradH(cur, v, gH);
      let diff = 0;
      for (let q = 0; q < n; q++) {
        const nv = pm[q] - half * gH[q];
        diff = Math.max(diff, Math.abs(nv - ph[q]));
        ph[q] = nv;
      }
      if (!Number.isFinite(diff)) return false;
      if (diff <= settings.tolerance * pScale) {
        cur.chol.solve(ph, v);
        return true;
      }
    }
    return false;
  }

  /**
   * z' = z + ε/2 (v + w) with g(z') w = p½, by Newton in w from w₀ = v (see the module comment).
   * On success zN, sN hold z' and its slacks and w holds g(z')⁻¹ p½ to the solver's tolerance.
   */
  private position(
    cur: PointState,
    ph: Float64Array,
    v: Float64Array,
    eps: number,
    zN: Float64Array,
    sN: Float64Array,
    w: Float64Array,
    fullNewton: number,
  ): StepResult {
    const { n, m, rows, settings } = this;
    const half = 0.5 * eps;
    w.set(v);
    const Aw = this.vm1;
    const F = this.vn3;
    const delta = this.rowTmp;
    const lam = this.lambda;
    let errPrev = Infinity;
    for (let it = 0; it < settings.maxNewton; it++) {
      this.iterations++;
      for (let q = 0; q < n; q++) zN[q] = cur.z[q] + half * (v[q] + w[q]);
      if (!this.slacks(zN, sN)) return 'left-region';
      rows.mul(w, Aw);
      for (let i = 0; i < m; i++) this.vm2[i] = Aw[i] / (sN[i] * sN[i]);
      rows.mulT(this.vm2, F);
      for (let q = 0; q < n; q++) F[q] += lam[q] * w[q] - ph[q];
      if (it < fullNewton) {
        for (let i = 0; i < m; i++) {
          const si = sN[i];
          this.wts[i] = (1 + (eps * Aw[i]) / si) / (si * si);
        }
        rows.gram(this.wts, lam, this.G);
        this.factorizations++;
        if (!this.mChol.factor(this.G)) return 'not-pd';
      }
      this.mChol.solve(F, delta);
      let err = 0;
      for (let q = 0; q < n; q++) {
        if (!Number.isFinite(delta[q])) return 'no-convergence';
        w[q] -= delta[q];
        err = Math.max(err, Math.sqrt(lam[q]) * Math.abs(delta[q]));
      }
      rows.mul(delta, this.vm2);
      for (let i = 0; i < m; i++) err = Math.max(err, Math.abs(this.vm2[i]) / sN[i]);
      err *= half;
      // Stopping rule of "Solving Ordinary Differential Equations II" (§IV.8): with the observed contraction
      // θ = err/errPrev, the error left after this correction is about θ/(1−θ)·err.
      let done = err <= settings.tolerance;
      if (!done && it > 0) {
        const theta = err / errPrev;
        if (theta >= 1) return 'no-convergence';
        done = (theta / (1 - theta)) * err <= settings.tolerance;
      }
      if (done) {
        for (let q = 0; q < n; q++) zN[q] = cur.z[q] + half * (v[q] + w[q]);
        return this.slacks(zN, sN) ? 'ok' : 'left-region';
      }
      errPrev = err;
    }
    return 'no-convergence';
  }

  /**
   * One generalised-leapfrog step from (cur, pm) into (next, pm). pm is updated in place only on
   * success (on failure its content is unspecified; the caller rejects the trajectory).
   *
   * Involution check ("Unbiased constrained sampling with self-concordant barrier HMC", NeurIPS 2023): the step is run back from (z', −p') with
   * the same solvers and must return to z within a small multiple of the tolerance; otherwise the
   * step is rejected. This makes the accepted map an involution on the set where both solves
   * succeed, so a failed or wrong-root solve cannot bias the chain (it only costs a rejection).
   */
  step(cur: PointState, next: PointState, pm: Float64Array, eps: number): StepResult {
    const { n } = this;
    const half = 0.5 * eps;
    this.steps++;
    const ph = this.vn1;
    const v = this.vn2;
    const gH = this.vn3;
    const w = this.vn4;
    if (this.m === 0) {
      // Separable H (constant metric Λ): the explicit leapfrog, exactly reversible.
      const lam = this.lambda;
      for (let q = 0; q < n; q++) {
        ph[q] = pm[q] - half * cur.gradU[q];
        next.z[q] = cur.z[q] + (eps * ph[q]) / lam[q];
      }
      const r0 = this.evaluate(next);
      if (r0 !== 'ok') return r0;
      for (let q = 0; q < n; q++) pm[q] = ph[q] - half * next.gradU[q];
      return 'ok';
    }
    if (!this.halfMomentum(cur, pm, eps, ph, v, gH)) return 'no-convergence-p';
    const r1 = this.position(cur, ph, v, eps, next.z, next.s, w, this.settings.fullNewton);
    if (r1 !== 'ok') return r1;
    const r = this.evaluate(next);
    if (r !== 'ok') return r;
    next.chol.solve(ph, v);
    this.gradH(next, v, gH);
    for (let q = 0; q < n; q++) pm[q] = ph[q] - half * gH[q];
    if (!this.settings.involutionCheck) return 'ok';
    // Run back: from (z', −p') the step must land on z.
    const pb = this.bk1;
    for (let q = 0; q < n; q++) pb[q] = -pm[q];
    if (!this.halfMomentum(next, pb, eps, this.bk2, this.bk3, this.bk4)) return 'involution';
    const rb = this.position(next, this.bk2, this.bk3, eps, this.bkZ, this.bkS, this.bk4, this.settings.checkFullNewton);
    if (rb !== 'ok') return 'involution';
    let err = 0;
    for (let q = 0; q < n; q++) this.bk1[q] = this.bkZ[q] - cur.z[q];
    this.rows.mul(this.bk1, this.bkS);
    for (let i = 0; i < this.m; i++) err = Math.max(err, Math.abs(this.bkS[i]) / cur.s[i]);
    for (let q = 0; q < n; q++) err = Math.max(err, Math.sqrt(this.lambda[q]) * Math.abs(this.bk1[q]));
    return err <= this.settings.involutionTolerance ? 'ok' : 'involution';
  }
}

/* ----------------------------------------------------------------------------------------------- */
/* Λ from the likelihood's curvature                                                               */
/* ----------------------------------------------------------------------------------------------- */

/**
 * Diagonal of −∇²ℓ at z by central differences of the gradient; each offset stays inside the
 * region (at most a quarter of each slack). Negative or non-finite entries become 0.
 */
export function curvatureDiagonal(p: PreparedTarget, z: Float64Array, scale: Float64Array, out: Float64Array): Float64Array {
  const n = p.n;
  const s = new Float64Array(p.m);
  p.rows.mul(z, s);
  for (let i = 0; i < p.m; i++) s[i] = p.b[i] - s[i];
  // column view of A for the slack limit
  const colMax = new Float64Array(n).fill(Infinity);
  const { ptr, idx, val } = p.rows;
  for (let i = 0; i < p.m; i++)
    for (let q = ptr[i]; q < ptr[i + 1]; q++) colMax[idx[q]] = Math.min(colMax[idx[q]], (0.25 * s[i]) / Math.abs(val[q]));
  curvatureByDifferences((x, g) => p.logDensity(x, g), Float64Array.from(z), (j) => Math.min(1e-4 * scale[j], colMax[j]), out);
  for (let j = 0; j < n; j++) if (!(out[j] > 0)) out[j] = 0;
  return out;
}

/* ----------------------------------------------------------------------------------------------- */
/* The chain                                                                                        */
/* ----------------------------------------------------------------------------------------------- */

function abortError(): Error {
  const e = new Error('The chain was cancelled.');
  e.name = 'AbortError';
  return e;
}

/** Tally of step outcomes across all chains in this thread (for the benchmark and diagnosis). */
export const stepResultCounts: Record<string, number> = {};

/** One chain with the generalised leapfrog (the 'leapfrog' variant). */
export function leapfrogChain(
  p: PreparedTarget,
  start: Float64Array,
  opts: ChainOptions,
  rng: Rng,
  check: (z: Float64Array, out: Float64Array) => void,
  settings: RhmcSettings = DEFAULT_RHMC,
): ChainOutput {
  const n = p.n;
  const m = p.m;
  const dim = p.target.dim;
  // Initial Λ: curvature at the start, floored relative to the barrier's own scale.
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

  let integ = new BarrierIntegrator(p, lambda, settings);
  let state = new PointState(n, m);
  let cur = new PointState(n, m);
  let next = new PointState(n, m);
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
  const xi = new Float64Array(n);

  /**
   * One trajectory of `steps` steps from `state`. Returns the acceptance statistic, whether it
   * diverged (the energy error blew up: a non-finite H along the way or an error above 1000, the
   * threshold in common use) and whether it was rejected because a step could not be completed
   * (solver non-convergence, M not positive definite, leaving the region, run-back mismatch).
   */
  const transition = (eps: number, steps: number): { accept: number; divergent: boolean; rejected: boolean; energy: number } => {
    rng.normals(xi);
    state.chol.multiplyL(xi, p0);
    const h0 = integ.energy(state, p0);
    pm.set(p0);
    cur.copyFrom(state);
    let failure: StepResult = 'ok';
    for (let k = 0; k < steps; k++) {
      const r = integ.step(cur, next, pm, eps);
      stepResultCounts[r] = (stepResultCounts[r] ?? 0) + 1;
      if (r !== 'ok') {
        failure = r;
        break;
      }
      const t = cur;
      cur = next;
      next = t;
    }
    const u = rng.uniformPositive();
    // A step that reaches a point where ℓ (or the metric) is not finite makes H non-finite there:
    // the energy error blew up, a divergence. Every other failure is a rejected, exact transition.
    if (failure === 'not-finite') return { accept: 0, divergent: true, rejected: false, energy: h0 };
    if (failure !== 'ok') return { accept: 0, divergent: false, rejected: true, energy: h0 };
    const h1 = integ.energy(cur, pm);
    const dH = h1 - h0;
    if (!Number.isFinite(dH) || dH > 1000) return { accept: 0, divergent: true, rejected: false, energy: h0 };
    const a = dH <= 0 ? 1 : Math.exp(-dH);
    if (u < a) {
      const t = state;
      state = cur;
      cur = t;
      return { accept: a, divergent: false, rejected: false, energy: h1 };
    }
    return { accept: a, divergent: false, rejected: false, energy: h0 };
  };

  // Initial step size: double or halve until the one-step acceptance crosses ½ (common practice).
  let eps = 0.5;
  {
    const a1 = transition(eps, 1).accept;
    const dir = a1 > 0.5 ? 1 : -1;
    for (let k = 0; k < 30; k++) {
      const a = transition(eps, 1).accept;
      if (dir === 1 ? !(a > 0.5) : a > 0.5) break;
      eps = dir === 1 ? eps * 2 : eps / 2;
    }
  }
  const da = new DualAveraging(eps, settings.targetAccept);
  const ends = windowEnds(opts.warmup);
  const initBuf = warmupBuffers(opts.warmup).init;
  const curvSum = new Float64Array(n);
  let curvCount = 0;
  // With no inequalities (Euclidean HMC) Λ is the whole metric: use the window's inverse variances
  // (regularised towards 1e-3 as is common practice), since curvature can vanish in heavy tails.
  const wMean = new Float64Array(n);
  const wM2 = new Float64Array(n);
  let wCount = 0;
  let windowStart = initBuf;
  const nextEnd = (it: number) => {
    let e = Infinity;
    for (const x of ends) if (x >= it && x < e) e = x;
    return e;
  };

  const draws = new Float64Array(opts.draws * dim);
  const energy = new Float64Array(opts.draws);
  const divergentOut = new Uint8Array(opts.draws);
  const rejectedOut = new Uint8Array(opts.draws);
  const acceptOut = new Float64Array(opts.draws);
  const theta = new Float64Array(dim);
  const total = opts.warmup + opts.draws;
  let factAtSampling = 0;
  let stepsAtSampling = 0;
  let itersAtSampling = 0;

  const stepsFor = (e: number) => {
    const L0 = Math.max(1, Math.round(settings.trajectoryLength / e));
    const lo = Math.max(1, Math.ceil(0.5 * L0));
    const hi = Math.max(lo, Math.floor(1.5 * L0));
    return Math.min(settings.maxSteps, lo + rng.int(hi - lo + 1));
  };

  for (let it = 0; it < total; it++) {
    if (opts.signal?.aborted) throw abortError();
    const warm = it < opts.warmup;
    if (it === opts.warmup) {
      opts.onWarmupEnd?.();
      eps = opts.warmup > 0 ? settings.finalStepScale * da.final() : eps;
      factAtSampling = integ.factorizations;
      stepsAtSampling = integ.steps;
      itersAtSampling = integ.iterations;
    }
    const res = transition(eps, stepsFor(eps));
    if (warm) {
      eps = da.update(res.accept);
      if (it >= initBuf && ends.size > 0) {
        // collect curvature at up to 5 points per slow window
        const end = nextEnd(it);
        const len = end - windowStart + 1;
        const every = Math.max(1, Math.floor(len / 5));
        if (m > 0 && settings.metricAdaptation === 'curvature' && (it - windowStart) % every === every - 1 && Number.isFinite(end)) {
          const sd = new Float64Array(n);
          for (let q = 0; q < n; q++) sd[q] = 1 / Math.sqrt(Math.max(integ.lambda[q], floor) + 1e-300);
          // step scale from the full metric diagonal
          const L = state.chol.L;
          for (let q = 0; q < n; q++) {
            let gqq = 0;
            for (let k = 0; k <= q; k++) gqq += L[q * n + k] * L[q * n + k];
            sd[q] = 1 / Math.sqrt(gqq);
          }
          curvatureDiagonal(p, state.z, sd, curv);
          for (let q = 0; q < n; q++) curvSum[q] += curv[q];
          curvCount++;
        }
        const useVariance = m === 0 || settings.metricAdaptation === 'variance';
        if (useVariance) {
          wCount++;
          for (let q = 0; q < n; q++) {
            const d = state.z[q] - wMean[q];
            wMean[q] += d / wCount;
            wM2[q] += d * (state.z[q] - wMean[q]);
          }
        }
        if (ends.has(it)) {
          if (useVariance && wCount > 2) {
            for (let q = 0; q < n; q++) {
              const v = wM2[q] / (wCount - 1);
              const reg = m === 0 ? 1e-3 : floor > 0 ? 1 / floor : 1e-3;
              lambda[q] = 1 / ((wCount / (wCount + 5)) * v + Math.min(1e-3, reg) * (5 / (wCount + 5)));
            }
            wMean.fill(0);
            wM2.fill(0);
            wCount = 0;
            curvCount = 1;
            curvSum.fill(0);
          }
          if (curvCount > 0) {
            if (!useVariance) for (let q = 0; q < n; q++) lambda[q] = Math.max(curvSum[q] / curvCount, floor);
            curvSum.fill(0);
            curvCount = 0;
            const keep = integ;
            integ = new BarrierIntegrator(p, lambda, settings);
            integ.factorizations = keep.factorizations;
            integ.steps = keep.steps;
            integ.iterations = keep.iterations;
            const zKeep = Float64Array.from(state.z);
            state.z.set(zKeep);
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
  return {
    draws,
    energy,
    divergent: divergentOut,
    rejected: rejectedOut,
    acceptStat: acceptOut,
    stepSize: eps,
    factorizationsPerStep: sSteps > 0 ? (integ.factorizations - factAtSampling) / sSteps : NaN,
    stepsPerDraw: opts.draws > 0 ? sSteps / opts.draws : NaN,
    solverIterationsPerStep: sSteps > 0 ? (integ.iterations - itersAtSampling) / sSteps : NaN,
    rejectedFraction: opts.draws > 0 ? rejectedOut.reduce((a, b) => a + b, 0) / opts.draws : NaN,
    integrationTime: settings.trajectoryLength,
    metricStructure: 'dense',
    integrator: 'leapfrog',
  };
}
