/**
 * Normalising constants (log Z) and volumes of constrained models, by annealing with our own samplers.
 *
 *   Z = ∫_P exp(ℓ(z)) dz,  P = {z : A z ≤ b} in the reduced coordinates z of geometry/index.ts.
 *
 * Measure. With equality constraints θ = θ₀ + N z and N has orthonormal columns, so Lebesgue measure
 * in z is the Euclidean (Hausdorff) measure on the affine subspace {E θ = e}: a volume or Z with
 * equalities is in that measure (e.g. the probability simplex {w ≥ 0, Σw = 1} in R^d has volume
 * √d/(d − 1)!). Without equalities z = θ.
 *
 * Method (see anneal.ts for the two building blocks):
 * - flat ℓ on a bounded region: Z = e^ℓ · vol(P), the volume by Gaussian cooling in the frame that
 *   makes the Dikin ellipsoid at the analytic centre the unit ball;
 * - otherwise a reference density r that can be normalised, then stepping-stone tempering r → π:
 *   - 'gaussian' (the default whenever −∇²ℓ at the constrained mode is positive definite): r is the
 *     Gaussian fitted at the mode, exp(−(z − z*)ᵀ Q (z − z*)/2) with Q = −∇²ℓ(z*) by central
 *     differences of the gradient, restricted to P; its mass on P comes from Gaussian cooling
 *     towards it from a narrow Gaussian at an interior point (exact when P has no binding rows);
 *   - 'uniform' (bounded regions whose mode curvature is not positive definite, or on request): r is
 *     flat on P, normalised by the volume.
 *   Unbounded regions need the Gaussian reference (a proper density with a positive definite
 *   curvature at its mode).
 * - The standard error comes from independent replicates (own random streams): log Z is the mean
 *   of the replicates' estimates and se = sd / √replicates.
 */
import type { PreparedTarget } from '../geometry';
import { analyticCentre, isFlat } from '../geometry';
import { Cholesky } from '../linalg/cholesky';
import { findMode } from '../mode';
import { Rng } from '../rng';
import { gaussianAnneal, makeFrame, oracleFrame, temper, withRounding, type AnnealSettings, type BodyOracle, type Frame, type StageLog } from './anneal';
export { l1BallOracle, type BodyOracle } from './anneal';

export type EvidenceReference = 'auto' | 'uniform' | 'gaussian';

export interface EvidenceOptions {
  /** Independent replicates for the standard error (2–64, default 4). */
  replicates?: number;
  /**
   * Keep adding replicates (up to 64) until the standard error of log Z is at most this. The
   * standard error is re-estimated after each one, so stopping is decided on a noisy estimate:
   * treat the result as approximate when only a few replicates ran.
   */
  targetSe?: number;
  seed?: number;
  /** Draws recorded per annealing stage (default 2000). */
  drawsPerStage?: number;
  /** Effective-sample-size fraction each adaptive step keeps (default 0.8). */
  essTarget?: number;
  reference?: EvidenceReference;
  /** Also estimate the region's volume when it is bounded (default true). */
  volume?: boolean;
  signal?: AbortSignal;
  /** Expert overrides of the annealing settings (walkers, thinning, burn-in). */
  tuning?: Partial<AnnealSettings>;
  /** Called after each replicate (for progress lines). */
  onReplicate?(index: number, logZ: number): void;
  /** Called at the start of each replicate and of each annealing stage (for progress). */
  onProgress?(replicate: number, stage: number): void;
}

export interface EvidenceResult {
  /** log Z in the measure described above; ± se. */
  logZ: number;
  se: number;
  /** log volume of the region (null when unbounded or not computed) and its standard error. */
  volumeLog: number | null;
  volumeSe: number | null;
  /** How Z was reached: 'volume' (flat density), 'uniform' or 'gaussian' reference. */
  reference: 'volume' | 'uniform' | 'gaussian';
  /** Dimension of the region (after equalities). */
  dimension: number;
  replicates: number;
  replicateLogZ: number[];
  /** Annealing and tempering stages per replicate (mean over replicates). */
  stages: number;
  /** Recorded draws and chord moves over all replicates. */
  draws: number;
  moves: number;
  densityEvaluations: number;
  seconds: number;
}

export const EVIDENCE_DEFAULTS = {
  replicates: 4,
  seed: 20261201,
  drawsPerStage: 2000,
  essTarget: 0.8,
};

/** Seed streams of the replicates (mixed with the seed; distinct from the fit's streams). */
const REPLICATE_STREAM = 0xe71d;

function meanSe(xs: number[]): { mean: number; se: number } {
  const R = xs.length;
  const mean = xs.reduce((a, b) => a + b, 0) / R;
  const v = xs.reduce((a, b) => a + (b - mean) ** 2, 0) / Math.max(1, R - 1);
  return { mean, se: Math.sqrt(v / R) };
}

/** −∇²ℓ at z by central differences of the gradient (one-sided where a side is not finite). */
function negHessian(p: PreparedTarget, z: Float64Array): Float64Array | null {
  const n = p.n;
  const H = new Float64Array(n * n);
  const g0 = new Float64Array(n);
  const g1 = new Float64Array(n);
  const g2 = new Float64Array(n);
  const zt = new Float64Array(n);
  const l0 = p.logDensity(z, g0);
  if (!Number.isFinite(l0)) return null;
  const fin = (l: number, g: Float64Array) => Number.isFinite(l) && g.every(Number.isFinite);
  for (let j = 0; j < n; j++) {
    const h = 1e-5 * Math.max(1, Math.abs(z[j]));
    zt.set(z);
    zt[j] = z[j] + h;
    const okP = fin(p.logDensity(zt, g1), g1);
    zt[j] = z[j] - h;
    const okM = fin(p.logDensity(zt, g2), g2);
    for (let q = 0; q < n; q++) {
      let d: number;
      if (okP && okM) d = (g1[q] - g2[q]) / (2 * h);
      else if (okP) d = (g1[q] - g0[q]) / h;
      else if (okM) d = (g0[q] - g2[q]) / h;
      else return null;
      H[q * n + j] = -d;
    }
  }
  for (let i = 0; i < n; i++)
    for (let j = 0; j < i; j++) {
      const a = 0.5 * (H[i * n + j] + H[j * n + i]);
      H[i * n + j] = a;
      H[j * n + i] = a;
    }
  return H;
}

interface GaussianPlan {
  frame: Frame;
  centre: Float64Array;
  offset: number;
}

function gaussianPlan(p: PreparedTarget): GaussianPlan | null {
  const n = p.n;
  const mode = findMode(p);
  if (!mode.converged || !mode.theta.every(Number.isFinite)) return null;
  // θ → z: z = Nᵀ (θ − θ₀) (N orthonormal), or z = θ.
  const zStar = new Float64Array(n);
  if (p.N) {
    const d = p.target.dim;
    for (let q = 0; q < n; q++) {
      let s = 0;
      for (let j = 0; j < d; j++) s += p.N[j * n + q] * (mode.theta[j] - p.theta0[j]);
      zStar[q] = s;
    }
  } else zStar.set(mode.theta);
  // Keep the origin strictly inside (the barrier mode is, by a hair; round-off may not keep it).
  const sl = new Float64Array(p.m);
  p.rows.mul(zStar, sl);
  for (let i = 0; i < p.m; i++) if (!(p.b[i] - sl[i] > 0)) return null;
  const Q = negHessian(p, zStar);
  if (!Q) return null;
  const chol = new Cholesky(n);
  if (!chol.factor(Q)) return null;
  const L = Float64Array.from(chol.L);
  for (let q = 0; q < n; q++) if (!(L[q * n + q] > 0) || !Number.isFinite(L[q * n + q])) return null;
  const frame = makeFrame(p, zStar, L);
  const offset = p.logDensity(zStar, new Float64Array(n));
  if (!Number.isFinite(offset)) return null;
  let centre: Float64Array = new Float64Array(n);
  if (p.m === 0) return { frame, centre, offset };
  const y0 = frame.toY(p.centre, new Float64Array(n));
  const ac = analyticCentre(frame.rows, frame.b, y0, 1);
  if (!ac.converged) return null;
  centre = ac.z;
  // Moves are rounded by I + Σ aᵢaᵢᵀ/sᵢ² at the centre (the reference's precision plus the barrier's
  // Hessian), so a region that is thin in the reference's frame is still crossed in a few moves.
  const H = new Float64Array(n * n);
  for (let q = 0; q < n; q++) H[q * n + q] = 1;
  const slc = new Float64Array(p.m);
  frame.rows.mul(centre, slc);
  for (let i = 0; i < p.m; i++) {
    const w = 1 / (frame.b[i] - slc[i]) ** 2;
    for (let a = 0; a < n; a++) {
      const va = frame.Ay[i * n + a];
      if (va === 0) continue;
      for (let c = 0; c <= a; c++) H[a * n + c] += w * va * frame.Ay[i * n + c];
    }
  }
  for (let a = 0; a < n; a++) for (let c = 0; c < a; c++) H[c * n + a] = H[a * n + c];
  const hc = new Cholesky(n);
  if (!hc.factor(H)) return { frame, centre, offset };
  return { frame: withRounding(frame, Float64Array.from(hc.L)), centre, offset };
}

/** Replicates, seed, draws per stage and annealing settings of one evidence computation in n dimensions. */
function annealRun(n: number, opts: EvidenceOptions): { R: number; seed: number; N: number; cfg: AnnealSettings } {
  const R = opts.replicates ?? EVIDENCE_DEFAULTS.replicates;
  if (!Number.isInteger(R) || R < 2 || R > 64) throw new Error('replicates must be a whole number from 2 to 64.');
  const seed = opts.seed ?? EVIDENCE_DEFAULTS.seed;
  const N = opts.drawsPerStage ?? EVIDENCE_DEFAULTS.drawsPerStage;
  const cfg: AnnealSettings = {
    drawsPerStage: N,
    walkers: Math.max(4, Math.min(40, Math.floor(N / 8))),
    thin: Math.max(4, 2 * n),
    burn: Math.max(20, 5 * n),
    essTarget: opts.essTarget ?? EVIDENCE_DEFAULTS.essTarget,
    maxStages: 3000,
    signal: opts.signal,
    ...opts.tuning,
  };
  return { R, seed, N, cfg };
}

export function computeEvidence(p: PreparedTarget, opts: EvidenceOptions = {}): EvidenceResult {
  const started = performance.now();
  const n = p.n;
  const { R, seed, N, cfg } = annealRun(n, opts);
  const flat = isFlat(p);
  const bounded = p.bounded && p.m > 0;
  if (flat && !bounded) {
    throw new Error('The density is constant and the region is unbounded, so the integral is infinite: add a prior or bounds.');
  }
  const want = opts.reference ?? 'auto';
  let reference: EvidenceResult['reference'];
  let plan: GaussianPlan | null = null;
  if (flat) reference = 'volume';
  else if (want === 'uniform') {
    if (!bounded) throw new Error('A flat reference needs a bounded region.');
    reference = 'uniform';
  } else {
    plan = gaussianPlan(p);
    if (plan) reference = 'gaussian';
    else if (want === 'gaussian' || !bounded) {
      throw new Error(
        'No Gaussian reference could be fitted: the maximum of the log-density was not found or its curvature there is not negative definite' +
          (bounded ? '.' : ', and the region is unbounded. Check that the density is proper (every unknown has a prior or bounds).'),
      );
    } else reference = 'uniform';
  }
  const wantVolume = bounded && (reference !== 'gaussian' || opts.volume !== false);
  const dikin = wantVolume ? makeFrame(p, p.centre, p.dikinL) : null;
  const zBuf = new Float64Array(n);
  const gBuf = new Float64Array(n);
  const ellIn = (f: Frame, offset: number) => (y: Float64Array) => {
    const l = p.logDensity(f.toZ(y, zBuf), gBuf);
    return Number.isNaN(l) ? -Infinity : l - offset;
  };
  const logZs: number[] = [];
  const vols: number[] = [];
  const totals: StageLog = { stages: 0, draws: 0, moves: 0, densityEvaluations: 0 };
  const add = (s: StageLog) => {
    totals.stages += s.stages;
    totals.draws += s.draws;
    totals.moves += s.moves;
    totals.densityEvaluations += s.densityEvaluations;
  };
  const centreZero = new Float64Array(n);
  for (let r = 0; r < 64; r++) {
    if (r >= R && (opts.targetSe === undefined || meanSe(logZs).se <= opts.targetSe)) break;
    const rng = new Rng(seed, REPLICATE_STREAM + r);
    let stage = 0;
    opts.onProgress?.(r, 0);
    cfg.onStage = opts.onProgress ? () => opts.onProgress!(r, ++stage) : opts.tuning?.onStage;
    let logZ: number;
    let vol: ReturnType<typeof gaussianAnneal> | null = null;
    if (dikin) {
      vol = gaussianAnneal(dikin, centreZero, 0, rng, cfg);
      add(vol);
      vols.push(vol.logZ + dikin.logJac);
    }
    if (reference === 'volume') {
      logZ = vols[r] + p.logDensity(p.centre, gBuf);
    } else if (reference === 'uniform') {
      const offset = p.logDensity(p.centre, gBuf);
      const tr = temper(p, dikin!, ellIn(dikin!, offset), 0, vol!.walkers, rng, cfg);
      add(tr);
      logZ = offset + vols[r] + tr.logRatio;
    } else {
      const { frame, centre, offset } = plan!;
      const g = gaussianAnneal(frame, centre, 1, rng, cfg);
      add(g);
      const tr = temper(p, frame, ellIn(frame, offset), 1, g.walkers, rng, cfg);
      add(tr);
      logZ = offset + frame.logJac + g.logZ + tr.logRatio;
    }
    logZs.push(logZ);
    opts.onReplicate?.(r, logZ);
  }
  const z = meanSe(logZs);
  const v = vols.length ? meanSe(vols) : null;
  return {
    logZ: z.mean,
    se: z.se,
    volumeLog: v ? v.mean : null,
    volumeSe: v ? v.se : null,
    reference,
    dimension: n,
    replicates: logZs.length,
    replicateLogZ: logZs,
    stages: Math.round(totals.stages / logZs.length),
    draws: totals.draws,
    moves: totals.moves,
    densityEvaluations: totals.densityEvaluations,
    seconds: (performance.now() - started) / 1000,
  };
}

/** Volume of the region alone (the density is ignored). Throws when the region is unbounded. */
export function computeVolume(p: PreparedTarget, opts: EvidenceOptions = {}): EvidenceResult {
  const flatView: PreparedTarget = {
    ...p,
    logDensity: (_z, grad) => {
      grad.fill(0);
      return 0;
    },
    flat: true,
  };
  if (!(p.bounded && p.m > 0)) throw new Error('The region is unbounded, so its volume is infinite.');
  return computeEvidence(flatView, { ...opts, reference: 'auto' });
}

/**
 * Volume of a convex body given by an oracle (anneal.ts BodyOracle: chords along axes, a bound on
 * the Gaussian mass outside) rather than by rows, by the same Gaussian cooling from the origin (which
 * must be inside, the body roughly round around it), with the same replicates and standard error.
 * For bodies whose rows are too many to read per move, e.g. the ℓ1 ball (l1BallOracle).
 */
export function computeOracleVolume(n: number, oracle: BodyOracle, opts: EvidenceOptions = {}): EvidenceResult {
  const started = performance.now();
  const { R, seed, N, cfg } = annealRun(n, opts);
  const f = oracleFrame(n, oracle);
  const logs: number[] = [];
  const totals: StageLog = { stages: 0, draws: 0, moves: 0, densityEvaluations: 0 };
  for (let r = 0; r < 64; r++) {
    if (r >= R && (opts.targetSe === undefined || meanSe(logs).se <= opts.targetSe)) break;
    const g = gaussianAnneal(f, new Float64Array(n), 0, new Rng(seed, REPLICATE_STREAM + r), cfg);
    totals.stages += g.stages;
    totals.draws += g.draws;
    totals.moves += g.moves;
    logs.push(g.logZ);
    opts.onReplicate?.(r, g.logZ);
  }
  const v = meanSe(logs);
  return {
    logZ: v.mean, se: v.se, volumeLog: v.mean, volumeSe: v.se, reference: 'volume', dimension: n, replicates: logs.length, replicateLogZ: logs,
    stages: Math.round(totals.stages / logs.length), draws: totals.draws, moves: totals.moves, densityEvaluations: 0, seconds: (performance.now() - started) / 1000,
  };
}
