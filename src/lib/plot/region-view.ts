/** Assemble the feasible-region view's data from a run's draws and its constraint system. */
import type { RegionSystem, RunDraws } from '@shared/api/notebook';
import { boxAround, clipLineToBox, feasiblePolygon, sliceSystem, type Box, type Point, type Segment } from './region';
import { thinIndices } from './thin';

export interface RegionView {
  box: Box;
  polygon: Point[];
  lines: (Segment & { label: string; equality?: boolean })[];
  draws: { x: number; y: number }[];
  point: Point;
  /** Rows that do not involve the chosen pair but fail at the slice point (the slice is empty). */
  failingConstantRows: string[];
  /** Constraint rows that touch the pair but whose line falls outside the view. */
  offscreen: number;
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

/**
 * For unknown coordinates i and j: the slice of the region through the posterior mean of all
 * unknowns, clipped to a box around the draws, and up to `maxPoints` draws (thinned per chain).
 */
export function buildRegionView(draws: RunDraws, region: RegionSystem, i: number, j: number, maxPoints = 2000): RegionView {
  const means = posteriorMeans(draws).slice(0, draws.unknownCount);
  const xs: number[] = [];
  const ys: number[] = [];
  const perChain = Math.max(1, Math.floor(maxPoints / Math.max(1, draws.chains.length)));
  for (const ch of draws.chains) {
    const idx = thinIndices(ch.values[i]?.length ?? 0, perChain);
    for (const t of idx) {
      xs.push(ch.values[i][t]);
      ys.push(ch.values[j][t]);
    }
  }
  const box = boxAround(xs, ys, 0.3);
  const slice = sliceSystem(region.A, region.b, i, j, means, region.labels);
  const lines: RegionView['lines'] = [];
  let offscreen = 0;
  for (const hp of slice.halfPlanes) {
    const seg = clipLineToBox(hp, box);
    if (seg) lines.push({ ...seg, label: hp.label });
    else offscreen++;
  }
  // An equality E θ = e slices to a line as well (the draws lie on it when it involves the pair).
  const eq = sliceSystem(region.E, region.e, i, j, means, region.eLabels);
  for (const hp of eq.halfPlanes) {
    const seg = clipLineToBox(hp, box);
    if (seg) lines.push({ ...seg, label: hp.label, equality: true });
  }
  const polygon = feasiblePolygon(slice.halfPlanes, box);
  return {
    box,
    polygon,
    lines,
    draws: xs.map((x, k) => ({ x, y: ys[k] })),
    point: { x: means[i], y: means[j] },
    failingConstantRows: slice.constantRows.filter((r) => !r.holds).map((r) => r.label),
    offscreen,
  };
}
