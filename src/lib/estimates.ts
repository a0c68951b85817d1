/** Number formatting for estimates: tabular, compact, never misleadingly precise. */

/**
 * Always `digits` significant digits — trailing zeros kept, so 4.50 beside 3.18 reads as just as
 * precise — switching to exponent form for very large or small magnitudes. Whole numbers of more
 * digits are rounded to `digits` significant ones (1234.5 → 1230).
 */
export function formatEstimate(x: number, digits = 3): string {
  if (Number.isNaN(x)) return 'NaN';
  if (x === Infinity) return '∞';
  if (x === -Infinity) return '−∞';
  if (x === 0) return '0';
  const ax = Math.abs(x);
  let s: string;
  if (ax >= 1e5 || ax < 1e-3) s = x.toExponential(digits - 1).replace('e+', 'e');
  else if (ax >= 10 ** digits) s = Number(x.toPrecision(digits)).toString();
  else s = x.toPrecision(digits);
  return s.replace(/^-/, '−');
}

/** A data value as read (not an estimate): at most `digits` significant digits, no padding zeros. */
export function formatDataValue(x: number, digits = 4): string {
  if (!Number.isFinite(x) || x === 0 || Math.abs(x) >= 1e5 || Math.abs(x) < 1e-3) return formatEstimate(x, digits);
  return Number(x.toPrecision(digits)).toString().replace(/^-/, '−');
}

/**
 * Decimals that show every value of a data column as read (each at most `digits` significant digits),
 * so a column can be printed with one count of decimals: 29.70 beside 29.02, not 29.7. Null when a
 * value needs exponent form (then each value keeps its own form).
 */
export function columnDecimals(values: readonly number[], digits = 4): number | null {
  let decimals = 0;
  for (const x of values) {
    if (!Number.isFinite(x) || x === 0) continue;
    const s = formatDataValue(x, digits);
    if (/e/i.test(s)) return null;
    const dot = s.indexOf('.');
    if (dot >= 0) decimals = Math.max(decimals, s.length - dot - 1);
  }
  return decimals;
}

/** A data value with a column's count of decimals (see columnDecimals); null decimals: formatDataValue. */
export function formatDataFixed(x: number, decimals: number | null, digits = 4): string {
  if (decimals === null || !Number.isFinite(x)) return formatDataValue(x, digits);
  return x.toFixed(decimals).replace(/^-/, '−');
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
