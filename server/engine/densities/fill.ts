/**
 * Writes the partials of a log-density whose value is not finite: NaN partials for a NaN value
 * (invalid parameters), 0 partials for ±Infinity (outside the support, or an integrable pole at
 * the edge of the support). Returns true when it wrote them, so callers can return early.
 */
export function fillNonFinite(v: number, out: Float64Array, offset: number, n: number): boolean {
  if (v - v === 0) return false;
  const fillValue = v !== v ? NaN : 0;
  for (let i = 0; i < n; i++) out[offset + i] = fillValue;
  return true;
}
