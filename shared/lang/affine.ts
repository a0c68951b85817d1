/**
 * Affine-constraint extraction: every `constrain` line becomes rows of A θ ≤ b or E θ = e over the
 * unknowns' flat coordinates. Strict `<` and `>` are treated as `<=` and `>=` (the boundary has
 * probability zero under a continuous posterior). Data and constants may appear in coefficients.
 */
import type { DataSchema, Expr, LangMessage, Program, Span } from './ast';
import { evaluateValue, isMat, type DataValues, type Value } from './evaluate';
import { LangError } from './parse';

/** Structurally identical to the engine's LinearSystem. */
export interface LinearRows {
  rows: number;
  cols: number;
  A: Float64Array;
  b: Float64Array;
  labels: string[];
}

/** One affine scalar: Σ c[j] θ[j] + k. */
interface Aff {
  c: Map<number, number>;
  k: number;
}

/** A scalar (length-1, scalar=true) or a vector of affine expressions. */
interface AffVal {
  scalar: boolean;
  items: Aff[];
}

function constAff(v: Value, span: Span): AffVal {
  if (typeof v === 'number') return { scalar: true, items: [{ c: new Map(), k: v }] };
  if (isMat(v)) throw new LangError(span, 'a matrix cannot appear here');
  return { scalar: false, items: Array.from(v, (k) => ({ c: new Map<number, number>(), k })) };
}

function combine(a: AffVal, b: AffVal, sa: number, sb: number): AffVal {
  const n = Math.max(a.items.length, b.items.length);
  const items: Aff[] = [];
  for (let i = 0; i < n; i++) {
    const x = a.items[a.scalar ? 0 : i];
    const y = b.items[b.scalar ? 0 : i];
    const c = new Map<number, number>();
    for (const [j, v] of x.c) c.set(j, sa * v);
    for (const [j, v] of y.c) c.set(j, (c.get(j) ?? 0) + sb * v);
    items.push({ c, k: sa * x.k + sb * y.k });
  }
  return { scalar: a.scalar && b.scalar, items };
}

function scale(a: AffVal, v: Value, span: Span, divide: boolean): AffVal {
  if (isMat(v)) throw new LangError(span, 'a matrix cannot appear here');
  const vs = typeof v === 'number' ? null : v;
  const n = vs ? Math.max(vs.length, a.items.length) : a.items.length;
  const items: Aff[] = [];
  for (let i = 0; i < n; i++) {
    const x = a.items[a.scalar ? 0 : i];
    let s = vs ? vs[i] : (v as number);
    if (divide) {
      if (s === 0) throw new LangError(span, 'division by zero in a constraint');
      s = 1 / s;
    }
    const c = new Map<number, number>();
    for (const [j, w] of x.c) c.set(j, s * w);
    items.push({ c, k: s * x.k });
  }
  return { scalar: a.scalar && !vs, items };
}

function notAffine(e: Expr, text: string, why: string): LangError {
  const part = text.slice(e.span.start, e.span.end);
  return new LangError(e.span, `\`${part}\` is not affine in the unknowns: ${why}`, 'constraints may only add, subtract, and scale unknowns by numbers or data');
}

class Extractor {
  needsData = false;
  constructor(
    public data: DataValues | undefined,
    public dummy: () => DataValues | undefined,
    public text: string,
  ) {}

  value(e: Expr): Value {
    if (e.type!.dep === 1 && !this.data) this.needsData = true;
    return evaluateValue(e, this.data ?? (e.type!.dep === 1 ? this.dummy() : undefined));
  }

  aff(e: Expr): AffVal {
    const t = e.type!;
    if (t.dep < 2) return constAff(this.value(e), e.span);
    switch (e.kind) {
      case 'name':
      case 'member': {
        const ref = e.ref!;
        if (ref.kind === 'let') return this.aff(ref.expr);
        if (ref.kind !== 'unknown') throw new LangError(e.span, 'internal: unexpected name');
        const items: Aff[] = [];
        for (let i = 0; i < ref.size; i++) items.push({ c: new Map([[ref.offset + i, 1]]), k: 0 });
        return { scalar: ref.shape.length === 0, items };
      }
      case 'index': {
        const base = this.aff(e.base);
        const idx = this.value(e.index);
        if (typeof idx === 'number') return { scalar: true, items: [base.items[idx - 1]] };
        if (isMat(idx)) throw new LangError(e.index.span, 'a matrix cannot be an index');
        const items: Aff[] = [];
        for (const k of idx) {
          if (!Number.isInteger(k) || k < 1 || k > base.items.length)
            throw new LangError(e.index.span, `index ${k} is outside 1…${base.items.length}`);
          items.push(base.items[k - 1]);
        }
        return { scalar: false, items };
      }
      case 'unary':
        return scale(this.aff(e.arg), -1, e.span, false);
      case 'binary': {
        const l = e.left.type!;
        const r = e.right.type!;
        if (e.op === '+' || e.op === '-') return combine(this.aff(e.left), this.aff(e.right), 1, e.op === '+' ? 1 : -1);
        if (e.op === '*') {
          if (l.dep < 2 && l.shape.length === 2) {
            const m = this.value(e.left);
            const v = this.aff(e.right);
            if (!isMat(m)) throw new LangError(e.left.span, 'internal: expected a matrix');
            const items: Aff[] = [];
            for (let i = 0; i < m.rows; i++) {
              let acc: AffVal = { scalar: true, items: [{ c: new Map(), k: 0 }] };
              for (let j = 0; j < m.cols; j++)
                acc = combine(acc, { scalar: true, items: [v.items[j]] }, 1, m.data[i * m.cols + j]);
              items.push(acc.items[0]);
            }
            return { scalar: false, items };
          }
          if (l.dep < 2) return scale(this.aff(e.right), this.value(e.left), e.span, false);
          if (r.dep < 2) return scale(this.aff(e.left), this.value(e.right), e.span, false);
          throw notAffine(e, this.text, 'it multiplies unknowns together');
        }
        if (e.op === '/') {
          if (r.dep < 2) return scale(this.aff(e.left), this.value(e.right), e.span, true);
          throw notAffine(e, this.text, 'it divides by an expression with unknowns');
        }
        throw notAffine(e, this.text, 'a power of an unknown is not a straight line');
      }
      case 'array': {
        const items = e.items.map((x) => {
          const v = this.aff(x);
          return v.items[0];
        });
        return { scalar: false, items };
      }
      case 'call': {
        const args = e.args;
        switch (e.fn) {
          case 'sum':
          case 'mean': {
            const v = this.aff(args[0]);
            let acc: AffVal = { scalar: true, items: [{ c: new Map(), k: 0 }] };
            const w = e.fn === 'mean' ? 1 / v.items.length : 1;
            for (const it of v.items) acc = combine(acc, { scalar: true, items: [it] }, 1, w);
            return acc;
          }
          case 'dot': {
            const [a, b] = args;
            if (a.type!.dep < 2 || b.type!.dep < 2) {
              const [cst, var_] = a.type!.dep < 2 ? [a, b] : [b, a];
              return this.aff({
                kind: 'call',
                fn: 'sum',
                fnSpan: e.fnSpan,
                span: e.span,
                args: [{ kind: 'binary', op: '*', left: cst, right: var_, span: e.span, type: { ...var_.type!, shape: var_.type!.shape } }],
                type: e.type,
              });
            }
            throw notAffine(e, this.text, 'it multiplies unknowns together');
          }
          case 'cumsum': {
            const v = this.aff(args[0]);
            const items: Aff[] = [];
            let acc: AffVal = { scalar: true, items: [{ c: new Map(), k: 0 }] };
            for (const it of v.items) {
              acc = combine(acc, { scalar: true, items: [it] }, 1, 1);
              items.push(acc.items[0]);
            }
            return { scalar: false, items };
          }
          case 'diff': {
            const v = this.aff(args[0]);
            const items: Aff[] = [];
            for (let i = 0; i + 1 < v.items.length; i++)
              items.push(combine({ scalar: true, items: [v.items[i + 1]] }, { scalar: true, items: [v.items[i]] }, 1, -1).items[0]);
            return { scalar: false, items };
          }
          default:
            throw notAffine(e, this.text, `${e.fn} of an unknown is not a straight line`);
        }
      }
      case 'num':
      case 'compare':
        throw new LangError(e.span, 'internal: unexpected expression');
    }
  }
}

function dummyData(schema: DataSchema): DataValues {
  const out = Object.create(null) as DataValues;
  for (const t of Object.keys(schema)) {
    const cols = Object.create(null) as DataValues[string]['columns'];
    for (const c of Object.keys(schema[t].columns)) {
      cols[c] = { type: schema[t].columns[c].type, values: new Float64Array(schema[t].rows).fill(1) };
    }
    out[t] = { rows: schema[t].rows, columns: cols };
  }
  return out;
}

export interface ExtractResult {
  inequalities: LinearRows;
  equalities: LinearRows;
  messages: LangMessage[];
  /** True when data values were needed and were not supplied (rows then come from placeholder data). */
  needsData: boolean;
}

function pack(rows: { c: Map<number, number>; k: number; label: string }[], dim: number): LinearRows {
  const A = new Float64Array(rows.length * dim);
  const b = new Float64Array(rows.length);
  rows.forEach((r, i) => {
    for (const [j, v] of r.c) A[i * dim + j] = v;
    b[i] = r.k;
  });
  return { rows: rows.length, cols: dim, A, b, labels: rows.map((r) => r.label) };
}

/**
 * Extract constraint rows from a checked program. With `data` undefined, expressions that need
 * data values are evaluated on placeholder data (from `schema`) only to validate and count them.
 */
export function extractConstraintsFrom(program: Program, dim: number, data: DataValues | undefined, schema?: DataSchema): ExtractResult {
  const messages: LangMessage[] = [];
  const ineq: { c: Map<number, number>; k: number; label: string }[] = [];
  const eq: { c: Map<number, number>; k: number; label: string }[] = [];
  let needsData = false;
  let dummyCache: DataValues | undefined;
  // Placeholder data is only built when a constraint needs data values and none were given.
  const dummy = () => (dummyCache ??= schema ? dummyData(schema) : undefined);
  for (const s of program.statements) {
    if (s.kind !== 'constrain' || s.expr.kind !== 'compare') continue;
    const e = s.expr;
    const ex = new Extractor(data, dummy, s.text);
    const newIneq: typeof ineq = [];
    const newEq: typeof eq = [];
    try {
      const vals = e.operands.map((o) => ex.aff(o));
      for (let k = 0; k < e.ops.length; k++) {
        const op = e.ops[k];
        const d = combine(vals[k], vals[k + 1], 1, -1);
        const pairText = s.text.slice(e.operands[k].span.start, e.operands[k + 1].span.end).trim();
        const sign = op === '>=' || op === '>' ? -1 : 1;
        d.items.forEach((it, i) => {
          const label = `line ${s.line}: ${pairText}` + (d.scalar ? '' : ` (element ${i + 1})`);
          const c = new Map<number, number>();
          for (const [j, v] of it.c) if (v !== 0) c.set(j, sign * v);
          const rhs = -sign * it.k;
          if (c.size === 0) {
            const holds = op === '==' ? rhs === 0 : rhs >= 0;
            if (!holds && !ex.needsData) throw new LangError({ start: e.operands[k].span.start, end: e.operands[k + 1].span.end }, `this constraint can never hold${d.scalar ? '' : ` (element ${i + 1})`}`);
            return;
          }
          if (!Number.isFinite(rhs) || [...c.values()].some((v) => !Number.isFinite(v)))
            throw new LangError(e.span, `a coefficient of this constraint is not a finite number${d.scalar ? '' : ` (element ${i + 1})`}`);
          (op === '==' ? newEq : newIneq).push({ c, k: rhs, label });
        });
      }
      ineq.push(...newIneq);
      eq.push(...newEq);
      if (ex.needsData) needsData = true;
    } catch (err) {
      const le = err instanceof LangError ? err : new LangError(e.span, 'could not read this constraint');
      const m: LangMessage = {
        line: s.line,
        column: le.span.start + 1,
        endColumn: Math.max(le.span.end + 1, le.span.start + 2),
        severity: 'error',
        message: le.message,
      };
      if (le.suggestion) m.suggestion = le.suggestion;
      messages.push(m);
    }
  }
  return { inequalities: pack(ineq, dim), equalities: pack(eq, dim), messages, needsData };
}
