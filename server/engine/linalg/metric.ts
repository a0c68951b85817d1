/**
 * Factorisations of matrices of the form
 *   G = Aᵀ diag(w) A + diag(λ)          (w ≥ 0, λ > 0)
 * — the barrier metric and the Newton matrices of its implicit integrators — exploiting the
 * structure of the constraint rows A:
 *
 * - banded: every row of A touches columns within a window of width B + 1 (bounds: B = 0, the
 *   diagonal case; orderings and first differences: B = 1; k-th differences: B = k). G is banded
 *   with half-bandwidth B: banded Cholesky in O(n B²), solves in O(n B).
 * - banded plus low rank: the few rows that are not narrow (a simplex's Σx ≤ 1, budget rows) form
 *   C (k rows). G = G_B + Cᵀ diag(w_C) C is solved by the Woodbury identity
 *     G⁻¹ = G_B⁻¹ − Y D K⁻¹ D Yᵀ,  Y = G_B⁻¹ Cᵀ,  D = diag(√w_C),  K = I + D C Y D,
 *   and log det G = log det G_B + log det K (the matrix determinant lemma): O(n B² + n k B + k³).
 * - dense: the n × n Cholesky factor (the fallback).
 *
 * Leverages ℓᵢ = aᵢᵀ G⁻¹ aᵢ of every row (they give the gradient of ½ log det of the barrier metric)
 * come from the same factorisation: in the banded case from the entries of G⁻¹ inside the band,
 * computed by the Takahashi recurrence on the banded factor (Zᵢⱼ = (δᵢⱼ/Lᵢᵢ − Σₖ₌ᵢ₊₁ Lₖᵢ Zₖⱼ)/Lᵢᵢ
 * for j ≥ i, "Formation of a sparse bus impedance matrix and its application to short circuit
 * study", PICA 1973), O(n B²); corrected by the Woodbury term for low rank; in the dense case by one
 * triangular solve per row.
 */
import { Cholesky } from './cholesky';
import type { RowMatrix } from './sparse';

/**
 * out[i] = |L⁻¹ aᵢ|² for every row aᵢ of `rows`, with L the dense lower Cholesky factor (row-major,
 * n × n) of a metric: the rows' leverages before their slack scaling. Each forward solve starts at
 * the row's first nonzero column. `x` is scratch of length n.
 */
export function rowLeverages(rows: RowMatrix, L: Float64Array, x: Float64Array, out: Float64Array): Float64Array {
  const { m, n, ptr, idx, val } = rows;
  for (let i = 0; i < m; i++) {
    if (ptr[i + 1] === ptr[i]) {
      out[i] = 0;
      continue;
    }
    const first = idx[ptr[i]];
    x.fill(0, first);
    for (let q = ptr[i]; q < ptr[i + 1]; q++) x[idx[q]] = val[q];
    let norm2 = 0;
    for (let r = first; r < n; r++) {
      const rr = r * n;
      let sum = x[r];
      for (let k = first; k < r; k++) sum -= L[rr + k] * x[k];
      const v = sum / L[rr + r];
      x[r] = v;
      norm2 += v * v;
    }
    out[i] = norm2;
  }
  return out;
}

export type MetricKind = 'diagonal' | 'banded' | 'diagonal+low-rank' | 'banded+low-rank' | 'dense';

export interface MetricStructure {
  kind: MetricKind;
  /** Half-bandwidth of the banded part (0 for diagonal; unused when dense). */
  bandwidth: number;
  /** Rows of A handled by the low-rank (Woodbury) part. */
  lowRankRows: Int32Array;
  /** Rows of A inside the band. */
  bandRows: Int32Array;
}

/** Rough operation counts of one factorisation plus leverages, used to choose a structure. */
function denseCost(n: number, m: number): number {
  return (n * n * n) / 6 + m * n * n * 0.5;
}

/**
 * Picks the cheapest exact factorisation for G = Aᵀ diag(w) A + diag(λ) from A's sparsity pattern.
 * `force` selects a kind for tests and benchmarks ('dense' always works; the others throw if the
 * pattern does not allow them).
 */
export function detectStructure(rows: RowMatrix, force?: MetricKind | 'structured'): MetricStructure {
  const { m, n, ptr, idx } = rows;
  const span = new Int32Array(m);
  for (let i = 0; i < m; i++) {
    const a = ptr[i];
    const b = ptr[i + 1];
    span[i] = b > a ? idx[b - 1] - idx[a] : 0;
  }
  const dense: MetricStructure = { kind: 'dense', bandwidth: n, lowRankRows: new Int32Array(0), bandRows: Int32Array.from({ length: m }, (_, i) => i) };
  if (force === 'dense') return dense;
  // No rows: G = diag(λ).
  if (m === 0) return { kind: 'diagonal', bandwidth: 0, lowRankRows: new Int32Array(0), bandRows: new Int32Array(0) };
  // Candidate bandwidths: every distinct span (rows wider than B go to the low-rank part).
  const cands = Array.from(new Set(Array.from(span))).sort((a, b) => a - b);
  let best: { B: number; cost: number } | null = null;
  for (const B of cands) {
    let k = 0;
    for (let i = 0; i < m; i++) if (span[i] > B) k++;
    if (k > 64 || k > n) continue;
    const cost = n * (B + 1) * (B + 1) * 2 + k * n * (B + 1) * 2 + k * k * k + m * (B + 1) * (B + 1);
    if (!best || cost < best.cost) best = { B, cost };
  }
  if (!best) {
    if (force && force !== 'structured') throw new Error(`the constraint rows do not allow a ${force} metric`);
    return dense;
  }
  if (!force && best.cost >= denseCost(n, m)) return dense;
  const B = best.B;
  const low: number[] = [];
  const band: number[] = [];
  for (let i = 0; i < m; i++) (span[i] > B ? low : band).push(i);
  const kind: MetricKind = low.length === 0 ? (B === 0 ? 'diagonal' : 'banded') : B === 0 ? 'diagonal+low-rank' : 'banded+low-rank';
  if (force && force !== 'structured' && force !== kind) throw new Error(`the constraint rows give a ${kind} metric, not ${force}`);
  return { kind, bandwidth: B, lowRankRows: Int32Array.from(low), bandRows: Int32Array.from(band) };
}

/** A factorisation of G = Aᵀ diag(w) A + diag(λ) with solves, log det and row leverages. */
export interface MetricFactor {
  readonly structure: MetricStructure;
  /** Factorises for weights w (length m) and diagonal λ (length n). False if not positive definite. */
  factor(w: Float64Array, lambda: Float64Array): boolean;
  /** out = G⁻¹ rhs (out may alias rhs). */
  solve(rhs: Float64Array, out: Float64Array): Float64Array;
  logDet(): number;
  /** out[i] = aᵢᵀ G⁻¹ aᵢ for every row i of A. */
  leverages(out: Float64Array): Float64Array;
  /** Copies another factor of the same structure and size. */
  copyFrom(o: MetricFactor): void;
}

export function makeMetricFactor(rows: RowMatrix, structure: MetricStructure): MetricFactor {
  return structure.kind === 'dense' ? new DenseMetric(rows, structure) : new BandedLowRankMetric(rows, structure);
}

/* ----------------------------------------------------------------------------------------------- */

class DenseMetric implements MetricFactor {
  readonly chol: Cholesky;
  private readonly G: Float64Array;
  private readonly x: Float64Array;
  constructor(
    private readonly rows: RowMatrix,
    readonly structure: MetricStructure,
  ) {
    this.chol = new Cholesky(rows.n);
    this.G = new Float64Array(rows.n * rows.n);
    this.x = new Float64Array(rows.n);
  }
  factor(w: Float64Array, lambda: Float64Array): boolean {
    this.rows.gram(w, lambda, this.G);
    return this.chol.factor(this.G);
  }
  solve(rhs: Float64Array, out: Float64Array): Float64Array {
    return this.chol.solve(rhs, out);
  }
  logDet(): number {
    return this.chol.logDet();
  }
  leverages(out: Float64Array): Float64Array {
    return rowLeverages(this.rows, this.chol.L, this.x, out);
  }
  copyFrom(o: MetricFactor): void {
    this.chol.L.set((o as DenseMetric).chol.L);
    this.chol.first.set((o as DenseMetric).chol.first);
  }
}

/* ----------------------------------------------------------------------------------------------- */

class BandedLowRankMetric implements MetricFactor {
  private readonly n: number;
  private readonly B: number;
  private readonly W: number;
  /** Band of G, then of its factor L (row i holds columns i − B … i). */
  readonly L: Float64Array;
  /** Entries of G⁻¹_B inside the band (same layout), valid after leverages(). */
  private readonly Z: Float64Array;
  private zValid = false;
  private readonly k: number;
  /** Y = G_B⁻¹ Cᵀ, column r at r·n. */
  private readonly Y: Float64Array;
  /** √w of the low-rank rows. */
  private readonly dw: Float64Array;
  /** P = C Y (k × k). */
  private readonly P: Float64Array;
  private readonly K: Float64Array;
  private readonly kChol: Cholesky;
  private readonly tk: Float64Array;
  private readonly tk2: Float64Array;
  private readonly col: Float64Array;
  private ldB = 0;

  constructor(
    private readonly rows: RowMatrix,
    readonly structure: MetricStructure,
  ) {
    const n = rows.n;
    this.n = n;
    this.B = structure.bandwidth;
    this.W = this.B + 1;
    this.L = new Float64Array(n * this.W);
    this.Z = new Float64Array(n * this.W);
    const k = structure.lowRankRows.length;
    this.k = k;
    this.Y = new Float64Array(n * k);
    this.dw = new Float64Array(k);
    this.P = new Float64Array(k * k);
    this.K = new Float64Array(k * k);
    this.kChol = new Cholesky(k);
    this.tk = new Float64Array(k);
    this.tk2 = new Float64Array(k);
    this.col = new Float64Array(n);
  }

  factor(w: Float64Array, lambda: Float64Array): boolean {
    const { n, B, W, L } = this;
    const { ptr, idx, val } = this.rows;
    this.zValid = false;
    L.fill(0);
    // Band of G_B = Σ_band wᵢ aᵢ aᵢᵀ + diag(λ): entry (r, c), c ≤ r, at r·W + c − r + B.
    for (let j = 0; j < n; j++) L[j * W + B] = lambda[j];
    const br = this.structure.bandRows;
    for (let t = 0; t < br.length; t++) {
      const i = br[t];
      const wi = w[i];
      if (wi === 0) continue;
      for (let a = ptr[i]; a < ptr[i + 1]; a++) {
        const r = idx[a];
        const c1 = wi * val[a];
        const base = r * W - r + B;
        for (let b = ptr[i]; b <= a; b++) L[base + idx[b]] += c1 * val[b];
      }
    }
    // Banded Cholesky in place.
    let ld = 0;
    for (let i = 0; i < n; i++) {
      const bi = i * W - i + B;
      const j0 = i > B ? i - B : 0;
      for (let j = j0; j <= i; j++) {
        const bj = j * W - j + B;
        let sum = L[bi + j];
        const k0 = j > B ? j - B : 0;
        for (let kk = k0 > j0 ? k0 : j0; kk < j; kk++) sum -= L[bi + kk] * L[bj + kk];
        if (j === i) {
          if (!(sum > 0) || !Number.isFinite(sum)) return false;
          const d = Math.sqrt(sum);
          L[bi + i] = d;
          ld += Math.log(d);
        } else L[bi + j] = sum / L[bj + j];
      }
    }
    this.ldB = 2 * ld;
    if (this.k === 0) return true;
    // Low-rank part.
    const { k, Y, P, K, dw, col } = this;
    const lr = this.structure.lowRankRows;
    for (let r = 0; r < k; r++) {
      const i = lr[r];
      const wi = w[i];
      if (!(wi >= 0) || !Number.isFinite(wi)) return false;
      dw[r] = Math.sqrt(wi);
      col.fill(0);
      for (let a = ptr[i]; a < ptr[i + 1]; a++) col[idx[a]] = val[a];
      this.bandSolve(col, Y.subarray(r * n, r * n + n));
    }
    for (let r = 0; r < k; r++) {
      const i = lr[r];
      for (let s = 0; s < k; s++) {
        let sum = 0;
        const ys = s * n;
        for (let a = ptr[i]; a < ptr[i + 1]; a++) sum += val[a] * Y[ys + idx[a]];
        P[r * k + s] = sum;
      }
    }
    for (let r = 0; r < k; r++)
      for (let s = 0; s < k; s++) {
        // symmetrise P's rounding
        const prs = 0.5 * (P[r * k + s] + P[s * k + r]);
        K[r * k + s] = (r === s ? 1 : 0) + dw[r] * prs * dw[s];
      }
    return this.kChol.factor(K);
  }

  /** out = G_B⁻¹ rhs. */
  private bandSolve(rhs: Float64Array, out: Float64Array): Float64Array {
    const { n, B, W, L } = this;
    for (let i = 0; i < n; i++) {
      const bi = i * W - i + B;
      let sum = rhs[i];
      for (let kk = i > B ? i - B : 0; kk < i; kk++) sum -= L[bi + kk] * out[kk];
      out[i] = sum / L[bi + i];
    }
    for (let i = n - 1; i >= 0; i--) {
      let sum = out[i];
      const kEnd = i + B < n - 1 ? i + B : n - 1;
      for (let kk = i + 1; kk <= kEnd; kk++) sum -= L[kk * W - kk + B + i] * out[kk];
      out[i] = sum / L[i * W - i + B + i];
    }
    return out;
  }

  solve(rhs: Float64Array, out: Float64Array): Float64Array {
    this.bandSolve(rhs, out);
    const { k, n, Y, dw, tk, tk2 } = this;
    if (k === 0) return out;
    const { ptr, idx, val } = this.rows;
    const lr = this.structure.lowRankRows;
    for (let r = 0; r < k; r++) {
      const i = lr[r];
      let sum = 0;
      for (let a = ptr[i]; a < ptr[i + 1]; a++) sum += val[a] * out[idx[a]];
      tk[r] = dw[r] * sum;
    }
    this.kChol.solve(tk, tk2);
    for (let r = 0; r < k; r++) {
      const c = dw[r] * tk2[r];
      if (c === 0) continue;
      const yr = r * n;
      for (let j = 0; j < n; j++) out[j] -= Y[yr + j] * c;
    }
    return out;
  }

  logDet(): number {
    return this.k === 0 ? this.ldB : this.ldB + this.kChol.logDet();
  }

  /** Entries of G_B⁻¹ inside the band by the Takahashi recurrence. */
  private selectedInverse(): void {
    const { n, B, W, L, Z } = this;
    const zget = (r: number, c: number) => (r >= c ? Z[r * W - r + B + c] : Z[c * W - c + B + r]);
    for (let i = n - 1; i >= 0; i--) {
      const lii = L[i * W - i + B + i];
      const kEnd = i + B < n - 1 ? i + B : n - 1;
      for (let j = kEnd; j >= i; j--) {
        let sum = j === i ? 1 / lii : 0;
        for (let kk = i + 1; kk <= kEnd; kk++) sum -= L[kk * W - kk + B + i] * zget(kk, j);
        Z[j * W - j + B + i] = sum / lii;
      }
    }
    this.zValid = true;
  }

  leverages(out: Float64Array): Float64Array {
    if (!this.zValid) this.selectedInverse();
    const { B, W, Z, k, n, Y, dw, tk, tk2, P } = this;
    const { ptr, idx, val } = this.rows;
    const br = this.structure.bandRows;
    for (let t = 0; t < br.length; t++) {
      const i = br[t];
      let sum = 0;
      for (let a = ptr[i]; a < ptr[i + 1]; a++) {
        const r = idx[a];
        const va = val[a];
        sum += va * va * Z[r * W + B];
        for (let b = ptr[i]; b < a; b++) sum += 2 * va * val[b] * Z[r * W - r + B + idx[b]];
      }
      if (k > 0) {
        for (let r = 0; r < k; r++) {
          let s = 0;
          const yr = r * n;
          for (let a = ptr[i]; a < ptr[i + 1]; a++) s += val[a] * Y[yr + idx[a]];
          tk[r] = dw[r] * s;
        }
        this.kChol.forward(tk, tk2);
        for (let r = 0; r < k; r++) sum -= tk2[r] * tk2[r];
      }
      out[i] = sum;
    }
    const lr = this.structure.lowRankRows;
    for (let r = 0; r < k; r++) {
      for (let s = 0; s < k; s++) tk[s] = dw[s] * P[s * k + r];
      this.kChol.forward(tk, tk2);
      let sum = P[r * k + r];
      for (let s = 0; s < k; s++) sum -= tk2[s] * tk2[s];
      out[lr[r]] = sum;
    }
    return out;
  }

  copyFrom(o: MetricFactor): void {
    const b = o as BandedLowRankMetric;
    this.L.set(b.L);
    this.ldB = b.ldB;
    this.zValid = b.zValid;
    if (b.zValid) this.Z.set(b.Z);
    if (this.k > 0) {
      this.Y.set(b.Y);
      this.dw.set(b.dw);
      this.P.set(b.P);
      this.K.set(b.K);
      this.kChol.L.set(b.kChol.L);
      this.kChol.first.set(b.kChol.first);
    }
  }
}
