/**
 * The projection of the constraint region onto two coordinates: the set of (θᵢ, θⱼ) reachable by
 * some θ with A θ ≤ b and E θ = e. It is a convex polygon (a projection of a polyhedron is a
 * polyhedron), so every draw's (θᵢ, θⱼ) lies inside it by construction, unlike a slice.
 *
 * Method: the polygon is the set whose support function is h(d) = max { d·(θᵢ, θⱼ) : θ in the region }.
 * Each h(d) is a small linear programme solved exactly by a dense simplex (Bland's rule, so it
 * cannot cycle). Starting from the maximisers in a few directions, every edge of their convex hull
 * is tested with its outward normal: if the region reaches beyond the edge, the new maximiser is
 * a further vertex and both new edges are tested in turn; otherwise the edge is a true edge of the
 * projection. The polygon has finitely many vertices, so this stops with the exact projection (up
 * to rounding). Known as the support-function or "shooting" method for projecting polytopes
 * (e.g. "Projection of polytopes", in Handbook of Discrete and Computational Geometry, 3rd ed., 2017).
 *
 * Unbounded regions are intersected with a clip box on (θᵢ, θⱼ); since the box restricts only those
 * two coordinates, the result is exactly projection ∩ box.
 */
import type { ModelTarget } from '../types';
import { prepareTarget, type PreparedTarget } from './index';

export interface ClipBox {
  xmin: number;
  xmax: number;
  ymin: number;
  ymax: number;
}

export interface RegionProjection {
  /** Vertices in counter-clockwise order (1 for a point, 2 for a segment, none when the clip box misses the region). */
  vertices: [number, number][];
  /** True when the clip box cut the projection (the region reaches beyond it). */
  clipped: boolean;
}

export class UnboundedProjectionError extends Error {
  constructor() {
    super('The region is unbounded in these two coordinates: give a clip box.');
    this.name = 'UnboundedProjectionError';
  }
}

class EmptyClipError extends Error {}

type LpResult = { status: 'optimal'; y: Float64Array; value: number } | { status: 'unbounded' } | { status: 'infeasible' };

/**
 * max c·y subject to A y ≤ s, y free (A is m × n row-major). Dense tableau on the split
 * y = y⁺ − y⁻ with slack columns; rows with s < 0 get an artificial column and a first phase
 * that minimises their sum (the two-phase method). Bland's smallest-index rule for entering and
 * leaving variables, so the method cannot cycle.
 */
export function simplexMax(c: Float64Array, A: Float64Array, s: Float64Array, m: number, n: number): LpResult {
  const negRows: number[] = [];
  for (let r = 0; r < m; r++) if (s[r] < 0) negRows.push(r);
  const k = negRows.length;
  const cols = 2 * n + m + k;
  const width = cols + 1; // last column: right-hand side
  const T = new Float64Array(m * width);
  const basis = new Int32Array(m);
  const artOf = new Int32Array(m).fill(-1);
  negRows.forEach((r, a) => (artOf[r] = 2 * n + m + a));
  for (let r = 0; r < m; r++) {
    const sign = artOf[r] >= 0 ? -1 : 1;
    for (let q = 0; q < n; q++) {
      T[r * width + q] = sign * A[r * n + q];
      T[r * width + n + q] = -sign * A[r * n + q];
    }
    T[r * width + 2 * n + r] = sign;
    T[r * width + cols] = sign * s[r];
    if (artOf[r] >= 0) {
      T[r * width + artOf[r]] = 1;
      basis[r] = artOf[r];
    } else basis[r] = 2 * n + r;
  }
  const pivEps = 1e-11;
  const pivot = (leave: number, enter: number, cost: Float64Array) => {
    const pr = leave * width;
    const pv = T[pr + enter];
    for (let q = 0; q < width; q++) T[pr + q] /= pv;
    T[pr + enter] = 1;
    for (let r = 0; r < m; r++) {
      if (r === leave) continue;
      const f = T[r * width + enter];
      if (f === 0) continue;
      const rr = r * width;
      for (let q = 0; q < width; q++) T[rr + q] -= f * T[pr + q];
      T[rr + enter] = 0;
      if (T[rr + cols] < 0 && T[rr + cols] > -1e-12) T[rr + cols] = 0;
    }
    const f = cost[enter];
    for (let q = 0; q < cols; q++) cost[q] -= f * T[pr + q];
    cost[enter] = 0;
    basis[leave] = enter;
  };
  /** Reduced costs (c_j − c_B B⁻¹ a_j) of the objective `obj` over the current basis. */
  const reduced = (obj: Float64Array) => {
    const cost = Float64Array.from(obj);
    for (let r = 0; r < m; r++) {
      const cb = obj[basis[r]];
      if (cb === 0) continue;
      for (let q = 0; q < cols; q++) cost[q] -= cb * T[r * width + q];
    }
    return cost;
  };
  const maxIter = 50 * (m + cols) + 1000;
  /** Primal simplex from a feasible basis; columns ≥ `allowed` never enter. */
  const run = (cost: Float64Array, allowed: number, eps: number): 'optimal' | 'unbounded' => {
    for (let it = 0; it < maxIter; it++) {
      let enter = -1;
      for (let q = 0; q < allowed; q++) {
        if (cost[q] > eps) {
          enter = q;
          break;
        }
      }
      if (enter < 0) return 'optimal';
      let leave = -1;
      let best = Infinity;
      for (let r = 0; r < m; r++) {
        const a = T[r * width + enter];
        if (a > pivEps) {
          const ratio = T[r * width + cols] / a;
          if (ratio < best - 1e-15 || (Math.abs(ratio - best) <= 1e-15 && leave >= 0 && basis[r] < basis[leave])) {
            best = ratio;
            leave = r;
          }
        }
      }
      if (leave < 0) return 'unbounded';
      pivot(leave, enter, cost);
    }
    throw new Error('projection: the linear programme did not finish');
  };

  if (k > 0) {
    const obj1 = new Float64Array(cols);
    for (let a = 0; a < k; a++) obj1[2 * n + m + a] = -1;
    const cost1 = reduced(obj1);
    run(cost1, cols, 1e-12);
    let infeas = 0;
    let scale = 0;
    for (let r = 0; r < m; r++) {
      if (basis[r] >= 2 * n + m) infeas += T[r * width + cols];
      scale = Math.max(scale, Math.abs(s[r]));
    }
    if (infeas > 1e-9 * Math.max(1, scale)) return { status: 'infeasible' };
    // Drive artificials left in the basis (at level zero) out by degenerate pivots.
    for (let r = 0; r < m; r++) {
      if (basis[r] < 2 * n + m) continue;
      let best = -1;
      for (let q = 0; q < 2 * n + m; q++) if (Math.abs(T[r * width + q]) > 1e-9 && (best < 0 || Math.abs(T[r * width + q]) > Math.abs(T[r * width + best]))) best = q;
      if (best >= 0) pivot(r, best, new Float64Array(cols));
      // Otherwise the row is redundant: all its structural entries are zero and it never changes.
    }
  }
  const obj = new Float64Array(cols);
  let cScale = 0;
  for (let q = 0; q < n; q++) {
    obj[q] = c[q];
    obj[n + q] = -c[q];
    cScale = Math.max(cScale, Math.abs(c[q]));
  }
  const cost = reduced(obj);
  if (run(cost, 2 * n + m, 1e-12 * Math.max(1, cScale)) === 'unbounded') return { status: 'unbounded' };
  const v = new Float64Array(cols);
  for (let r = 0; r < m; r++) v[basis[r]] = T[r * width + cols];
  const y = new Float64Array(n);
  let value = 0;
  for (let q = 0; q < n; q++) {
    y[q] = v[q] - v[n + q];
    value += c[q] * y[q];
  }
  return { status: 'optimal', y, value };
}

/** The two coordinates' affine map from reduced coordinates: θᵢ = oᵢ + gᵢ·z. */
function coordinateMap(p: PreparedTarget, k: number): { o: number; g: Float64Array } {
  const g = new Float64Array(p.n);
  if (!p.N) {
    g[k] = 1;
    return { o: 0, g };
  }
  for (let q = 0; q < p.n; q++) g[q] = p.N[k * p.n + q];
  return { o: p.theta0[k], g };
}

const cross = (o: [number, number], a: [number, number], b: [number, number]) => (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);

/**
 * The chain o → a → b does not turn left: a turns right, or lies within `tol` of the segment o–b
 * (on the line and between its ends; a point on the line beyond the ends is a corner to keep).
 */
const flat = (o: [number, number], a: [number, number], b: [number, number], tol: number) => {
  const cr = cross(o, a, b);
  if (cr <= 0) return true;
  const bx = b[0] - o[0];
  const by = b[1] - o[1];
  const len2 = bx * bx + by * by;
  if (cr > tol * Math.sqrt(len2)) return false;
  const t = (a[0] - o[0]) * bx + (a[1] - o[1]) * by;
  return t >= 0 && t <= len2;
};

/** Convex hull, counter-clockwise, without collinear points (monotone chain). */
export function convexHull(points: [number, number][], tol = 0): [number, number][] {
  const pts = [...points].sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  const uniq: [number, number][] = [];
  for (const p of pts) {
    const last = uniq[uniq.length - 1];
    if (!last || Math.abs(last[0] - p[0]) > tol || Math.abs(last[1] - p[1]) > tol) uniq.push(p);
  }
  if (uniq.length <= 2) return uniq;
  const lower: [number, number][] = [];
  for (const p of uniq) {
    while (lower.length >= 2 && flat(lower[lower.length - 2], lower[lower.length - 1], p, tol)) lower.pop();
    lower.push(p);
  }
  const upper: [number, number][] = [];
  for (let k = uniq.length - 1; k >= 0; k--) {
    const p = uniq[k];
    while (upper.length >= 2 && flat(upper[upper.length - 2], upper[upper.length - 1], p, tol)) upper.pop();
    upper.push(p);
  }
  lower.pop();
  upper.pop();
  const hull = lower.concat(upper);
  // A last pass drops vertices within tol of the segment joining their neighbours (near-vertical
  // runs can keep one when the sort order and the tolerance disagree).
  for (let k = 0; hull.length > 2 && k < hull.length; ) {
    const o = hull[(k + hull.length - 1) % hull.length];
    const b = hull[(k + 1) % hull.length];
    if (flat(o, hull[k], b, tol)) {
      hull.splice(k, 1);
      k = Math.max(0, k - 1);
    } else k++;
  }
  return hull.length ? hull : uniq.slice(0, 1);
}

/**
 * The region's projection onto coordinates i and j (0-based flat indices of the unknowns).
 * `target` may be prepared already (to project several pairs of one model). Throws
 * UnboundedProjectionError when the projection is unbounded and no clip box is given.
 */
export function projectRegion(target: ModelTarget | PreparedTarget, i: number, j: number, opts: { clip?: ClipBox } = {}): RegionProjection {
  const p = 'centre' in target ? target : prepareTarget(target);
  const dim = p.target.dim;
  if (!(i >= 0 && i < dim && j >= 0 && j < dim) || i === j) throw new Error(`projection: coordinates ${i} and ${j} must be two different unknowns`);
  const n = p.n;
  const X = coordinateMap(p, i);
  const Y = coordinateMap(p, j);
  const z0 = p.centre;
  let x0 = X.o;
  let y0 = Y.o;
  for (let q = 0; q < n; q++) {
    x0 += X.g[q] * z0[q];
    y0 += Y.g[q] * z0[q];
  }
  // Rows in y = z − z0: A y ≤ b − A z0 (> 0 at the strictly interior centre), plus the clip box.
  const rowsA: number[][] = [];
  const rhs: number[] = [];
  for (let r = 0; r < p.m; r++) {
    const a = Array.from(p.A.subarray(r * n, (r + 1) * n));
    let s = p.b[r];
    for (let q = 0; q < n; q++) s -= a[q] * z0[q];
    rowsA.push(a);
    rhs.push(s);
  }
  const clip = opts.clip;
  if (clip) {
    // These rows may exclude the centre (negative right-hand side): the LP's first phase handles it.
    rowsA.push(Array.from(X.g), Array.from(X.g, (v) => -v), Array.from(Y.g), Array.from(Y.g, (v) => -v));
    rhs.push(clip.xmax - x0, x0 - clip.xmin, clip.ymax - y0, y0 - clip.ymin);
  }
  const m = rowsA.length;
  const A = new Float64Array(m * n);
  rowsA.forEach((row, r) => A.set(row, r * n));
  const s = Float64Array.from(rhs);

  let clipped = false;
  const support = (dx: number, dy: number): [number, number] => {
    const c = new Float64Array(n);
    for (let q = 0; q < n; q++) c[q] = dx * X.g[q] + dy * Y.g[q];
    const res = simplexMax(c, A, s, m, n);
    if (res.status === 'unbounded') throw new UnboundedProjectionError();
    if (res.status === 'infeasible') throw new EmptyClipError();
    let x = x0;
    let y = y0;
    for (let q = 0; q < n; q++) {
      x += X.g[q] * res.y[q];
      y += Y.g[q] * res.y[q];
    }
    return [x, y];
  };

  if (n === 0) return { vertices: [[x0, y0]], clipped: false };
  const start: [number, number][] = [];
  const K = 8;
  try {
    for (let k = 0; k < K; k++) {
      const a = (2 * Math.PI * k) / K;
      start.push(support(Math.cos(a), Math.sin(a)));
    }
  } catch (e) {
    if (e instanceof EmptyClipError) return { vertices: [], clipped: true };
    throw e;
  }
  let scale = 0;
  for (const [x, y] of start) scale = Math.max(scale, Math.abs(x - x0), Math.abs(y - y0));
  const tol = 1e-10 * Math.max(1e-300, scale) + 1e-13 * Math.max(Math.abs(x0), Math.abs(y0));
  let hull = convexHull(start, tol);
  if (hull.length === 1) return { vertices: hull, clipped: false };

  // Refine: test each edge u→v (counter-clockwise, so its outward normal is (dy, −dx)).
  const done = new Set<string>();
  const key = (u: [number, number], v: [number, number]) => `${u[0]},${u[1]}|${v[0]},${v[1]}`;
  for (let guard = 0; guard < 10_000; guard++) {
    let changed = false;
    const L = hull.length;
    for (let k = 0; k < L; k++) {
      const u = hull[k];
      const v = hull[(k + 1) % L];
      if (done.has(key(u, v))) continue;
      let nx = v[1] - u[1];
      let ny = -(v[0] - u[0]);
      const len = Math.hypot(nx, ny);
      if (len === 0) {
        done.add(key(u, v));
        continue;
      }
      nx /= len;
      ny /= len;
      const w = support(nx, ny);
      const gain = nx * (w[0] - u[0]) + ny * (w[1] - u[1]);
      if (gain > tol) {
        hull = convexHull([...hull, w], tol);
        changed = true;
        break;
      }
      done.add(key(u, v));
    }
    if (!changed) break;
  }
  if (clip) {
    const e = tol * 10;
    clipped = hull.some(([x, y]) => Math.abs(x - clip.xmin) < e || Math.abs(x - clip.xmax) < e || Math.abs(y - clip.ymin) < e || Math.abs(y - clip.ymax) < e);
  }
  return { vertices: hull, clipped };
}

/** True when (x, y) lies in the convex polygon (counter-clockwise vertices), within `tol` of its edges. */
export function insidePolygon(poly: [number, number][], x: number, y: number, tol = 1e-9): boolean {
  if (poly.length === 0) return false;
  if (poly.length === 1) return Math.hypot(x - poly[0][0], y - poly[0][1]) <= tol;
  const L = poly.length;
  for (let k = 0; k < L; k++) {
    const u = poly[k];
    const v = poly[(k + 1) % L];
    const ex = v[0] - u[0];
    const ey = v[1] - u[1];
    const len = Math.hypot(ex, ey);
    if (len === 0) continue;
    // Signed distance to the left of u→v (inside for counter-clockwise order).
    const d = (ex * (y - u[1]) - ey * (x - u[0])) / len;
    if (d < -tol) return false;
    if (L === 2) {
      // A segment: also within its ends and on its line.
      const t = (ex * (x - u[0]) + ey * (y - u[1])) / (len * len);
      return Math.abs(d) <= tol && t >= -tol / len && t <= 1 + tol / len;
    }
  }
  return true;
}
