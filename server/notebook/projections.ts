/**
 * The feasible-region view's polygons: the constraint region projected onto pairs of unknowns
 * (server/engine/geometry/project.ts); a pair whose projection is unbounded is clipped to a box
 * well around the draws so it stays finite. Every draw lies inside its pair's polygon by construction.
 */
import type { RegionProjection, RunDraws } from '../../shared/api/notebook';
import { prepareTarget } from '../engine/geometry';
import { projectRegion, UnboundedProjectionError } from '../engine/geometry/project';
import type { LinearSystem, ModelTarget } from '../engine/types';

/** Pairs are computed among the first this many unknowns (66 pairs; each a few small LPs). */
export const PROJECTION_MAX_UNKNOWNS = 12;

function toSystem(A: number[][], b: number[], labels: string[], cols: number): LinearSystem {
  const flat = new Float64Array(A.length * cols);
  A.forEach((row, r) => flat.set(row, r * cols));
  return { rows: A.length, cols, A: flat, b: Float64Array.from(b), labels };
}

/**
 * Projections for every pair (i < j) of the first PROJECTION_MAX_UNKNOWNS unknowns. `ranges[k]` is
 * the range of unknown k over every kept draw; the clip box extends it by twice its width each side.
 * Returns [] when the region cannot be prepared (the view then says so).
 */
/**
 * Finished runs never change, so their polygons are kept (by run id) for the next request; the
 * programmes themselves run on a compute thread (server/compute/tasks.ts, `projections`).
 */
const CACHE = new Map<string, RegionProjection[]>();
const CACHE_SIZE = 64;

export async function cachedRegionProjections(key: string, compute: () => Promise<RegionProjection[]>): Promise<RegionProjection[]> {
  const hit = CACHE.get(key);
  if (hit) {
    CACHE.delete(key);
    CACHE.set(key, hit);
    return hit;
  }
  const out = await compute();
  CACHE.set(key, out);
  if (CACHE.size > CACHE_SIZE) CACHE.delete(CACHE.keys().next().value!);
  return out;
}

export function regionProjections(region: NonNullable<RunDraws['region']>, ranges: [number, number][]): RegionProjection[] {
  const d = region.names.length;
  const target: ModelTarget = {
    dim: d,
    names: region.names,
    logDensity: (_t, g) => {
      g.fill(0);
      return 0;
    },
    inequalities: toSystem(region.A, region.b, region.labels, d),
    equalities: toSystem(region.E, region.e, region.eLabels, d),
  };
  let prepared;
  try {
    prepared = prepareTarget(target);
  } catch {
    return [];
  }
  const k = Math.min(d, PROJECTION_MAX_UNKNOWNS, ranges.length);
  const pad = ([lo, hi]: [number, number]): [number, number] => {
    const w = Math.max(hi - lo, 1e-6 * Math.max(1, Math.abs(lo), Math.abs(hi)));
    return [lo - 2 * w, hi + 2 * w];
  };
  const out: RegionProjection[] = [];
  for (let i = 0; i < k; i++)
    for (let j = i + 1; j < k; j++) {
      const [xmin, xmax] = pad(ranges[i]);
      const [ymin, ymax] = pad(ranges[j]);
      try {
        // Bounded pairs whole (their every edge is a constraint's); unbounded ones cut by the box.
        let p;
        try {
          p = projectRegion(prepared, i, j);
        } catch (e) {
          if (!(e instanceof UnboundedProjectionError)) throw e;
          p = projectRegion(prepared, i, j, { clip: { xmin, xmax, ymin, ymax } });
        }
        out.push({ i, j, vertices: p.vertices, clipped: p.clipped });
      } catch {
        // A pair whose programme fails is left out; the view says the region is unavailable for it.
      }
    }
  return out;
}
