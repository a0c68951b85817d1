/**
 * Coordinate hit-and-run (random-scan "coordinate directions" hit-and-run, introduced in "Hit-and-run
 * algorithms for the identification of nonredundant linear inequalities", Mathematical Programming,
 * 1987 — source from memory): pick a reduced
 * coordinate q uniformly, find the exact chord of the region along the axis e_q from the column
 * A_{·q} and the slacks (only the rows touching q), then
 * - flat density on a bounded region: a point uniform on the chord;
 * - otherwise: one slice-sampling move along the chord ("Slice sampling", Annals of Statistics,
 *   2003), stepping out and shrinkage confined to the chord.
 * The axis is drawn independently of the state and each line move leaves the target restricted to
 * the line invariant, so the chain is exact. One kept draw = n line moves (one sweep on average).
 * Slice widths are kept per coordinate and adapted in warm-up (three mean jumps).
 */
import type { ChainOptions, ChainOutput } from '../types';
import type { PreparedTarget } from '../geometry';
import { isFlat } from '../geometry';
import type { Rng } from '../rng';
import { runLoop, slacksOf, sliceOnChord, type DrawCheck } from './common';

export function coordHitRunChain(p: PreparedTarget, start: Float64Array, opts: ChainOptions, rng: Rng, check: DrawCheck): ChainOutput {
  const n = p.n;
  const m = p.m;
  const exact = isFlat(p) && p.bounded && m > 0;
  // Columns of A (compressed): rows touching each reduced coordinate.
  const cPtr = new Int32Array(n + 1);
  for (let i = 0; i < m; i++) for (let q = 0; q < n; q++) if (p.A[i * n + q] !== 0) cPtr[q + 1]++;
  for (let q = 0; q < n; q++) cPtr[q + 1] += cPtr[q];
  const cRow = new Int32Array(cPtr[n]);
  const cVal = new Float64Array(cPtr[n]);
  {
    const fill = cPtr.slice(0, n);
    for (let i = 0; i < m; i++)
      for (let q = 0; q < n; q++) {
        const a = p.A[i * n + q];
        if (a !== 0) {
          cRow[fill[q]] = i;
          cVal[fill[q]++] = a;
        }
      }
  }
  const z = Float64Array.from(start);
  const s = new Float64Array(m);
  if (!slacksOf(p, z, s)) throw new Error('coordinate hit-and-run: the start is not strictly inside the region');
  const grad = new Float64Array(n);
  let l = exact ? 0 : p.logDensity(z, grad);
  if (!exact && !Number.isFinite(l)) throw new Error(`coordinate hit-and-run: the log-density is ${l} at the start`);
  const width = new Float64Array(n).fill(1);
  const jumpSum = new Float64Array(n);
  const jumpCount = new Float64Array(n);
  let moves = 0;
  let work = 0;
  const moveAlong = (q: number, warm: boolean) => {
    moves++;
    let tmin = -Infinity;
    let tmax = Infinity;
    for (let k = cPtr[q]; k < cPtr[q + 1]; k++) {
      const a = cVal[k];
      const si = s[cRow[k]];
      if (a > 0) tmax = Math.min(tmax, si / a);
      else tmin = Math.max(tmin, si / a);
    }
    work += 4 * (cPtr[q + 1] - cPtr[q]) + 10;
    let t: number;
    if (exact) {
      t = tmin + (tmax - tmin) * rng.uniformPositive();
    } else {
      const z0 = z[q];
      const f = (tt: number) => {
        z[q] = z0 + tt;
        const v = p.logDensity(z, grad);
        return Number.isNaN(v) ? -Infinity : v;
      };
      const r = sliceOnChord(f, l, tmin, tmax, width[q], rng);
      z[q] = z0;
      t = r.t;
      if (t !== 0) l = r.l;
    }
    if (t === 0) return;
    // A point that round-off puts on a face is not taken.
    for (let k = cPtr[q]; k < cPtr[q + 1]; k++) if (!(s[cRow[k]] - t * cVal[k] > 0)) {
      if (!exact) l = p.logDensity(z, grad);
      return;
    }
    for (let k = cPtr[q]; k < cPtr[q + 1]; k++) s[cRow[k]] -= t * cVal[k];
    z[q] += t;
    if (warm) {
      jumpSum[q] += Math.abs(t);
      jumpCount[q]++;
    }
  };
  const sweep = Math.max(1, n);
  return runLoop(p, opts, check, {
    z,
    iterate(warm, it) {
      slacksOf(p, z, s);
      work += 2 * cPtr[n] + 2 * m;
      for (let k = 0; k < sweep; k++) moveAlong(rng.int(n), warm);
      if (warm && (it + 1) % 10 === 0)
        for (let q = 0; q < n; q++)
          if (jumpCount[q] > 0) {
            width[q] = Math.max(1e-8, (3 * jumpSum[q]) / jumpCount[q]);
            jumpSum[q] = 0;
            jumpCount[q] = 0;
          }
      return { accept: 1 };
    },
    stepSize: () => NaN,
    work: () => work,
  });
}
