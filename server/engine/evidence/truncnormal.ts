/**
 * A standard normal restricted to [a, b] (either end may be infinite), by the accept–reject
 * schemes of "Simulation of truncated normal variables" (Statistics and Computing, 1995): a normal
 * proposal when the interval is wide and holds the mean, a uniform proposal on short intervals, and
 * a translated exponential proposal with the optimal rate in the tails. No normal CDF is needed, so
 * far tails (a = 30) are as exact as the centre.
 */
import type { Rng } from '../rng';

const SQRT_E = Math.sqrt(Math.E);

/** Draw from N(0, 1) restricted to [a, b], a < b. */
export function truncatedStdNormal(a: number, b: number, rng: Rng): number {
  if (!(a < b)) return Number.isFinite(a) ? a : b;
  if (a >= 0) return tail(a, b, rng);
  if (b <= 0) return -tail(-b, -a, rng);
  // a < 0 < b
  if (b - a >= 2.5) {
    for (;;) {
      const x = rng.normal();
      if (x >= a && x <= b) return x;
    }
  }
  for (;;) {
    const x = a + (b - a) * rng.uniform();
    if (Math.log(rng.uniformPositive()) <= -0.5 * x * x) return x;
  }
}

/** 0 ≤ a < b ≤ ∞. */
function tail(a: number, b: number, rng: Rng): number {
  const r = Math.sqrt(a * a + 4);
  const alpha = 0.5 * (a + r);
  // Uniform proposals beat the exponential one on short intervals (the paper's switch point).
  const switchWidth = ((2 * SQRT_E) / (a + r)) * Math.exp(0.25 * (a * a - a * r));
  if (b - a < switchWidth) {
    for (;;) {
      const x = a + (b - a) * rng.uniform();
      if (Math.log(rng.uniformPositive()) <= 0.5 * (a * a - x * x)) return x;
    }
  }
  for (;;) {
    const x = a - Math.log(rng.uniformPositive()) / alpha;
    if (x > b) continue;
    const d = x - alpha;
    if (Math.log(rng.uniformPositive()) <= -0.5 * d * d) return x;
  }
}
