/**
 * Cholesky factor of a symmetric positive-definite n × n matrix held in a row-major Float64Array,
 * with triangular solves that reuse the factor.
 *
 * Two ways to factorise:
 * - 'ml-matrix': ml-matrix's CholeskyDecomposition, copied into the flat factor;
 * - 'inplace': a plain row-oriented Cholesky–Banachiewicz loop on the Float64Array.
 * The sampler's hot loop uses 'inplace' by default because the benchmark shows a ≥ 2× end-to-end
 * gain (figure on DEFAULT_KERNEL): the ml-matrix path allocates a Matrix of row arrays and a
 * second one for L on every factorisation.
 */
import { CholeskyDecomposition, Matrix } from 'ml-matrix';

export type CholeskyKernel = 'ml-matrix' | 'inplace';

/**
 * Measured with bench/samplers.bench.ts (RHMC on the uniform 50-simplex, 2 chains × 120
 * iterations, same seed): ml-matrix 46.3 s, in-place 17.2 s end to end, a 2.7× gain; four runs on
 * 2 shared cores (2026-12-02) gave 2.5–2.9×. The comparison is re-run by every `npm run bench`.
 */
let DEFAULT_KERNEL: CholeskyKernel = 'inplace';

export function setCholeskyKernel(kernel: CholeskyKernel): void {
  DEFAULT_KERNEL = kernel;
}
export function getCholeskyKernel(): CholeskyKernel {
  return DEFAULT_KERNEL;
}

export class Cholesky {
  readonly n: number;
  /** Lower factor, row-major; entries above the diagonal are zero. */
  readonly L: Float64Array;
  /** Number of successful or attempted factorisations since construction. */
  count = 0;
  private readonly tmp: Float64Array;
  /** Column of the first possibly non-zero entry of each row of L (0 = dense row). */
  readonly first: Int32Array;

  constructor(n: number) {
    this.n = n;
    this.L = new Float64Array(n * n);
    this.tmp = new Float64Array(n);
    this.first = new Int32Array(n);
  }

  /** Factorises G (row-major, symmetric). Returns false when G is not positive definite. */
  factor(G: Float64Array): boolean {
    this.count++;
    return DEFAULT_KERNEL === 'inplace' ? this.factorInPlace(G) : this.factorMl(G);
  }

  private factorInPlace(G: Float64Array): boolean {
    const n = this.n;
    const L = this.L;
    const first = this.first;
    // Envelope (profile) of G: row i of L is zero left of row i of G's first non-zero, so sums
    // start at the later of the two rows' first columns. The skipped terms are exact zeros, so the
    // factor is bit-for-bit the dense loop's; a banded G costs n·b² instead of n³/3.
    for (let i = 0; i < n; i++) {
      const ri = i * n;
      let fi = 0;
      while (fi < i && G[ri + fi] === 0) fi++;
      first[i] = fi;
      for (let j = 0; j < fi; j++) L[ri + j] = 0;
      for (let j = fi; j <= i; j++) {
        const rj = j * n;
        let sum = G[ri + j];
        const k0 = fi > first[j] ? fi : first[j];
        for (let k = k0; k < j; k++) sum -= L[ri + k] * L[rj + k];
        if (i === j) {
          if (!(sum > 0) || !Number.isFinite(sum)) return false;
          L[ri + i] = Math.sqrt(sum);
        } else {
          L[ri + j] = sum / L[rj + j];
        }
      }
      for (let j = i + 1; j < n; j++) L[ri + j] = 0;
    }
    return true;
  }

  private factorMl(G: Float64Array): boolean {
    const n = this.n;
    const rows: number[][] = [];
    for (let i = 0; i < n; i++) rows.push(Array.from(G.subarray(i * n, i * n + n)));
    // ml-matrix checks symmetry exactly; G is built symmetric by construction.
    this.first.fill(0);
    const cho = new CholeskyDecomposition(new Matrix(rows));
    if (!cho.isPositiveDefinite()) return false;
    const Lm = cho.lowerTriangularMatrix;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) this.L[i * n + j] = j <= i ? Lm.get(i, j) : 0;
    for (let i = 0; i < n; i++) if (!(this.L[i * n + i] > 0) || !Number.isFinite(this.L[i * n + i])) return false;
    return true;
  }

  /** out = L⁻¹ rhs (out may alias rhs). */
  forward(rhs: Float64Array, out: Float64Array): Float64Array {
    const n = this.n;
    const L = this.L;
    for (let i = 0; i < n; i++) {
      const ri = i * n;
      let sum = rhs[i];
      for (let k = this.first[i]; k < i; k++) sum -= L[ri + k] * out[k];
      out[i] = sum / L[ri + i];
    }
    return out;
  }

  /** out = L⁻ᵀ rhs (out may alias rhs). */
  backward(rhs: Float64Array, out: Float64Array): Float64Array {
    const n = this.n;
    const L = this.L;
    if (out !== rhs) out.set(rhs);
    for (let i = n - 1; i >= 0; i--) {
      const xi = out[i] / L[i * n + i];
      out[i] = xi;
      for (let k = this.first[i]; k < i; k++) out[k] -= L[i * n + k] * xi;
    }
    return out;
  }

  /** out = G⁻¹ rhs. */
  solve(rhs: Float64Array, out: Float64Array): Float64Array {
    this.forward(rhs, this.tmp);
    return this.backward(this.tmp, out);
  }

  /** out = L x (so that out ~ N(0, G) when x ~ N(0, I)). */
  multiplyL(x: Float64Array, out: Float64Array): Float64Array {
    const n = this.n;
    const L = this.L;
    for (let i = n - 1; i >= 0; i--) {
      const ri = i * n;
      let sum = 0;
      for (let k = this.first[i]; k <= i; k++) sum += L[ri + k] * x[k];
      out[i] = sum;
    }
    return out;
  }

  /** log det G = 2 Σ log Lᵢᵢ. */
  logDet(): number {
    let s = 0;
    for (let i = 0; i < this.n; i++) s += Math.log(this.L[i * this.n + i]);
    return 2 * s;
  }
}
