/** Number formats of the compare cell's results. */
export const pm = (x: number, se: number, digits = 2) => `${x.toFixed(digits)} ± ${se.toFixed(digits)}`;

/** A positive factor (a Bayes factor, a mass) in a few significant figures. */
export function factor(x: number): string {
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '0';
  if (x === 0) return '0';
  if (x >= 1e5 || x < 1e-3) return x.toExponential(1).replace('e+', 'e');
  return String(Number(x.toPrecision(x >= 100 ? 3 : 2)));
}

export const percent = (p: number) => (p < 0.001 ? '< 0.1 %' : p > 0.999 ? '> 99.9 %' : `${(100 * p).toFixed(1)} %`);
