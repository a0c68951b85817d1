/**
 * Row-compressed storage of the constraint matrix A (m × n) for the products the samplers need.
 * Constraint rows are usually sparse (orderings touch two unknowns, bounds one).
 */
export class RowMatrix {
  readonly m: number;
  readonly n: number;
  readonly ptr: Int32Array;
  readonly idx: Int32Array;
  readonly val: Float64Array;

  constructor(A: Float64Array, m: number, n: number) {
    this.m = m;
    this.n = n;
    let nnz = 0;
    for (let k = 0; k < m * n; k++) if (A[k] !== 0) nnz++;
    this.ptr = new Int32Array(m + 1);
    this.idx = new Int32Array(nnz);
    this.val = new Float64Array(nnz);
    let q = 0;
    for (let i = 0; i < m; i++) {
      this.ptr[i] = q;
      for (let j = 0; j < n; j++) {
        const a = A[i * n + j];
        if (a !== 0) {
          this.idx[q] = j;
          this.val[q] = a;
          q++;
        }
      }
    }
    this.ptr[m] = q;
  }

  /** From row-compressed arrays directly (large sparse systems whose dense form would not fit). */
  static fromCsr(m: number, n: number, ptr: Int32Array, idx: Int32Array, val: Float64Array): RowMatrix {
    const r = new RowMatrix(new Float64Array(0), 0, n);
    return Object.assign(r, { m, ptr, idx, val });
  }

  /** out = A x (length m). */
  mul(x: Float64Array, out: Float64Array): Float64Array {
    const { ptr, idx, val } = this;
    for (let i = 0; i < this.m; i++) {
      let s = 0;
      for (let q = ptr[i]; q < ptr[i + 1]; q++) s += val[q] * x[idx[q]];
      out[i] = s;
    }
    return out;
  }

  /** out = Aᵀ y (length n), overwritten. */
  mulT(y: Float64Array, out: Float64Array): Float64Array {
    out.fill(0);
    return this.addMulT(y, out, 1);
  }

  /** out += c Aᵀ y. */
  addMulT(y: Float64Array, out: Float64Array, c: number): Float64Array {
    const { ptr, idx, val } = this;
    for (let i = 0; i < this.m; i++) {
      const yi = c * y[i];
      if (yi === 0) continue;
      for (let q = ptr[i]; q < ptr[i + 1]; q++) out[idx[q]] += val[q] * yi;
    }
    return out;
  }

  /** G = Aᵀ diag(w) A + diag(d), full symmetric n × n row-major. */
  gram(w: Float64Array, d: Float64Array | null, G: Float64Array): Float64Array {
    const n = this.n;
    G.fill(0);
    const { ptr, idx, val } = this;
    for (let i = 0; i < this.m; i++) {
      const wi = w[i];
      if (wi === 0) continue;
      for (let q = ptr[i]; q < ptr[i + 1]; q++) {
        const j = idx[q];
        const c = wi * val[q];
        const rj = j * n;
        for (let r = ptr[i]; r <= q; r++) G[rj + idx[r]] += c * val[r];
      }
    }
    // Entries were accumulated where column index ≤ row index in row order of idx; idx within a row is
    // increasing, so the lower triangle is filled. Mirror it.
    for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) G[j * n + i] = G[i * n + j];
    if (d) for (let j = 0; j < n; j++) G[j * n + j] += d[j];
    return G;
  }

  /** Row i dotted with x. */
  rowDot(i: number, x: Float64Array): number {
    let s = 0;
    for (let q = this.ptr[i]; q < this.ptr[i + 1]; q++) s += this.val[q] * x[this.idx[q]];
    return s;
  }
}
