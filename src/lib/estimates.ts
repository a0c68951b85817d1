/** Number formatting for estimates: tabular, compact, never misleadingly precise. */

/** Significant-digit formatting that switches to exponent form for very large or small magnitudes. */
export function formatEstimate(x: number, digits = 3): string {
  if (Number.isNaN(x)) return 'NaN';
  if (x === Infinity) return '∞';
  if (x === -Infinity) return '−∞';
  if (x === 0) return '0';
  const ax = Math.abs(x);
  let s: string;
  if (ax >= 1e5 || ax < 1e-3) s = x.toExponential(digits - 1).replace('e+', 'e');
  else s = Number(x.toPrecision(digits)).toString();
  return s.replace(/^-/, '−');
}

/** R̂ to two decimals below 1.1 is too coarse (1.005 vs 1.014 matters): three decimals. */
export function formatRhat(x: number): string {
  return Number.isFinite(x) ? x.toFixed(3) : formatEstimate(x);
}

/** Effective sample sizes as whole draws. */
export function formatEss(x: number): string {
  return Number.isFinite(x) ? Math.round(x).toString() : formatEstimate(x);
}

export function formatSeconds(s: number): string {
  if (!Number.isFinite(s)) return '—';
  if (s < 1) return `${Math.round(s * 1000)} ms`;
  if (s < 90) return `${s.toFixed(1)} s`;
  return `${Math.floor(s / 60)} min ${Math.round(s % 60)} s`;
}
