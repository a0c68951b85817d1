/**
 * Geometry of the feasible-region view: the slice of a polytope {θ : A θ ≤ b} through a point,
 * seen in the plane of two chosen coordinates.
 *
 * With every coordinate except θ_i and θ_j fixed at the point m, row r of A θ ≤ b reads
 *   A[r][i]·x + A[r][j]·y ≤ b[r] − Σ_{k≠i,j} A[r][k]·m_k,
 * a half-plane in the (x, y) = (θ_i, θ_j) plane. Its boundary line is drawn as a stroke and the
 * intersection of all half-planes with the view box is tinted as the feasible side.
 */

export interface Box {
  xMin: number;
  xMax: number;
  yMin: number;
  yMax: number;
}

/** a·x + b·y ≤ c, with (a, b) scaled to unit length. */
export interface HalfPlane {
  a: number;
  b: number;
  c: number;
  /** Which constraint row this came from (for tooltips). */
  label: string;
  row: number;
}

export interface Point {
  x: number;
  y: number;
}

export interface Segment {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
}

export interface Slice {
  /** Rows that involve at least one of the two chosen coordinates. */
  halfPlanes: HalfPlane[];
  /** Rows that involve neither coordinate: constant in this plane; `holds` at the point. */
  constantRows: { row: number; label: string; holds: boolean }[];
}

/** Coefficients below this (relative to the row's largest) count as zero. */
const ZERO = 1e-12;

/** Slice the system A θ ≤ b through `point` onto coordinates (i, j). */
export function sliceSystem(
  A: readonly (readonly number[])[],
  b: readonly number[],
  i: number,
  j: number,
  point: readonly number[],
  labels: readonly string[] = [],
): Slice {
  if (i === j) throw new Error('sliceSystem: choose two different coordinates');
  const halfPlanes: HalfPlane[] = [];
  const constantRows: Slice['constantRows'] = [];
  A.forEach((row, r) => {
    let rest = 0;
    let scale = 0;
    for (let k = 0; k < row.length; k++) {
      scale = Math.max(scale, Math.abs(row[k]));
      if (k !== i && k !== j) rest += row[k] * point[k];
    }
    const label = labels[r] ?? `row ${r + 1}`;
    const ai = row[i];
    const aj = row[j];
    const norm = Math.hypot(ai, aj);
    const c = b[r] - rest;
    if (norm <= ZERO * Math.max(scale, 1)) {
      constantRows.push({ row: r, label, holds: 0 <= c + 1e-9 * Math.max(1, Math.abs(b[r])) });
      return;
    }
    halfPlanes.push({ a: ai / norm, b: aj / norm, c: c / norm, label, row: r });
  });
  return { halfPlanes, constantRows };
}

/**
 * The part of the line a·x + b·y = c inside the box, or null when it misses the box.
 * Parametrises the line as p0 + t·d with d = (−b, a) and clips t against the four sides
 * (Liang–Barsky).
 */
export function clipLineToBox(hp: Pick<HalfPlane, 'a' | 'b' | 'c'>, box: Box): Segment | null {
  const { a, b, c } = hp;
  const n2 = a * a + b * b;
  if (n2 === 0) return null;
  const x0 = (a * c) / n2;
  const y0 = (b * c) / n2;
  const dx = -b;
  const dy = a;
  let t0 = -Infinity;
  let t1 = Infinity;
  const clip = (p: number, q: number): boolean => {
    // p·t ≤ q
    if (Math.abs(p) < 1e-15) return q >= 0;
    const t = q / p;
    if (p < 0) t0 = Math.max(t0, t);
    else t1 = Math.min(t1, t);
    return t0 <= t1;
  };
  if (
    !clip(-dx, x0 - box.xMin) ||
    !clip(dx, box.xMax - x0) ||
    !clip(-dy, y0 - box.yMin) ||
    !clip(dy, box.yMax - y0)
  )
    return null;
  if (!Number.isFinite(t0) || !Number.isFinite(t1)) return null;
  return { x1: x0 + t0 * dx, y1: y0 + t0 * dy, x2: x0 + t1 * dx, y2: y0 + t1 * dy };
}

/** Sutherland–Hodgman: keep the part of a convex polygon with a·x + b·y ≤ c. */
export function clipPolygon(polygon: readonly Point[], hp: Pick<HalfPlane, 'a' | 'b' | 'c'>): Point[] {
  const out: Point[] = [];
  const n = polygon.length;
  const side = (p: Point) => hp.a * p.x + hp.b * p.y - hp.c;
  for (let k = 0; k < n; k++) {
    const p = polygon[k];
    const q = polygon[(k + 1) % n];
    const sp = side(p);
    const sq = side(q);
    if (sp <= 0) out.push(p);
    if ((sp < 0 && sq > 0) || (sp > 0 && sq < 0)) {
      const t = sp / (sp - sq);
      out.push({ x: p.x + t * (q.x - p.x), y: p.y + t * (q.y - p.y) });
    }
  }
  return out;
}

/** The feasible part of the box in the slice (a convex polygon, possibly empty). */
export function feasiblePolygon(halfPlanes: readonly HalfPlane[], box: Box): Point[] {
  let poly: Point[] = [
    { x: box.xMin, y: box.yMin },
    { x: box.xMax, y: box.yMin },
    { x: box.xMax, y: box.yMax },
    { x: box.xMin, y: box.yMax },
  ];
  for (const hp of halfPlanes) {
    poly = clipPolygon(poly, hp);
    if (poly.length === 0) break;
  }
  return poly;
}

/** Signed area (shoelace formula); positive for counter-clockwise vertices. */
export function polygonArea(poly: readonly Point[]): number {
  let s = 0;
  for (let k = 0; k < poly.length; k++) {
    const p = poly[k];
    const q = poly[(k + 1) % poly.length];
    s += p.x * q.y - q.x * p.y;
  }
  return s / 2;
}

/**
 * A view box around the draws: their range padded by `pad` of the span on each side, widened to
 * a minimum span when the draws barely move.
 */
export function boxAround(xs: ArrayLike<number>, ys: ArrayLike<number>, pad = 0.25): Box {
  const range = (v: ArrayLike<number>): [number, number] => {
    let lo = Infinity;
    let hi = -Infinity;
    for (let k = 0; k < v.length; k++) {
      const t = v[k];
      if (!Number.isFinite(t)) continue;
      if (t < lo) lo = t;
      if (t > hi) hi = t;
    }
    if (lo === Infinity) return [-1, 1];
    let span = hi - lo;
    if (span < 1e-9 * Math.max(1, Math.abs(lo))) span = Math.max(1e-6, Math.abs(lo) * 0.1) || 1;
    return [lo - pad * span, hi + pad * span];
  };
  const [xMin, xMax] = range(xs);
  const [yMin, yMax] = range(ys);
  return { xMin, xMax, yMin, yMax };
}

/** Whether a point satisfies every half-plane (within a small tolerance). */
export function insideAll(halfPlanes: readonly HalfPlane[], p: Point, tol = 1e-9): boolean {
  return halfPlanes.every((hp) => hp.a * p.x + hp.b * p.y <= hp.c + tol * Math.max(1, Math.abs(hp.c)));
}
