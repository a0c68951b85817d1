/**
 * The feasible-region view's data: the region projected onto two unknowns (computed by the server
 * for each pair, see server/engine/geometry/project.ts), the draws, and the posterior mean. Every
 * draw lies inside the projection by construction. Shares that sum to a constant in groups of three
 * are also shown in their own coordinates, as a triangle.
 */
import type { RegionProjection, RegionSystem } from '@shared/api/notebook';
import type { PlotDraws as RunDraws } from '@shared/draws-binary';
import { boxAround, type Box, type Point } from './region';
import { thinIndices } from '@/lib/plot/thin';

export interface RegionView {
  box: Box;
  /** The projection, counter-clockwise (empty when the server sent none for this pair). */
  polygon: Point[];
  draws: Point[];
  /** Posterior mean of the pair. */
  point: Point;
  /** The projection was cut by the server's clip box (the region reaches further). */
  clipped: boolean;
  /** A projection exists for this pair. */
  available: boolean;
}

/** Posterior mean of each quantity over every chain. */
export function posteriorMeans(draws: RunDraws): number[] {
  const q = draws.names.length;
  const sums = new Array<number>(q).fill(0);
  let n = 0;
  for (const ch of draws.chains) {
    const len = ch.values[0]?.length ?? 0;
    for (let k = 0; k < q; k++) for (let t = 0; t < len; t++) sums[k] += ch.values[k][t];
    n += len;
  }
  return sums.map((s) => (n ? s / n : NaN));
}

/** The server's projection for unknowns (i, j) with vertices as (θᵢ, θⱼ), whichever order it was stored in. */
export function findProjection(draws: RunDraws, i: number, j: number): RegionProjection | null {
  for (const p of draws.projections ?? []) {
    if (p.i === i && p.j === j) return p;
    if (p.i === j && p.j === i) return { i, j, clipped: p.clipped, vertices: p.vertices.map(([x, y]) => [y, x] as [number, number]).reverse() };
  }
  return null;
}

function pairDraws(draws: RunDraws, i: number, j: number, maxPoints: number): { xs: number[]; ys: number[] } {
  const xs: number[] = [];
  const ys: number[] = [];
  const perChain = Math.max(1, Math.floor(maxPoints / Math.max(1, draws.chains.length)));
  for (const ch of draws.chains) {
    for (const t of thinIndices(ch.values[i]?.length ?? 0, perChain)) {
      xs.push(ch.values[i][t]);
      ys.push(ch.values[j][t]);
    }
  }
  return { xs, ys };
}

/** Unknowns i and j: the projection, a view box around the draws, up to `maxPoints` draws. */
export function buildRegionView(draws: RunDraws, i: number, j: number, maxPoints = 2000): RegionView {
  const means = posteriorMeans(draws);
  const { xs, ys } = pairDraws(draws, i, j, maxPoints);
  const proj = findProjection(draws, i, j);
  const polygon = proj ? proj.vertices.map(([x, y]) => ({ x, y })) : [];
  // The box shows the draws; a projection that fits comfortably is shown whole. One the server had
  // to cut (an unbounded region) is not: its cut edges are no constraints and stay outside the frame.
  const box = boxAround([...xs, ...polygon.map((p) => p.x)], [...ys, ...polygon.map((p) => p.y)], 0.08);
  const tight = boxAround(xs, ys, 0.3);
  const whole = !proj?.clipped && box.xMax - box.xMin <= 4 * (tight.xMax - tight.xMin) && box.yMax - box.yMin <= 4 * (tight.yMax - tight.yMin);
  return {
    box: whole ? box : tight,
    polygon,
    draws: xs.map((x, k) => ({ x, y: ys[k] })),
    point: { x: means[i], y: means[j] },
    clipped: (proj?.clipped ?? false) || !whole,
    available: proj !== null,
  };
}

/** Groups of three unknowns that an equality holds at a constant total, e.g. share[1..3] summing to one. */
export function shareTriples(region: RegionSystem | null): { members: [number, number, number]; total: number; label: string }[] {
  if (!region) return [];
  const out: { members: [number, number, number]; total: number; label: string }[] = [];
  region.E.forEach((row, r) => {
    const nz = row.map((v, k) => [k, v] as const).filter(([, v]) => Math.abs(v) > 1e-12);
    if (nz.length !== 3) return;
    const c = nz[0][1];
    if (!nz.every(([, v]) => Math.abs(v - c) <= 1e-9 * Math.abs(c))) return;
    const total = region.e[r] / c;
    if (!(total > 0)) return;
    out.push({ members: [nz[0][0], nz[1][0], nz[2][0]], total, label: region.eLabels[r] ?? '' });
  });
  return out;
}

/** Corners of the triangle view: first share bottom left, second bottom right, third on top. */
export const TRIANGLE: [Point, Point, Point] = [
  { x: 0, y: 0 },
  { x: 1, y: 0 },
  { x: 0.5, y: Math.sqrt(3) / 2 },
];

/** Barycentric placement of shares (a, b, c) with a + b + c = total. */
export function toTriangle(a: number, b: number, total: number): Point {
  const c = total - a - b;
  return { x: (b + c / 2) / total, y: ((Math.sqrt(3) / 2) * c) / total };
}

export interface TriangleView {
  polygon: Point[];
  draws: Point[];
  point: Point;
  clipped: boolean;
  available: boolean;
}

/** Three shares summing to `total`, in their own coordinates: the region and the draws in the triangle. */
export function buildTriangleView(draws: RunDraws, members: [number, number, number], total: number, maxPoints = 2000): TriangleView {
  const [a, b] = members;
  const means = posteriorMeans(draws);
  const { xs, ys } = pairDraws(draws, a, b, maxPoints);
  const proj = findProjection(draws, a, b);
  return {
    polygon: proj ? proj.vertices.map(([x, y]) => toTriangle(x, y, total)) : [],
    draws: xs.map((x, k) => toTriangle(x, ys[k], total)),
    point: toTriangle(means[a], means[b], total),
    clipped: proj?.clipped ?? false,
    available: proj !== null,
  };
}
