/**
 * Transform-based Euclidean HMC: when the region is exactly a product of standard shapes, the
 * unknowns are written as smooth one-to-one maps θ = T(y) of unconstrained y and HMC runs on
 *   log π(y) = ℓ(T(y)) + log |det ∂T/∂y|
 * (change of variables; the transforms are the ones in common use in probabilistic programming):
 *
 * - a bound θ ≥ l or θ ≤ u: θ = l + eʸ or u − eʸ (log |J| = y); both: θ = l + (u − l)·logistic(y);
 * - a simplex {θ_S ≥ l_S, Σ_S θ ≤ t} or {…, Σ_S θ = t}: stick-breaking, part k of K takes the
 *   share logistic(y_k − log(K − k)) of what is left (log |J| = Σ log z_k + log(1 − z_k) + log r_k,
 *   r_k what is left); with "≤" the slack is the last part;
 * - an ordering θ₁ ≤ θ₂ + … (a chain of rows θ_i − θ_j ≤ c): cumulative log-increments
 *   θ_{i+1} = θ_i + δ + eʸ (log |J| = Σ y); an ordering bounded at both ends is the simplex of its
 *   gaps.
 *
 * The shape is detected on the model's original rows (A θ ≤ b, E θ = e, duplicates merged as in
 * presolve): every inequality must be a bound on one unknown, an ordering of two unknowns, or a
 * sum of unknowns with equal coefficients; every equality a sum with equal coefficients; each
 * unknown belongs to at most one simplex or chain, a chain's interior has no bounds, and a simplex
 * member has a lower bound only. Anything else is refused with a message naming the first row
 * that does not fit. With equalities the measure on the plane differs from Lebesgue measure on the
 * first K − 1 parts by a constant, which does not matter.
 *
 * HMC, step size, metric and path length: hmc-core.ts (no reflections: y is unconstrained).
 */
import type { ChainOptions, ChainOutput, ModelTarget } from '../types';
import type { PreparedTarget } from '../geometry';
import type { Rng } from '../rng';
import { curvatureByDifferences, type DrawCheck } from './common';
import { euclideanHmcChain } from './hmc-core';

type Block =
  | { kind: 'free'; j: number }
  | { kind: 'lower'; j: number; l: number }
  | { kind: 'upper'; j: number; u: number }
  | { kind: 'interval'; j: number; l: number; u: number }
  /** members θ_j = l_j + part; `slack`: one more part (the "≤" simplex). */
  | { kind: 'simplex'; members: number[]; lowers: number[]; total: number; slack: boolean }
  /** nodes in increasing order; deltas[i] is the minimum gap into nodes[i] (deltas[0] unused). */
  | { kind: 'chain'; nodes: number[]; deltas: number[]; l?: number; u?: number };

export interface TransformPlan {
  blocks: Block[];
  /** Unconstrained dimension. */
  k: number;
  /** One phrase per block kind present, e.g. "2 simplices, 3 bounds". */
  description: string;
}

export type ShapeResult = { ok: true; plan: TransformPlan } | { ok: false; reason: string };

const relEq = (a: number, b: number) => Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b));

/** Detects a product of bounds, simplices and orderings on the model's original rows. */
export function detectTransformShape(t: ModelTarget): ShapeResult {
  const d = t.dim;
  const I = t.inequalities;
  const E = t.equalities;
  const lower = new Float64Array(d).fill(-Infinity);
  const upper = new Float64Array(d).fill(Infinity);
  const succ = new Int32Array(d).fill(-1);
  const pred = new Int32Array(d).fill(-1);
  const deltaInto = new Float64Array(d);
  const sumOf = new Int32Array(d).fill(-1);
  const sums: { members: number[]; rhs: number; eq: boolean; label: string }[] = [];
  const refuse = (label: string, why: string): ShapeResult => ({
    ok: false,
    reason: `transform-based HMC needs a region made only of bounds, simplices and orderings, and ${why} ("${label}"). Choose another engine, e.g. reflect-hmc or hitrun.`,
  });
  const nonzeros = (A: Float64Array, i: number) => {
    const out: [number, number][] = [];
    for (let j = 0; j < d; j++) if (A[i * d + j] !== 0) out.push([j, A[i * d + j]]);
    return out;
  };
  for (let i = 0; i < I.rows; i++) {
    const nz = nonzeros(I.A, i);
    const b = I.b[i];
    const label = I.labels[i] ?? `constraint ${i + 1}`;
    if (nz.length === 0) continue;
    if (nz.length === 1) {
      const [j, a] = nz[0];
      if (a > 0) upper[j] = Math.min(upper[j], b / a);
      else lower[j] = Math.max(lower[j], b / a);
      continue;
    }
    if (nz.length === 2 && relEq(nz[0][1], -nz[1][1])) {
      // α(θ_u − θ_w) ≤ b with α > 0: θ_w ≥ θ_u − b/α, an ordering edge u → w.
      const [[j0, a0], [j1]] = nz;
      const [uj, wj, alpha] = a0 > 0 ? [j0, j1, a0] : [j1, j0, -a0];
      const delta = -b / alpha;
      if (succ[uj] === wj) {
        deltaInto[wj] = Math.max(deltaInto[wj], delta);
        continue;
      }
      if (succ[uj] !== -1 || pred[wj] !== -1) return refuse(label, 'an unknown is ordered against two others on the same side, which is not a chain');
      succ[uj] = wj;
      pred[wj] = uj;
      deltaInto[wj] = delta;
      continue;
    }
    const c = nz[0][1];
    if (c > 0 && nz.every(([, a]) => relEq(a, c))) {
      const members = nz.map(([j]) => j);
      const same = sums.find((s) => !s.eq && s.members.length === members.length && s.members.every((j, r) => j === members[r]));
      if (same) {
        same.rhs = Math.min(same.rhs, b / c);
        continue;
      }
      if (members.some((j) => sumOf[j] !== -1)) return refuse(label, 'an unknown appears in two sums');
      for (const j of members) sumOf[j] = sums.length;
      sums.push({ members, rhs: b / c, eq: false, label });
      continue;
    }
    return refuse(label, 'this constraint is not a bound, an ordering of two unknowns or a simplex sum');
  }
  for (let i = 0; i < E.rows; i++) {
    const nz = nonzeros(E.A, i);
    const label = E.labels[i] ?? `equality ${i + 1}`;
    if (nz.length < 2) return refuse(label, 'this equality fixes an unknown');
    const c = nz[0][1];
    if (!nz.every(([, a]) => relEq(a, c))) return refuse(label, 'this equality is not a sum with equal coefficients');
    const members = nz.map(([j]) => j);
    if (members.some((j) => sumOf[j] !== -1)) return refuse(label, 'an unknown appears in two sums');
    for (const j of members) sumOf[j] = sums.length;
    sums.push({ members, rhs: E.b[i] / c, eq: true, label });
  }
  const blocks: Block[] = [];
  let k = 0;
  const used = new Uint8Array(d);
  for (const s of sums) {
    for (const j of s.members) {
      if (!Number.isFinite(lower[j])) return refuse(s.label, `${t.names[j]} is in a sum but has no lower bound, so the sum is not a simplex`);
      if (Number.isFinite(upper[j])) return refuse(s.label, `${t.names[j]} is in a simplex sum and also has an upper bound`);
      if (succ[j] !== -1 || pred[j] !== -1) return refuse(s.label, `${t.names[j]} is in a simplex sum and also ordered`);
      used[j] = 1;
    }
    const lowers = s.members.map((j) => lower[j]);
    const total = s.rhs - lowers.reduce((a, v) => a + v, 0);
    if (!(total > 0)) return refuse(s.label, 'the simplex has no interior');
    if (s.eq && s.members.length < 2) return refuse(s.label, 'the equality fixes an unknown');
    blocks.push({ kind: 'simplex', members: s.members, lowers, total, slack: !s.eq });
    k += s.eq ? s.members.length - 1 : s.members.length;
  }
  for (let j = 0; j < d; j++) {
    if (used[j] || pred[j] !== -1 || succ[j] === -1) continue;
    const nodes = [j];
    const deltas = [0];
    let c = j;
    while (succ[c] !== -1) {
      c = succ[c];
      nodes.push(c);
      deltas.push(deltaInto[c]);
    }
    const head = nodes[0];
    const tail = nodes[nodes.length - 1];
    for (const q of nodes) {
      if ((q !== head && Number.isFinite(lower[q])) || (q !== tail && Number.isFinite(upper[q]))) {
        return { ok: false, reason: `transform-based HMC needs a region made only of bounds, simplices and orderings, and ${t.names[q]} has a bound inside an ordering chain. Choose another engine, e.g. reflect-hmc or hitrun.` };
      }
      used[q] = 1;
    }
    const l = Number.isFinite(lower[head]) ? lower[head] : undefined;
    const u = Number.isFinite(upper[tail]) ? upper[tail] : undefined;
    if (l !== undefined && u !== undefined && !(u - l - deltas.reduce((a, v) => a + v, 0) > 0)) {
      return { ok: false, reason: 'transform-based HMC: an ordering chain bounded at both ends has no interior.' };
    }
    blocks.push({ kind: 'chain', nodes, deltas, l, u });
    k += nodes.length;
  }
  for (let j = 0; j < d; j++) {
    if (used[j]) continue;
    if (pred[j] !== -1) {
      return { ok: false, reason: `transform-based HMC needs a region made only of bounds, simplices and orderings, and the orderings through ${t.names[j]} form a cycle. Choose another engine.` };
    }
    const l = lower[j];
    const u = upper[j];
    if (Number.isFinite(l) && Number.isFinite(u)) {
      if (!(u > l)) return { ok: false, reason: `transform-based HMC: the bounds of ${t.names[j]} leave no interior.` };
      blocks.push({ kind: 'interval', j, l, u });
    } else if (Number.isFinite(l)) blocks.push({ kind: 'lower', j, l });
    else if (Number.isFinite(u)) blocks.push({ kind: 'upper', j, u });
    else blocks.push({ kind: 'free', j });
    k++;
  }
  const count = (kinds: string[]) => blocks.filter((b) => kinds.includes(b.kind)).length;
  const parts: string[] = [];
  const nS = count(['simplex']);
  const nC = count(['chain']);
  const nB = count(['lower', 'upper', 'interval']);
  const nF = count(['free']);
  if (nS) parts.push(`${nS} simplex${nS > 1 ? 'es' : ''}`);
  if (nC) parts.push(`${nC} ordering${nC > 1 ? 's' : ''}`);
  if (nB) parts.push(`${nB} bounded unknown${nB > 1 ? 's' : ''}`);
  if (nF) parts.push(`${nF} free unknown${nF > 1 ? 's' : ''}`);
  return { ok: true, plan: { blocks, k, description: parts.join(', ') || 'no unknowns' } };
}

/* ----------------------------------------------------------------------------------------------- */
/* The transforms                                                                                  */
/* ----------------------------------------------------------------------------------------------- */

const softplus = (a: number) => (a > 0 ? a + Math.log1p(Math.exp(-a)) : Math.log1p(Math.exp(a)));
const logistic = (a: number) => (a >= 0 ? 1 / (1 + Math.exp(-a)) : Math.exp(a) / (1 + Math.exp(a)));

/** Stick-breaking scratch for one simplex of K parts. */
class Stick {
  readonly z: Float64Array;
  readonly r: Float64Array;
  constructor(readonly K: number) {
    this.z = new Float64Array(K);
    this.r = new Float64Array(K);
  }
  /** y (K − 1 values from off) → parts x (K values); returns log |J|. */
  forward(y: Float64Array, off: number, total: number, x: Float64Array): number {
    const K = this.K;
    let r = total;
    let lj = 0;
    for (let k = 0; k < K - 1; k++) {
      const a = y[off + k] - Math.log(K - 1 - k);
      const zk = logistic(a);
      this.z[k] = zk;
      this.r[k] = r;
      lj += -softplus(-a) - softplus(a) + Math.log(r);
      x[k] = r * zk;
      r = r * (1 - zk);
    }
    x[K - 1] = r;
    return lj;
  }
  /** Adds ∂/∂y of Σ gx·x + log |J| into gy (after forward at the same y). */
  backward(gx: Float64Array, gy: Float64Array, off: number): void {
    const K = this.K;
    let gr = gx[K - 1];
    for (let k = K - 2; k >= 0; k--) {
      const zk = this.z[k];
      const rk = this.r[k];
      gy[off + k] += (gx[k] - gr) * rk * zk * (1 - zk) + 1 - 2 * zk;
      gr = gr * (1 - zk) + gx[k] * zk + 1 / rk;
    }
  }
  inverse(x: ArrayLike<number>, total: number, y: Float64Array, off: number): void {
    const K = this.K;
    let r = total;
    for (let k = 0; k < K - 1; k++) {
      const zk = Math.min(1 - 1e-15, Math.max(1e-15, x[k] / r));
      y[off + k] = Math.log(zk / (1 - zk)) + Math.log(K - 1 - k);
      r -= x[k];
    }
  }
}

/** θ = T(y) with log |J| and its reverse sweep. */
export class TransformMap {
  private readonly sticks: (Stick | null)[];
  private readonly xs: Float64Array[];
  private readonly gxs: Float64Array[];
  constructor(readonly plan: TransformPlan) {
    this.sticks = plan.blocks.map((b) =>
      b.kind === 'simplex' ? new Stick(b.members.length + (b.slack ? 1 : 0)) : b.kind === 'chain' && b.l !== undefined && b.u !== undefined ? new Stick(b.nodes.length + 1) : null,
    );
    this.xs = this.sticks.map((s) => new Float64Array(s ? s.K : 0));
    this.gxs = this.sticks.map((s) => new Float64Array(s ? s.K : 0));
  }

  /** Writes θ; returns log |J|. */
  forward(y: Float64Array, theta: Float64Array): number {
    let off = 0;
    let lj = 0;
    this.plan.blocks.forEach((b, bi) => {
      switch (b.kind) {
        case 'free':
          theta[b.j] = y[off++];
          break;
        case 'lower':
          theta[b.j] = b.l + Math.exp(y[off]);
          lj += y[off++];
          break;
        case 'upper':
          theta[b.j] = b.u - Math.exp(y[off]);
          lj += y[off++];
          break;
        case 'interval': {
          const a = y[off++];
          theta[b.j] = b.l + (b.u - b.l) * logistic(a);
          lj += Math.log(b.u - b.l) - softplus(-a) - softplus(a);
          break;
        }
        case 'simplex': {
          const st = this.sticks[bi]!;
          const x = this.xs[bi];
          lj += st.forward(y, off, b.total, x);
          b.members.forEach((j, r) => (theta[j] = b.lowers[r] + x[r]));
          off += st.K - 1;
          break;
        }
        case 'chain': {
          const nn = b.nodes.length;
          if (b.l !== undefined && b.u !== undefined) {
            const st = this.sticks[bi]!;
            const x = this.xs[bi];
            const total = b.u - b.l - b.deltas.reduce((s, v, i) => (i > 0 ? s + v : s), 0);
            lj += st.forward(y, off, total, x);
            let v = b.l;
            for (let i = 0; i < nn; i++) {
              v += x[i] + (i > 0 ? b.deltas[i] : 0);
              theta[b.nodes[i]] = v;
            }
          } else if (b.u !== undefined) {
            let v = b.u - Math.exp(y[off + nn - 1]);
            theta[b.nodes[nn - 1]] = v;
            for (let i = nn - 2; i >= 0; i--) {
              v = v - b.deltas[i + 1] - Math.exp(y[off + i]);
              theta[b.nodes[i]] = v;
            }
            for (let i = 0; i < nn; i++) lj += y[off + i];
          } else {
            let v = b.l !== undefined ? b.l + Math.exp(y[off]) : y[off];
            if (b.l !== undefined) lj += y[off];
            theta[b.nodes[0]] = v;
            for (let i = 1; i < nn; i++) {
              v = v + b.deltas[i] + Math.exp(y[off + i]);
              theta[b.nodes[i]] = v;
              lj += y[off + i];
            }
          }
          off += nn;
          break;
        }
      }
    });
    return lj;
  }

  /** gy = Jᵀ gθ + ∇ log |J| (after forward at the same y). */
  backward(y: Float64Array, gTheta: Float64Array, gy: Float64Array): void {
    gy.fill(0);
    let off = 0;
    this.plan.blocks.forEach((b, bi) => {
      switch (b.kind) {
        case 'free':
          gy[off] = gTheta[b.j];
          off++;
          break;
        case 'lower':
          gy[off] = gTheta[b.j] * Math.exp(y[off]) + 1;
          off++;
          break;
        case 'upper':
          gy[off] = -gTheta[b.j] * Math.exp(y[off]) + 1;
          off++;
          break;
        case 'interval': {
          const s = logistic(y[off]);
          gy[off] = gTheta[b.j] * (b.u - b.l) * s * (1 - s) + 1 - 2 * s;
          off++;
          break;
        }
        case 'simplex': {
          const st = this.sticks[bi]!;
          const gx = this.gxs[bi];
          gx.fill(0);
          b.members.forEach((j, r) => (gx[r] = gTheta[j]));
          st.backward(gx, gy, off);
          off += st.K - 1;
          break;
        }
        case 'chain': {
          const nn = b.nodes.length;
          if (b.l !== undefined && b.u !== undefined) {
            const st = this.sticks[bi]!;
            const gx = this.gxs[bi];
            let acc = 0;
            for (let i = nn - 1; i >= 0; i--) {
              acc += gTheta[b.nodes[i]];
              gx[i] = acc;
            }
            gx[nn] = 0;
            st.backward(gx, gy, off);
          } else if (b.u !== undefined) {
            let acc = 0;
            for (let i = 0; i < nn; i++) {
              acc += gTheta[b.nodes[i]];
              gy[off + i] = -acc * Math.exp(y[off + i]) + 1;
            }
          } else {
            let acc = 0;
            for (let i = nn - 1; i >= 0; i--) {
              acc += gTheta[b.nodes[i]];
              if (i === 0) gy[off] = b.l !== undefined ? acc * Math.exp(y[off]) + 1 : acc;
              else gy[off + i] = acc * Math.exp(y[off + i]) + 1;
            }
          }
          off += nn;
          break;
        }
      }
    });
  }

  /** y = T⁻¹(θ) for a strictly interior θ. */
  inverse(theta: Float64Array, y: Float64Array): void {
    let off = 0;
    this.plan.blocks.forEach((b, bi) => {
      switch (b.kind) {
        case 'free':
          y[off++] = theta[b.j];
          break;
        case 'lower':
          y[off++] = Math.log(theta[b.j] - b.l);
          break;
        case 'upper':
          y[off++] = Math.log(b.u - theta[b.j]);
          break;
        case 'interval': {
          const f = (theta[b.j] - b.l) / (b.u - b.l);
          y[off++] = Math.log(f / (1 - f));
          break;
        }
        case 'simplex': {
          const st = this.sticks[bi]!;
          const x = b.members.map((j, r) => theta[j] - b.lowers[r]);
          if (b.slack) x.push(b.total - x.reduce((a, v) => a + v, 0));
          st.inverse(x, b.total, y, off);
          off += st.K - 1;
          break;
        }
        case 'chain': {
          const nn = b.nodes.length;
          const th = b.nodes.map((j) => theta[j]);
          if (b.l !== undefined && b.u !== undefined) {
            const st = this.sticks[bi]!;
            const gaps: number[] = [];
            for (let i = 0; i < nn; i++) gaps.push(th[i] - (i === 0 ? b.l : th[i - 1] + b.deltas[i]));
            const total = b.u - b.l - b.deltas.reduce((s, v, i) => (i > 0 ? s + v : s), 0);
            gaps.push(total - gaps.reduce((a, v) => a + v, 0));
            st.inverse(gaps, total, y, off);
          } else if (b.u !== undefined) {
            y[off + nn - 1] = Math.log(b.u - th[nn - 1]);
            for (let i = nn - 2; i >= 0; i--) y[off + i] = Math.log(th[i + 1] - b.deltas[i + 1] - th[i]);
          } else {
            y[off] = b.l !== undefined ? Math.log(th[0] - b.l) : th[0];
            for (let i = 1; i < nn; i++) y[off + i] = Math.log(th[i] - th[i - 1] - b.deltas[i]);
          }
          off += nn;
          break;
        }
      }
    });
  }
}

/**
 * Initial inverse metric from the diagonal of −∇²ℓ at x by central differences of the gradient
 * (2k evaluations): 1/curvature where it is positive and finite; elsewhere (a flat or locally
 * non-concave direction) the geometric mean of the others, or 1. Clamped to [1e-10, 1e4]. Starting
 * the metric at the local curvature rather than the identity is common practice for short
 * warm-ups (the inverse Hessian's diagonal as a first guess of the posterior's scales).
 */
export function curvatureInverseMetric(logDensity: (x: Float64Array, g: Float64Array) => number, x0: Float64Array): Float64Array {
  const k = x0.length;
  const out = curvatureByDifferences(logDensity, Float64Array.from(x0), (q) => 1e-4 * (1 + Math.abs(x0[q])), new Float64Array(k));
  for (let q = 0; q < k; q++) out[q] = out[q] > 0 ? Math.min(1e4, Math.max(1e-10, 1 / out[q])) : NaN;
  let logSum = 0;
  let count = 0;
  for (let q = 0; q < k; q++) if (Number.isFinite(out[q])) (logSum += Math.log(out[q])), count++;
  const fill = count > 0 ? Math.exp(logSum / count) : 1;
  for (let q = 0; q < k; q++) if (!Number.isFinite(out[q])) out[q] = fill;
  return out;
}

export function transformHmcChain(p: PreparedTarget, start: Float64Array, opts: ChainOptions, rng: Rng, check: DrawCheck): ChainOutput {
  const shape = detectTransformShape(p.target);
  if (!shape.ok) throw new Error(shape.reason);
  const map = new TransformMap(shape.plan);
  const d = p.target.dim;
  const n = p.n;
  const k = shape.plan.k;
  if (k !== n) throw new Error(`transform-based HMC: the transforms have ${k} free coordinates but the region has dimension ${n}.`);
  const theta = new Float64Array(d);
  const gTheta = new Float64Array(d);
  const y0 = new Float64Array(k);
  p.toTheta(start, theta);
  map.inverse(theta, y0);
  let evals = 0;
  const { N, theta0 } = p;
  const toZ = (y: Float64Array, z: Float64Array) => {
    map.forward(y, theta);
    if (!N) {
      z.set(theta);
      return;
    }
    z.fill(0);
    for (let j = 0; j < d; j++) {
      const dj = theta[j] - theta0[j];
      for (let q = 0; q < n; q++) z[q] += N[j * n + q] * dj;
    }
  };
  const logDensity = (y: Float64Array, gy: Float64Array): number => {
    evals++;
    const lj = map.forward(y, theta);
    const l = p.target.logDensity(theta, gTheta);
    if (!Number.isFinite(l) || !Number.isFinite(lj)) return -Infinity;
    map.backward(y, gTheta, gy);
    return l + lj;
  };
  return euclideanHmcChain(
    p,
    {
      k,
      x0: y0,
      logDensity,
      drift: (y, pm, invM, t) => {
        for (let q = 0; q < k; q++) y[q] += t * invM[q] * pm[q];
        return true;
      },
      toZ,
      // Initial scales from the curvature at the start (the unconstrained density has no faces, so
      // the offsets need no limit): a data-heavy posterior is far narrower than 1 in every
      // coordinate, and a short warm-up cannot wait for the windows to find that out.
      invMetric0: curvatureInverseMetric(logDensity, y0),
      driftWork: () => evals * 12 * d,
    },
    opts,
    rng,
    check,
  );
}
