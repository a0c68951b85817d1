/**
 * Code generation: checked tree → JavaScript source for ℓ(θ) with a forward sweep and a reverse
 * (adjoint) sweep, and for the derived quantities.
 *
 * Structure of the generated log-density:
 *  1. outer forward: scalars and small vectors that do not run over data rows, in dependency order;
 *     reductions that feed non-linear outer expressions get their own forward loop here;
 *  2. fused row loops: every term piece that is a sum over elements (ld_* over rows, sum, mean, dot)
 *     with a constant weight is evaluated AND differentiated in one loop per length, so each row is
 *     read once; the per-row reverse sweep uses locals only;
 *  3. outer reverse: adjoints flow back through the outer nodes in reverse order into grad.
 * Every buffer (adjoint arrays, partial-derivative tape, materialised vectors) is allocated once in
 * the closure. Only generated identifiers, numeric literals and the runtime object `R` appear in
 * the source; user names never do.
 */
import type { Expr, Program } from '../../../shared/lang/index';
import { evaluateValue, isMat, LangError, type DataValues, type Value } from '../../../shared/lang/index';
import { constantDensity, densityFn, densityInfo, engineMath, mathFn } from './runtime';

/**
 * The non-finite numbers as names bound once in every generated factory (NON_FINITE), not as
 * arithmetic or `-Infinity` in the generated function: an operation that first runs after the
 * function was optimised (a NaN log-density's `-Infinity` fallback, a scale's out-of-range branch)
 * has no type feedback, so each such run deoptimises the function, and after enough of them V8
 * stops optimising it — measured: a 2,000-row regression's log-density 3–4× slower for the rest of
 * the process once a sampler's step-size search had visited a few non-finite points.
 */
export const NON_FINITE = 'const NAN_ = NaN, INF_ = Infinity, NINF_ = -Infinity;';

/** A number as a JavaScript literal (non-finite values by the names of NON_FINITE). */
export function lit(x: number): string {
  if (Number.isNaN(x)) return 'NAN_';
  if (x === Infinity) return 'INF_';
  if (x === -Infinity) return 'NINF_';
  if (Object.is(x, -0)) return '(-0)';
  const s = String(x);
  if (!/^-?[0-9.e+-]+$/.test(s)) throw new Error('internal: bad literal');
  return x < 0 ? `(${s})` : s;
}

type ORef =
  | { k: 'cs'; v: number }
  | { k: 'cv'; arr: string; len: number; data: Float64Array }
  | { k: 'cm'; arr: string; rows: number; cols: number }
  | { k: 's'; v: string; a: string }
  | { k: 't'; off: number; len: number }
  | { k: 'v'; V: string; A: string; len: number };

interface Loc {
  val: string;
  param: boolean;
  back(adj: string): string[];
}

interface RowCtx {
  i: string;
  L: number;
  pre: string[];
  post: string[];
  elemScalars: Map<string, { x: string[]; y: string[] }>;
}

const NOBACK = (): string[] => [];

export class CodeGen {
  /** Closure constants: C[k]. */
  consts: unknown[] = [];
  closure: string[] = [NON_FINITE];
  init: string[] = [];
  fwd: string[] = [];
  revBlocks: string[][] = [];
  tapeSize = 0;
  scratch = 8;
  memo = new Map<Expr, ORef>();
  constMemo = new Map<Expr, Value>();
  vecConstMemo = new Map<Float64Array, string>();
  n = 0;
  math = engineMath();

  constructor(
    public data: DataValues,
    public grad: boolean,
    /** Line of the statement being compiled, for messages. */
    public line = 0,
  ) {}

  id(prefix: string): string {
    return `${prefix}${this.n++}`;
  }

  addConst(v: unknown): string {
    const name = this.id('K');
    this.closure.push(`const ${name} = C[${this.consts.length}];`);
    this.consts.push(v);
    return name;
  }

  tape(k: number): number {
    const off = this.tapeSize;
    this.tapeSize += k;
    return off;
  }

  rev(lines: string[]) {
    if (this.grad && lines.length) this.revBlocks.push(lines);
  }

  /* ------------------------------------------------------------------ constants */

  value(e: Expr): Value {
    let v = this.constMemo.get(e);
    if (v === undefined) {
      v = evaluateValue(e, this.data, this.math, constantDensity);
      this.constMemo.set(e, v);
    }
    return v;
  }

  constant(e: Expr): ORef {
    const v = this.value(e);
    if (typeof v === 'number') return { k: 'cs', v };
    if (isMat(v)) return { k: 'cm', arr: this.addConst(v.data), rows: v.rows, cols: v.cols };
    let arr = this.vecConstMemo.get(v);
    if (!arr) {
      arr = this.addConst(v);
      this.vecConstMemo.set(v, arr);
    }
    return { k: 'cv', arr, len: v.length, data: v };
  }

  /** 0-based Int32Array of gather positions, validated against the base length. */
  gatherMemo = new Map<Expr, string>();
  gatherIndex(e: Expr, baseLen: number): string {
    const m = this.gatherMemo.get(e);
    if (m) return m;
    const v = this.value(e);
    if (typeof v === 'number' || isMat(v)) throw new LangError(e.span, 'internal: expected an index vector');
    const idx = new Int32Array(v.length);
    for (let i = 0; i < v.length; i++) {
      const k = v[i];
      if (!Number.isInteger(k) || k < 1 || k > baseLen)
        throw new LangError(e.span, `row ${i + 1} of this index holds ${k}, outside 1…${baseLen}`);
      idx[i] = k - 1;
    }
    const name = this.addConst(idx);
    this.gatherMemo.set(e, name);
    return name;
  }

  static valOf(r: ORef, j: string | number): string {
    switch (r.k) {
      case 'cs':
        return lit(r.v);
      case 's':
        return r.v;
      case 't':
        return `theta[${r.off} + ${j}]`;
      case 'v':
        return `${r.V}[${j}]`;
      case 'cv':
        return `${r.arr}[${j}]`;
      case 'cm':
        throw new Error('internal: matrix value');
    }
  }

  adj(r: ORef, expr: string, j?: string | number): string[] {
    if (!this.grad) return [];
    switch (r.k) {
      case 's':
        return [`${r.a} += ${expr};`];
      case 't':
        return [`grad[${r.off} + ${j}] += ${expr};`];
      case 'v':
        return [`${r.A}[${j}] += ${expr};`];
      default:
        return [];
    }
  }

  isParam(r: ORef): boolean {
    return r.k === 's' || r.k === 't' || r.k === 'v';
  }

  newScalar(valueExpr: string): { k: 's'; v: string; a: string } {
    const v = this.id('v');
    const a = this.id('a');
    this.fwd.push(`const ${v} = ${valueExpr};`);
    if (this.grad) this.init.push(`let ${a} = 0;`);
    return { k: 's', v, a };
  }

  newVector(len: number): { k: 'v'; V: string; A: string; len: number } {
    const V = this.id('V');
    const A = this.id('A');
    this.closure.push(`const ${V} = new Float64Array(${len});`);
    if (this.grad) {
      this.closure.push(`const ${A} = new Float64Array(${len});`);
      this.init.push(`${A}.fill(0);`);
    }
    return { k: 'v', V, A, len };
  }

  /* ------------------------------------------------------------------ outer nodes */

  outer(e: Expr): ORef {
    const t = e.type!;
    if (t.dep < 2) return this.constant(e);
    const m = this.memo.get(e);
    if (m) return m;
    const r = this.outerNew(e);
    this.memo.set(e, r);
    return r;
  }

  private outerNew(e: Expr): ORef {
    const t = e.type!;
    if ((e.kind === 'name' || e.kind === 'member') && e.ref) {
      const ref = e.ref;
      if (ref.kind === 'let') return this.outer(ref.expr);
      if (ref.kind === 'unknown') {
        if (ref.shape.length === 1) return { k: 't', off: ref.offset, len: ref.size };
        const s = this.newScalar(`theta[${ref.offset}]`);
        this.rev([`grad[${ref.offset}] += ${s.a};`]);
        return s;
      }
    }
    if (t.shape.length === 1) return this.outerVector(e);
    return this.outerScalar(e);
  }

  private outerScalar(e: Expr): ORef {
    switch (e.kind) {
      case 'index': {
        const base = this.outer(e.base);
        const k = (this.value(e.index) as number) - 1;
        const s = this.newScalar(CodeGen.valOf(base, k));
        this.rev(this.adj(base, s.a, k));
        return s;
      }
      case 'unary': {
        const x = this.outer(e.arg);
        const s = this.newScalar(`-${CodeGen.valOf(x, 0)}`);
        this.rev(this.adj(x, `-${s.a}`));
        return s;
      }
      case 'binary': {
        const l = this.outer(e.left);
        const r = this.outer(e.right);
        const lv = CodeGen.valOf(l, 0);
        const rv = CodeGen.valOf(r, 0);
        if (e.op === '^') return this.scalarPow(lv, rv, l, r);
        const expr = `${lv} ${e.op} ${rv}`;
        const s = this.newScalar(expr);
        const back: string[] = [];
        if (e.op === '+') back.push(...this.adj(l, s.a), ...this.adj(r, s.a));
        else if (e.op === '-') back.push(...this.adj(l, s.a), ...this.adj(r, `-${s.a}`));
        else if (e.op === '*') back.push(...this.adj(l, `${s.a} * ${rv}`), ...this.adj(r, `${s.a} * ${lv}`));
        else back.push(...this.adj(l, `${s.a} / ${rv}`), ...this.adj(r, `-${s.a} * ${s.v} / ${rv}`));
        this.rev(back);
        return s;
      }
      case 'call':
        return this.outerCall(e);
      default:
        throw new LangError(e.span, 'internal: unexpected scalar expression');
    }
  }

  private scalarPow(lv: string, rv: string, l: ORef, r: ORef): ORef {
    if (!this.grad) return this.newScalar(`Math.pow(${lv}, ${rv})`);
    const k = this.tape(2);
    const s = this.newScalar(`R.${mathFn('pow', true)}(${lv}, ${rv}, P, ${k})`);
    this.rev([...this.adj(l, `${s.a} * P[${k}]`), ...this.adj(r, `${s.a} * P[${k + 1}]`)]);
    return s;
  }

  private scalarMath(fn: string, x: ORef): ORef {
    const xv = CodeGen.valOf(x, 0);
    if (!this.grad) return this.newScalar(this.mathValueExpr(fn, xv));
    const k = this.tape(1);
    const s = this.newScalar(`R.${mathFn(fn, true)}(${xv}, P, ${k})`);
    this.rev(this.adj(x, `${s.a} * P[${k}]`));
    return s;
  }

  mathValueExpr(fn: string, xv: string): string {
    if (fn === 'exp') return `Math.exp(${xv})`;
    if (fn === 'log') return `Math.log(${xv})`;
    if (fn === 'sqrt') return `Math.sqrt(${xv})`;
    return `R.${mathFn(fn, false)}(${xv})`;
  }

  private outerCall(e: Extract<Expr, { kind: 'call' }>): ORef {
    const info = densityInfo(e.fn);
    const fn = e.fn;
    if (fn === 'pow') {
      const l = this.outer(e.args[0]);
      const r = this.outer(e.args[1]);
      return this.scalarPow(CodeGen.valOf(l, 0), CodeGen.valOf(r, 0), l, r);
    }
    if (!info && e.args.length === 1 && e.args[0].type!.shape.length === 0 && fn !== 'sum' && fn !== 'mean' && fn !== 'log_sum_exp') {
      return this.scalarMath(fn, this.outer(e.args[0]));
    }
    if (fn === 'log_sum_exp') {
      const v = this.outerVec(e.args[0]);
      const arr = v.k === 't' ? 'theta' : v.k === 'v' ? v.V : v.k === 'cv' ? v.arr : '';
      const off = v.k === 't' ? v.off : 0;
      if (!arr) {
        // a scalar argument: log_sum_exp(x) = x
        const x = this.outer(e.args[0]);
        const s = this.newScalar(CodeGen.valOf(x, 0));
        this.rev(this.adj(x, s.a));
        return s;
      }
      const L = e.args[0].type!.shape[0];
      if (!this.grad) return this.newScalar(`R.logSumExp(${arr}, ${off}, ${L})`);
      const k = this.tape(L);
      const s = this.newScalar(`R.logSumExpGrad(${arr}, ${off}, ${L}, P, ${k})`);
      this.rev(this.loop(L, (j) => this.adj(v, `${s.a} * P[${k} + ${j}]`, j)));
      return s;
    }
    if (info && info.kind === 'vector') return this.vectorDensity(e);
    if (fn === 'dot') return this.outer(dotAsSum(e));
    // sum, mean, scalar densities, vectorised densities: a reduction
    const L = reductionLength(e);
    if (L === 0) {
      // all arguments scalar
      if (fn === 'sum' || fn === 'mean') {
        const x = this.outer(e.args[0]);
        const s = this.newScalar(CodeGen.valOf(x, 0));
        this.rev(this.adj(x, s.a));
        return s;
      }
      const args = e.args.map((a) => this.outer(a));
      const vals = args.map((a) => CodeGen.valOf(a, 0));
      if (!this.grad) return this.newScalar(`R.${densityFn(fn, false)}(${vals.join(', ')})`);
      const k = this.tape(args.length);
      const s = this.newScalar(`R.${densityFn(fn, true)}(${vals.join(', ')}, P, ${k})`);
      const back: string[] = [];
      args.forEach((a, q) => back.push(...this.adj(a, `${s.a} * P[${k + q}]`)));
      this.rev(back);
      return s;
    }
    // General reduction over L elements: forward loop now, reverse loop later.
    const acc = this.id('s');
    const fctx = this.rowCtx(L, false);
    const fr = this.rowReduction(e, fctx, false);
    this.fwd.push(`let ${acc} = 0;`, ...fctx.pre, `for (let ${fctx.i} = 0; ${fctx.i} < ${L}; ${fctx.i}++) {`, ...fr.lines, `${acc} += ${fr.val};`, '}');
    const s = this.newScalar(fn === 'mean' ? `${acc} / ${L}` : acc);
    if (this.grad) {
      const rctx = this.rowCtx(L, true);
      const rr = this.rowReduction(e, rctx, true);
      const seed = fn === 'mean' ? `${s.a} / ${L}` : s.a;
      this.rev([...rctx.pre, `for (let ${rctx.i} = 0; ${rctx.i} < ${L}; ${rctx.i}++) {`, ...rr.lines, ...rr.back(seed), '}', ...rctx.post]);
    }
    return s;
  }

  private vectorDensity(e: Extract<Expr, { kind: 'call' }>): ORef {
    const x = this.outerVec(e.args[0]);
    const K = e.args[0].type!.shape[0];
    let p = this.outerVec(e.args[1]);
    if (e.args[1].type!.shape.length === 0) p = this.broadcastVec(this.outer(e.args[1]), K);
    const xa = CodeGen.arrOf(x);
    const pa = CodeGen.arrOf(p);
    const call = `${xa.arr}, ${xa.off}, ${pa.arr}, ${pa.off}, ${K}`;
    if (!this.grad) return this.newScalar(`R.${densityFn(e.fn, false)}(${call})`);
    const k = this.tape(2 * K);
    const s = this.newScalar(`R.${densityFn(e.fn, true)}(${call}, P, ${k})`);
    const back: string[] = [];
    if (this.isParam(x)) back.push(...this.loop(K, (j) => this.adj(x, `${s.a} * P[${k} + ${j}]`, j)));
    if (this.isParam(p)) back.push(...this.loop(K, (j) => this.adj(p, `${s.a} * P[${k + K} + ${j}]`, j)));
    this.rev(back);
    return s;
  }

  static arrOf(r: ORef): { arr: string; off: number } {
    if (r.k === 't') return { arr: 'theta', off: r.off };
    if (r.k === 'v') return { arr: r.V, off: 0 };
    if (r.k === 'cv') return { arr: r.arr, off: 0 };
    throw new Error('internal: not a vector');
  }

  /** A vector reference for a vector-shaped expression (materialising when needed). */
  outerVec(e: Expr): ORef {
    return this.outer(e);
  }

  broadcastVec(x: ORef, K: number): ORef {
    if (x.k === 'cs') {
      const data = new Float64Array(K).fill(x.v);
      return { k: 'cv', arr: this.addConst(data), len: K, data };
    }
    const v = this.newVector(K);
    this.fwd.push(`${v.V}.fill(${CodeGen.valOf(x, 0)});`);
    this.rev(this.loop(K, (j) => this.adj(x, `${v.A}[${j}]`)));
    return v;
  }

  loop(L: number, body: (j: string) => string[]): string[] {
    const j = this.id('j');
    const b = body(j);
    if (!b.length) return [];
    return [`for (let ${j} = 0; ${j} < ${L}; ${j}++) {`, ...b, '}'];
  }

  private outerVector(e: Expr): ORef {
    const L = e.type!.shape[0];
    if (e.kind === 'call' && e.fn === 'cumsum') {
      const x = this.outer(e.args[0]);
      const v = this.newVector(L);
      const s = this.id('c');
      this.fwd.push(`let ${s} = 0;`, ...this.loopAlways(L, (j) => [`${s} += ${CodeGen.valOf(x, j)};`, `${v.V}[${j}] = ${s};`]));
      if (this.grad) {
        const j = this.id('j');
        this.rev([`let ${s}r = 0;`, `for (let ${j} = ${L - 1}; ${j} >= 0; ${j}--) {`, `${s}r += ${v.A}[${j}];`, ...this.adj(x, `${s}r`, j), '}']);
      }
      return v;
    }
    if (e.kind === 'call' && e.fn === 'diff') {
      const x = this.outer(e.args[0]);
      const v = this.newVector(L);
      this.fwd.push(...this.loopAlways(L, (j) => [`${v.V}[${j}] = ${CodeGen.valOf(x, `${j} + 1`)} - ${CodeGen.valOf(x, j)};`]));
      this.rev(this.loop(L, (j) => [...this.adj(x, `${v.A}[${j}]`, `${j} + 1`), ...this.adj(x, `-${v.A}[${j}]`, j)]));
      return v;
    }
    if (e.kind === 'array') {
      const items = e.items.map((x) => this.outer(x));
      const v = this.newVector(L);
      items.forEach((it, q) => this.fwd.push(`${v.V}[${q}] = ${CodeGen.valOf(it, 0)};`));
      const back: string[] = [];
      items.forEach((it, q) => back.push(...this.adj(it, `${v.A}[${q}]`)));
      this.rev(back);
      return v;
    }
    // Elementwise expression: materialise with a loop, reverse loop recomputes each row.
    const v = this.newVector(L);
    const fctx = this.rowCtx(L, false);
    const f = this.elem(e, fctx);
    this.fwd.push(...fctx.pre, `for (let ${fctx.i} = 0; ${fctx.i} < ${L}; ${fctx.i}++) {`, ...this.flushRow(fctx), `${v.V}[${fctx.i}] = ${f.val};`, '}');
    if (this.grad) {
      const rctx = this.rowCtx(L, true);
      const r = this.elem(e, rctx);
      this.rev([...rctx.pre, `for (let ${rctx.i} = 0; ${rctx.i} < ${L}; ${rctx.i}++) {`, ...this.flushRow(rctx), ...r.back(`${v.A}[${rctx.i}]`), '}', ...rctx.post]);
    }
    return v;
  }

  loopAlways(L: number, body: (j: string) => string[]): string[] {
    const j = this.id('j');
    return [`for (let ${j} = 0; ${j} < ${L}; ${j}++) {`, ...body(j), '}'];
  }

  /* ------------------------------------------------------------------ row loops */

  rowLines: Map<RowCtx, string[]> = new Map();

  rowCtx(L: number, withAdj: boolean): RowCtx & { withAdj: boolean } {
    const ctx = { i: this.id('i'), L, pre: [], post: [], elemScalars: new Map(), withAdj };
    this.rowLines.set(ctx, []);
    return ctx;
  }

  /** Take the forward lines accumulated for this row context. */
  flushRow(ctx: RowCtx): string[] {
    const l = this.rowLines.get(ctx) ?? [];
    this.rowLines.set(ctx, []);
    return l;
  }

  emit(ctx: RowCtx, line: string) {
    this.rowLines.get(ctx)!.push(line);
  }

  /** Elementwise code for element ctx.i of a vector expression (or a scalar used in a loop). */
  elem(e: Expr, ctx: RowCtx & { withAdj?: boolean }): Loc {
    const t = e.type!;
    const withAdj = this.grad && !!ctx.withAdj;
    if (t.dep < 2) {
      const c = this.constant(e);
      if (c.k === 'cs') return { val: lit(c.v), param: false, back: NOBACK };
      if (c.k === 'cv') {
        const x = this.id('x');
        this.emit(ctx, `const ${x} = ${c.arr}[${ctx.i}];`);
        return { val: x, param: false, back: NOBACK };
      }
      throw new LangError(e.span, 'internal: matrix in elementwise position');
    }
    if (t.shape.length === 0) {
      const r = this.outer(e) as Extract<ORef, { k: 's' }>;
      return { val: r.v, param: true, back: (adj) => (withAdj ? [`${r.a} += ${adj};`] : []) };
    }
    switch (e.kind) {
      case 'name':
      case 'member': {
        const ref = e.ref!;
        if (ref.kind === 'let') return this.elem(ref.expr, ctx);
        if (ref.kind === 'unknown') {
          const x = this.id('x');
          this.emit(ctx, `const ${x} = theta[${ref.offset} + ${ctx.i}];`);
          return { val: x, param: true, back: (adj) => (withAdj ? [`grad[${ref.offset} + ${ctx.i}] += ${adj};`] : []) };
        }
        break;
      }
      case 'index': {
        const base = this.outer(e.base);
        const I = this.gatherIndex(e.index, e.base.type!.shape[0]);
        const g = this.id('g');
        const x = this.id('x');
        this.emit(ctx, `const ${g} = ${I}[${ctx.i}];`);
        this.emit(ctx, `const ${x} = ${CodeGen.valOf(base, g)};`);
        return { val: x, param: true, back: (adj) => (withAdj ? this.adj(base, adj, g) : []) };
      }
      case 'unary': {
        const a = this.elem(e.arg, ctx);
        const x = this.id('x');
        this.emit(ctx, `const ${x} = -${a.val};`);
        return { val: x, param: true, back: (adj) => this.backVia(a, `-(${adj})`) };
      }
      case 'binary': {
        if (e.op === '*' && e.left.type!.shape.length === 2) return this.matvec(e, ctx, withAdj);
        const l = this.elem(e.left, ctx);
        const r = this.elem(e.right, ctx);
        const x = this.id('x');
        if (e.op === '^') {
          if (!withAdj) {
            this.emit(ctx, `const ${x} = Math.pow(${l.val}, ${r.val});`);
            return { val: x, param: true, back: NOBACK };
          }
          const q = this.id('q');
          this.emit(ctx, `const ${x} = R.${mathFn('pow', true)}(${l.val}, ${r.val}, Q, 0);`);
          this.emit(ctx, `const ${q}0 = Q[0], ${q}1 = Q[1];`);
          return { val: x, param: true, back: (adj) => [...this.backVia(l, `${adj} * ${q}0`), ...this.backVia(r, `${adj} * ${q}1`)] };
        }
        this.emit(ctx, `const ${x} = ${l.val} ${e.op} ${r.val};`);
        return {
          val: x,
          param: true,
          back: (adj) => {
            switch (e.op) {
              case '+':
                return [...this.backVia(l, adj), ...this.backVia(r, adj)];
              case '-':
                return [...this.backVia(l, adj), ...this.backVia(r, `-(${adj})`)];
              case '*':
                return [...this.backVia(l, `${adj} * ${r.val}`), ...this.backVia(r, `${adj} * ${l.val}`)];
              default:
                return [...this.backVia(l, `${adj} / ${r.val}`), ...this.backVia(r, `-(${adj}) * ${x} / ${r.val}`)];
            }
          },
        };
      }
      case 'call': {
        if (e.fn === 'pow') {
          return this.elem({ kind: 'binary', op: '^', left: e.args[0], right: e.args[1], span: e.span, type: e.type }, ctx);
        }
        if (e.args.length === 1 && !densityInfo(e.fn) && e.fn !== 'cumsum' && e.fn !== 'diff') {
          const a = this.elem(e.args[0], ctx);
          const x = this.id('x');
          if (!withAdj) {
            this.emit(ctx, `const ${x} = ${this.mathValueExpr(e.fn, a.val)};`);
            return { val: x, param: true, back: NOBACK };
          }
          const q = this.id('q');
          if (e.fn === 'exp') {
            this.emit(ctx, `const ${x} = Math.exp(${a.val});`);
            return { val: x, param: true, back: (adj) => this.backVia(a, `${adj} * ${x}`) };
          }
          if (e.fn === 'log') {
            this.emit(ctx, `const ${x} = Math.log(${a.val});`);
            return { val: x, param: true, back: (adj) => this.backVia(a, `${adj} / ${a.val}`) };
          }
          if (e.fn === 'square') {
            this.emit(ctx, `const ${x} = ${a.val} * ${a.val};`);
            return { val: x, param: true, back: (adj) => this.backVia(a, `2 * ${adj} * ${a.val}`) };
          }
          this.emit(ctx, `const ${x} = R.${mathFn(e.fn, true)}(${a.val}, Q, 0);`);
          this.emit(ctx, `const ${q} = Q[0];`);
          return { val: x, param: true, back: (adj) => this.backVia(a, `${adj} * ${q}`) };
        }
        break;
      }
      default:
        break;
    }
    // Anything else (cumsum, diff, bracket lists): materialise outside the loop and read it.
    const r = this.outer(e);
    const x = this.id('x');
    this.emit(ctx, `const ${x} = ${CodeGen.valOf(r, ctx.i)};`);
    return { val: x, param: true, back: (adj) => (withAdj ? this.adj(r, adj, ctx.i) : []) };
  }

  /** Propagate an adjoint expression to a child (binding it to a local first). */
  backVia(child: Loc, adj: string): string[] {
    if (!child.param || !this.grad) return [];
    const b = this.id('b');
    return [`const ${b} = ${adj};`, ...child.back(b)];
  }

  private matvec(e: Extract<Expr, { kind: 'binary' }>, ctx: RowCtx, withAdj: boolean): Loc {
    const M = this.constant(e.left);
    if (M.k !== 'cm') throw new LangError(e.left.span, 'internal: expected a data matrix');
    const K = M.cols;
    const vref = this.outer(e.right);
    const x = this.id('x');
    const r = this.id('r');
    this.emit(ctx, `const ${r} = ${ctx.i} * ${K};`);
    if (!this.isParam(vref)) throw new LangError(e.span, 'internal: constant matrix product should be folded');
    if (K <= 64) {
      const key = CodeGen.valOf(vref, 0);
      let es = ctx.elemScalars.get(key);
      if (!es) {
        const xs: string[] = [];
        const ys: string[] = [];
        for (let j = 0; j < K; j++) {
          const xn = this.id('e');
          xs.push(xn);
          ctx.pre.push(`const ${xn} = ${CodeGen.valOf(vref, j)};`);
          if (withAdj) {
            const yn = this.id('y');
            ys.push(yn);
            ctx.pre.push(`let ${yn} = 0;`);
            ctx.post.push(...this.adj(vref, yn, j));
          }
        }
        es = { x: xs, y: ys };
        ctx.elemScalars.set(key, es);
      }
      const terms = es.x.map((xn, j) => `${M.arr}[${r} + ${j}] * ${xn}`);
      this.emit(ctx, `const ${x} = ${terms.join(' + ')};`);
      const ys = es.y;
      return {
        val: x,
        param: true,
        back: (adj) => (withAdj ? ys.map((yn, j) => `${yn} += ${adj} * ${M.arr}[${r} + ${j}];`) : []),
      };
    }
    const j = this.id('j');
    this.emit(ctx, `let ${x} = 0;`);
    this.emit(ctx, `for (let ${j} = 0; ${j} < ${K}; ${j}++) ${x} += ${M.arr}[${r} + ${j}] * ${CodeGen.valOf(vref, j)};`);
    return {
      val: x,
      param: true,
      back: (adj) => (withAdj ? [`for (let ${j} = 0; ${j} < ${K}; ${j}++) {`, ...this.adj(vref, `${adj} * ${M.arr}[${r} + ${j}]`, j), '}'] : []),
    };
  }

  /**
   * One row of a reduction (sum/mean over a vector, or a vectorised density): forward lines, the
   * row's value, and the reverse lines given the reduction's adjoint (seed).
   */
  rowReduction(e: Extract<Expr, { kind: 'call' }>, ctx: RowCtx & { withAdj: boolean }, withAdj: boolean): { lines: string[]; val: string; back: (seed: string) => string[] } {
    if (e.fn === 'sum' || e.fn === 'mean') {
      const a = this.elem(e.args[0], ctx);
      const lines = this.flushRow(ctx);
      return { lines, val: a.val, back: (seed) => this.backVia(a, seed) };
    }
    if (e.fn === 'dot') return this.rowReduction(dotAsSum(e), ctx, withAdj);
    const info = densityInfo(e.fn);
    if (!info || info.kind !== 'scalar') throw new LangError(e.span, 'internal: not a row reduction');
    const args = e.args.map((a) => this.elem(a, ctx));
    const x = this.id('d');
    const anyParam = args.some((a) => a.param);
    if (e.fn === 'ld_normal' && e.args[2].type!.shape.length === 0) {
      // Normal kernel inlined when the scale is the same for every row: log σ and 1/σ are hoisted
      // out of the loop. Same formula as the density library's normalLpdf (σ ≤ 0 gives NaN).
      const sg = args[2].val;
      const ls = this.id('ls');
      const inv = this.id('iv');
      ctx.pre.push(`const ${ls} = ${sg} > 0 && ${sg} < INF_ ? Math.log(${sg}) + ${lit(0.5 * Math.log(2 * Math.PI))} : NAN_;`, `const ${inv} = 1 / ${sg};`);
      const z = this.id('z');
      this.emit(ctx, `const ${z} = (${args[0].val} - ${args[1].val}) * ${inv};`);
      this.emit(ctx, `const ${x} = -0.5 * ${z} * ${z} - ${ls};`);
      const wantGrad = withAdj && this.grad && anyParam;
      const q = this.id('q');
      if (wantGrad && (args[0].param || args[1].param)) this.emit(ctx, `const ${q}m = ${z} * ${inv};`);
      if (wantGrad && args[2].param) this.emit(ctx, `const ${q}s = (${z} * ${z} - 1) * ${inv};`);
      return {
        lines: this.flushRow(ctx),
        val: x,
        back: (seed) => {
          if (!wantGrad) return [];
          const mul = (v: string) => (seed === '1' ? v : `${seed} * ${v}`);
          return [
            ...(args[0].param ? this.backVia(args[0], `-${mul(`${q}m`)}`) : []),
            ...(args[1].param ? this.backVia(args[1], mul(`${q}m`)) : []),
            ...(args[2].param ? this.backVia(args[2], mul(`${q}s`)) : []),
          ];
        },
      };
    }
    if (!withAdj || !this.grad || !anyParam) {
      this.emit(ctx, `const ${x} = R.${densityFn(e.fn, false)}(${args.map((a) => a.val).join(', ')});`);
      return { lines: this.flushRow(ctx), val: x, back: () => [] };
    }
    this.emit(ctx, `const ${x} = R.${densityFn(e.fn, true)}(${args.map((a) => a.val).join(', ')}, Q, 0);`);
    const q = this.id('q');
    const reads: string[] = [];
    args.forEach((a, k) => {
      if (a.param) reads.push(`${q}${k} = Q[${k}]`);
    });
    if (reads.length) this.emit(ctx, `const ${reads.join(', ')};`);
    return {
      lines: this.flushRow(ctx),
      val: x,
      back: (seed) => {
        const out: string[] = [];
        args.forEach((a, k) => {
          if (a.param) out.push(...this.backVia(a, seed === '1' ? `${q}${k}` : `${seed} * ${q}${k}`));
        });
        return out;
      },
    };
  }
}

/** dot(a, b) as sum(a * b). */
function dotAsSum(e: Extract<Expr, { kind: 'call' }>): Extract<Expr, { kind: 'call' }> {
  const [a, b] = e.args;
  const prodType = { shape: a.type!.shape, dep: Math.max(a.type!.dep, b.type!.dep) as 0 | 1 | 2, integer: false };
  return {
    kind: 'call',
    fn: 'sum',
    fnSpan: e.fnSpan,
    span: e.span,
    args: [{ kind: 'binary', op: '*', left: a, right: b, span: e.span, type: prodType }],
    type: e.type,
  };
}

/** Length of the vector a reduction runs over (0 when every argument is scalar). */
export function reductionLength(e: Extract<Expr, { kind: 'call' }>): number {
  let L = 0;
  for (const a of e.args) if (a.type!.shape.length === 1) L = a.type!.shape[0];
  return L;
}

/** Split a term into weighted pieces: Σ coef · piece. */
export function splitTerm(e: Expr, coef: number, out: { coef: number; expr: Expr }[], constValue: (x: Expr) => number) {
  if (e.kind === 'binary' && (e.op === '+' || e.op === '-')) {
    splitTerm(e.left, coef, out, constValue);
    splitTerm(e.right, e.op === '+' ? coef : -coef, out, constValue);
    return;
  }
  if (e.kind === 'unary') {
    splitTerm(e.arg, -coef, out, constValue);
    return;
  }
  if (e.kind === 'binary' && e.op === '*' && e.left.type!.dep === 0 && e.left.type!.shape.length === 0 && e.right.type!.shape.length === 0) {
    splitTerm(e.right, coef * constValue(e.left), out, constValue);
    return;
  }
  if (e.kind === 'binary' && (e.op === '*' || e.op === '/') && e.right.type!.dep === 0 && e.right.type!.shape.length === 0 && e.left.type!.shape.length === 0) {
    const c = constValue(e.right);
    splitTerm(e.left, e.op === '*' ? coef * c : coef / c, out, constValue);
    return;
  }
  if (e.kind === 'name' && e.ref?.kind === 'let' && e.ref.expr.type!.shape.length === 0) {
    splitTerm(e.ref.expr, coef, out, constValue);
    return;
  }
  out.push({ coef, expr: e });
}

/** Is this piece a row reduction that can join a fused loop? */
export function isRowReduction(e: Expr): e is Extract<Expr, { kind: 'call' }> {
  if (e.kind !== 'call' || e.type!.dep < 2) return false;
  if (e.fn === 'sum' || e.fn === 'mean' || e.fn === 'dot') return reductionLength(e) > 0;
  const info = densityInfo(e.fn);
  return !!info && info.kind === 'scalar' && reductionLength(e) > 0;
}

export type { Program };
