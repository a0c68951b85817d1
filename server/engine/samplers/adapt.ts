/**
 * Step-size adaptation by dual averaging ("The No-U-Turn Sampler", JMLR 15, 2014,
 * Algorithm 5; constants γ = 0.05, t₀ = 10, κ = 0.75 from that paper) and the warm-up
 * window plan (a fast initial buffer, slow windows doubling in length, a fast final buffer:
 * common practice for windowed metric adaptation).
 */
export class DualAveraging {
  private mu = 0;
  private hBar = 0;
  private logEpsBar = 0;
  private t = 0;
  logEps = 0;
  /**
   * `muFactor`: the shrinkage target μ = log(muFactor · ε₀) (10 in the paper). Each restart then
   * tries steps near muFactor · ε₀ first; where acceptance falls off a cliff (implicit integrators
   * whose solves fail past a step size) those early zeros must be balanced by the rest of the window,
   * which biases the final step low, so the midpoint chain uses a smaller factor.
   */
  constructor(
    eps0: number,
    private readonly delta = 0.8,
    private readonly muFactor = 10,
    private readonly gamma = 0.05,
  ) {
    this.restart(eps0);
  }
  restart(eps0: number): void {
    this.mu = Math.log(this.muFactor * eps0);
    this.hBar = 0;
    this.logEpsBar = 0;
    this.t = 0;
    this.logEps = Math.log(eps0);
  }
  update(accept: number): number {
    const gamma = this.gamma;
    const t0 = 10;
    const kappa = 0.75;
    this.t++;
    const a = Number.isFinite(accept) ? Math.min(1, accept) : 0;
    const w = 1 / (this.t + t0);
    this.hBar = (1 - w) * this.hBar + w * (this.delta - a);
    this.logEps = this.mu - (Math.sqrt(this.t) / gamma) * this.hBar;
    const eta = Math.pow(this.t, -kappa);
    this.logEpsBar = eta * this.logEps + (1 - eta) * this.logEpsBar;
    return Math.exp(this.logEps);
  }
  final(): number {
    return Math.exp(this.logEpsBar);
  }
}

/** Iterations (0-based) at which a slow window ends, for `warmup` warm-up iterations. */
export function windowEnds(warmup: number): Set<number> {
  const ends = new Set<number>();
  if (warmup < 20) return ends;
  const { init, term } = warmupBuffers(warmup);
  const slowEnd = warmup - term;
  let start = init;
  let size = 25;
  while (start < slowEnd) {
    let end = start + size;
    if (end + 2 * size > slowEnd) end = slowEnd;
    ends.add(end - 1);
    start = end;
    size *= 2;
  }
  return ends;
}

/** Fast initial and final buffers: 15% and 25% of warm-up (the final one lets the step size settle). */
export function warmupBuffers(warmup: number): { init: number; term: number } {
  return { init: Math.floor(0.15 * warmup), term: Math.floor(0.25 * warmup) };
}
