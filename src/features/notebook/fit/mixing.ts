/**
 * Numbers behind our own result figures: per-chain running quantile bands for the mixing view,
 * the chain-agreement strip, families of quantities sharing an axis, and the orderings a model's
 * constraints impose (for the ladder).
 */
import type { RegionSystem } from '@shared/api/notebook';

/** The q-quantile of sorted values (linear interpolation between order statistics, type 7 — common practice). */
export function quantileSorted(sorted: ArrayLike<number>, q: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

export interface ChainWindow {
  /** First and last iteration (1-based, after thinning multiplied back) of the window. */
  from: number;
  to: number;
  q25: number;
  q50: number;
  q75: number;
}

/** Each chain's draws cut into `windows` consecutive stretches, with their quartiles. */
export function chainWindows(chains: readonly ArrayLike<number>[], windows: number, thin = 1): ChainWindow[][] {
  return chains.map((values) => {
    const n = values.length;
    const k = Math.max(1, Math.min(windows, n));
    const out: ChainWindow[] = [];
    for (let w = 0; w < k; w++) {
      const a = Math.floor((w * n) / k);
      const b = Math.floor(((w + 1) * n) / k);
      const part = Float64Array.from({ length: b - a }, (_, t) => values[a + t]).sort();
      out.push({ from: a * thin + 1, to: b * thin, q25: quantileSorted(part, 0.25), q50: quantileSorted(part, 0.5), q75: quantileSorted(part, 0.75) });
    }
    return out;
  });
}

/**
 * Expected range of k independent standard normal values (the "d2" constants of quality-control
 * charts, common practice; values from memory of the usual table).
 */
export const EXPECTED_RANGE = [0, 0, 1.128, 1.693, 2.059, 2.326, 2.534, 2.704, 2.847] as const;

/**
 * Chain agreement per window: the spread of the chains' window medians (largest minus smallest)
 * measured against how much each chain's own window median wobbles from stretch to stretch (its
 * standard deviation across windows, averaged over chains, times the expected range of that many
 * chains). About 1 or less when the chains could be one chain cut in pieces; 2–3 and more when one
 * chain sits apart from the others for longer than its own wobble explains. 0 with one chain.
 */
export function agreementStrip(windows: ChainWindow[][]): number[] {
  const k = Math.min(...windows.map((w) => w.length));
  const c = windows.length;
  if (c < 2 || k < 1) return Array.from({ length: Math.max(0, k) }, () => 0);
  let wobble = 0;
  for (const ch of windows) {
    const meds = ch.slice(0, k).map((w) => w.q50);
    const m = meds.reduce((a, b) => a + b, 0) / meds.length;
    wobble += Math.sqrt(meds.reduce((a, b) => a + (b - m) ** 2, 0) / Math.max(1, meds.length - 1));
  }
  wobble /= c;
  const expected = (EXPECTED_RANGE[Math.min(c, EXPECTED_RANGE.length - 1)] ?? 2.847) * wobble;
  const out: number[] = [];
  for (let w = 0; w < k; w++) {
    let lo = Infinity;
    let hi = -Infinity;
    for (const ch of windows) {
      lo = Math.min(lo, ch[w].q50);
      hi = Math.max(hi, ch[w].q50);
    }
    const spread = hi - lo;
    out.push(expected > 0 ? spread / expected : spread > 0 ? Infinity : 0);
  }
  return out;
}

/** Interquartile range of all chains pooled. */
export function pooledIqr(chains: readonly ArrayLike<number>[]): number {
  const all = Float64Array.from(chains.flatMap((c) => Array.from(c))).sort();
  return quantileSorted(all, 0.75) - quantileSorted(all, 0.25);
}

/** "mu[3]" → "mu"; "sigma" → "sigma". Quantities of one family share an axis. */
export function familyOf(name: string): string {
  const i = name.indexOf('[');
  return i < 0 ? name : name.slice(0, i);
}

/**
 * Chains of orderings the constraints impose directly: rows of the form c·θₐ − c·θ_b ≤ 0 (c > 0),
 * i.e. θₐ ≤ θ_b, joined into paths a ≤ b ≤ c … Returns each maximal path of at least three
 * quantities (indices into the unknowns), lowest first.
 */
export function orderedChains(region: RegionSystem | null): number[][] {
  if (!region) return [];
  const next = new Map<number, number>();
  const prev = new Map<number, number>();
  region.A.forEach((row, r) => {
    if (Math.abs(region.b[r]) > 1e-12) return;
    const nz = row.map((v, k) => [k, v] as const).filter(([, v]) => Math.abs(v) > 1e-12);
    if (nz.length !== 2) return;
    const [[k1, v1], [k2, v2]] = nz;
    if (Math.abs(v1 + v2) > 1e-9 * Math.abs(v1)) return;
    const [lo, hi] = v1 > 0 ? [k1, k2] : [k2, k1];
    if (next.has(lo) || prev.has(hi)) return; // branching orders are left to the pair and region views
    next.set(lo, hi);
    prev.set(hi, lo);
  });
  const out: number[][] = [];
  for (const start of next.keys()) {
    if (prev.has(start)) continue;
    const path = [start];
    let cur = start;
    while (next.has(cur) && path.length <= next.size + 1) {
      cur = next.get(cur)!;
      path.push(cur);
    }
    if (path.length >= 3) out.push(path);
  }
  return out;
}
