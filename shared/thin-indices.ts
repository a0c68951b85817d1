/**
 * Indices of at most `max` items spread evenly over 0..n−1, always including the first and the
 * last. Used to thin draws for plotting (never for summaries), on the server and in the browser.
 */
export function thinIndices(n: number, max: number): number[] {
  if (n <= 0 || max <= 0) return [];
  if (n <= max) return Array.from({ length: n }, (_, k) => k);
  if (max === 1) return [0];
  const out: number[] = [];
  const step = (n - 1) / (max - 1);
  let last = -1;
  for (let k = 0; k < max; k++) {
    const idx = Math.round(k * step);
    if (idx !== last) out.push(idx);
    last = idx;
  }
  return out;
}
