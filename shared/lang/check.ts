/**
 * The checker: symbol table, name resolution, shape inference with broadcasting and integer
 * gathers, per-statement rules, and the summary used by the editor, the API and the compiler.
 * All lookups on user text go through Maps.
 */
import type {
  DataSchema,
  Dep,
  DerivedInfo,
  Expr,
  ExprType,
  LangMessage,
  NameRef,
  Program,
  ReplicateInfo,
  Shape,
  Span,
  Statement,
  UnknownInfo,
} from './ast';
import { extractConstraintsFrom, type LinearRows } from './affine';
import { evaluateValue, isMat } from './evaluate';
import { FUNCTIONS, KEYWORD_NAMES, RETIRED_FUNCTIONS, replacementCall } from './functions';
import { LangError, parseLine } from './parse';
import { closest } from './suggest';

/** A name the editor can offer for completion. */
export interface SymbolInfo {
  name: string;
  kind: 'unknown' | 'const' | 'let' | 'derive' | 'replicate' | 'table' | 'column';
  /** For columns: the table they belong to. */
  table?: string;
  shape: Shape;
  /** One line for the completion popup, e.g. "unknown, vector of 6" or "category column of trial (3 levels)". */
  detail: string;
  /** Line of the declaration (not for columns). */
  line?: number;
}

export interface CheckResult {
  /** Names declared or bound by the program (including columns of bound tables), for completion. */
  symbols: SymbolInfo[];
  ok: boolean;
  messages: LangMessage[];
  unknowns: UnknownInfo[];
  /** Total number of flat coordinates. */
  dim: number;
  /** Flat coordinate names: "sigma", "mu[3]". */
  names: string[];
  derived: DerivedInfo[];
  /** Flat names of the derived quantities. */
  derivedNames: string[];
  /** `replicate` statements in program order (simulated data, not summarised with the draws). */
  replicates: ReplicateInfo[];
  constraintCounts: { inequalities: number; equalities: number };
  /** Tables bound by `table` lines. */
  tables: string[];
  /** The typed tree (statements with resolved names and types). */
  program: Program;
  /** Whether some constraint coefficient needs data values (then `constraints` is absent). */
  constraintsNeedData: boolean;
  /** (A, b) and (E, e) when the constraints only involve constants. */
  constraints?: { inequalities: LinearRows; equalities: LinearRows };
  /** The schema the program was checked against. */
  schema: DataSchema;
}

type Sym =
  | { kind: 'unknown'; ref: Extract<NameRef, { kind: 'unknown' }>; line: number }
  | { kind: 'const'; ref: Extract<NameRef, { kind: 'const' }>; line: number; type: ExprType }
  | { kind: 'let'; ref: Extract<NameRef, { kind: 'let' }>; line: number; type: ExprType }
  | { kind: 'derive'; line: number }
  | { kind: 'replicate'; line: number };

const SCALAR: Shape = [];

function fmtShape(s: Shape): string {
  if (s.length === 0) return 'a single number';
  if (s.length === 1) return `a vector of ${s[0]}`;
  return `a ${s[0]}×${s[1]} matrix`;
}

function maxDep(...ds: Dep[]): Dep {
  return Math.max(0, ...ds) as Dep;
}

export function flatNames(name: string, shape: Shape): string[] {
  if (shape.length === 0) return [name];
  const out: string[] = [];
  for (let i = 1; i <= shape[0]; i++) out.push(`${name}[${i}]`);
  return out;
}

class Checker {
  messages: LangMessage[] = [];
  syms = new Map<string, Sym>();
  /** Bare column name → tables that have it (bound tables only). */
  bareColumns = new Map<string, string[]>();
  bound: string[] = [];
  boundSet = new Set<string>();
  unknowns: UnknownInfo[] = [];
  derived: DerivedInfo[] = [];
  replicates: ReplicateInfo[] = [];
  offset = 0;
  /** Names declared anywhere (for "declared later" messages). */
  laterDecl = new Map<string, number>();
  /** Names whose declaring line had an error, with that line (their uses say so, not "unknown name"). */
  failedDecl = new Map<string, number>();
  schemaTables = new Map<string, DataSchema[string]>();
  line = 0;

  constructor(public schema: DataSchema) {
    for (const k of Object.keys(schema)) this.schemaTables.set(k, schema[k]);
  }

  columnsOf(table: string): Map<string, DataSchema[string]['columns'][string]> {
    const t = this.schemaTables.get(table);
    const m = new Map<string, DataSchema[string]['columns'][string]>();
    if (t) for (const c of Object.keys(t.columns)) m.set(c, t.columns[c]);
    return m;
  }

  msg(line: number, span: Span, message: string, suggestion?: string, severity: 'error' | 'warning' = 'error') {
    const column = span.start + 1;
    const endColumn = Math.max(span.end + 1, column + 1);
    const m: LangMessage = { line, column, endColumn, severity, message };
    if (suggestion) m.suggestion = suggestion;
    this.messages.push(m);
  }

  allNames(): string[] {
    return [...this.syms.keys(), ...this.bareColumns.keys()];
  }

  /* ---------------------------------------------------------------- expressions */

  typeOf(e: Expr): ExprType {
    const t = this.infer(e);
    e.type = t;
    return t;
  }

  resolveName(e: Extract<Expr, { kind: 'name' }>): ExprType {
    const name = e.name;
    const sym = this.syms.get(name);
    if (sym) {
      if (sym.kind === 'unknown') {
        e.ref = sym.ref;
        return { shape: sym.ref.shape, dep: 2, integer: false };
      }
      if (sym.kind === 'const' || sym.kind === 'let') {
        e.ref = sym.ref;
        return sym.type;
      }
      if (sym.kind === 'replicate')
        throw new LangError(e.span, `\`${name}\` is replicated data; it is an output of the fit and cannot be used in other lines`);
      throw new LangError(e.span, `\`${name}\` is a derived quantity; derived quantities cannot be used in other lines (name the expression with let instead)`);
    }
    const tables = this.bareColumns.get(name);
    if (tables && tables.length === 1) {
      return this.columnType(e, tables[0], name);
    }
    if (tables && tables.length > 1) {
      throw new LangError(e.span, `\`${name}\` is a column of several tables (${tables.join(', ')}); write table.column`, `${tables[0]}.${name}`);
    }
    if (FUNCTIONS.has(name)) throw new LangError(e.span, `\`${name}\` is a function; call it with arguments, as in ${name}(…)`);
    if (KEYWORD_NAMES.has(name)) throw new LangError(e.span, `\`${name}\` is a keyword and cannot be used as a value`);
    if (this.boundSet.has(name) || this.schemaTables.has(name))
      throw new LangError(e.span, `\`${name}\` is a table; use one of its columns, as in ${name}.column`);
    const failed = this.failedDecl.get(name);
    if (failed !== undefined && failed < this.line)
      throw new LangError(e.span, `\`${name}\` is not declared: its line ${failed} has an error; fix that line first`);
    const later = this.laterDecl.get(name);
    if (later !== undefined && later >= this.line)
      throw new LangError(e.span, `\`${name}\` is used before it is declared on line ${later}; declare names on earlier lines`);
    // A column of a table in the schema that was not bound.
    for (const [tname] of this.schemaTables) {
      if (this.columnsOf(tname).has(name) && !this.boundSet.has(tname))
        throw new LangError(e.span, `\`${name}\` is a column of table \`${tname}\`, which is not bound`, `add the line: table ${tname}`);
    }
    const near = closest(name, this.allNames());
    throw new LangError(e.span, `unknown name \`${name}\``, near ? `did you mean \`${near}\`?` : undefined);
  }

  columnType(e: Extract<Expr, { kind: 'name' | 'member' }>, table: string, column: string): ExprType {
    const t = this.schemaTables.get(table)!;
    const col = this.columnsOf(table).get(column)!;
    e.ref = { kind: 'column', table, column, ctype: col.type, levels: col.levels };
    const ty: ExprType = { shape: [t.rows], dep: 1, integer: col.type !== 'numeric' };
    if (col.type === 'category' && col.levels !== undefined) ty.maxCode = col.levels;
    return ty;
  }

  infer(e: Expr): ExprType {
    switch (e.kind) {
      case 'num':
        if (!Number.isFinite(e.value)) throw new LangError(e.span, 'this number is too large');
        return { shape: SCALAR, dep: 0, integer: Number.isInteger(e.value) };
      case 'name':
        return this.resolveName(e);
      case 'member': {
        if (!this.schemaTables.has(e.table)) {
          const near = closest(e.table, this.schemaTables.keys());
          throw new LangError({ start: e.span.start, end: e.span.start + e.table.length }, `there is no table \`${e.table}\``, near ? `did you mean \`${near}\`?` : undefined);
        }
        if (!this.boundSet.has(e.table))
          throw new LangError(e.span, `table \`${e.table}\` is not bound`, `add the line: table ${e.table}`);
        const cols = this.columnsOf(e.table);
        if (!cols.has(e.column)) {
          const near = closest(e.column, cols.keys());
          throw new LangError(
            { start: e.span.end - e.column.length, end: e.span.end },
            `table \`${e.table}\` has no column \`${e.column}\``,
            near ? `did you mean \`${near}\`?` : undefined,
          );
        }
        return this.columnType(e, e.table, e.column);
      }
      case 'index': {
        const b = this.typeOf(e.base);
        const ix = this.typeOf(e.index);
        if (b.shape.length !== 1) throw new LangError(e.base.span, `only a vector can be indexed; this is ${fmtShape(b.shape)}`);
        if (ix.dep === 2) throw new LangError(e.index.span, 'an index cannot depend on the unknowns');
        if (!ix.integer) throw new LangError(e.index.span, 'an index must be a whole number or an integer or category column');
        if (ix.shape.length === 2) throw new LangError(e.index.span, 'a matrix cannot be used as an index');
        const len = b.shape[0];
        if (ix.shape.length === 0 && ix.dep === 0) {
          const v = evaluateValue(e.index, undefined) as number;
          if (v < 1 || v > len) throw new LangError(e.index.span, `index ${v} is outside 1…${len} (indices start at 1)`);
        }
        if (ix.maxCode !== undefined && ix.maxCode > len)
          throw new LangError(e.index.span, `this category has ${ix.maxCode} levels but the vector has only ${len} elements`);
        if (ix.shape.length === 1 && ix.dep === 0) {
          const v = evaluateValue(e.index, undefined) as Float64Array;
          for (const k of v) if (k < 1 || k > len) throw new LangError(e.index.span, `index ${k} is outside 1…${len} (indices start at 1)`);
        }
        return { shape: ix.shape.length === 0 ? SCALAR : [ix.shape[0]], dep: maxDep(b.dep, ix.dep), integer: b.integer };
      }
      case 'unary': {
        const a = this.typeOf(e.arg);
        if (a.shape.length === 2) throw new LangError(e.span, 'a data matrix can only be multiplied by a vector');
        return { shape: a.shape, dep: a.dep, integer: a.integer };
      }
      case 'binary': {
        const a = this.typeOf(e.left);
        const b = this.typeOf(e.right);
        if (e.op === '*' && a.shape.length === 2) {
          if (b.shape.length !== 1 || b.shape[0] !== a.shape[1])
            throw new LangError(e.span, `a ${a.shape[0]}×${a.shape[1]} matrix can only be multiplied by a vector of ${a.shape[1]}; this is ${fmtShape(b.shape)}`);
          return { shape: [a.shape[0]], dep: maxDep(a.dep, b.dep), integer: false };
        }
        if (a.shape.length === 2 || b.shape.length === 2)
          throw new LangError(e.span, 'a data matrix can only appear as matrix * vector');
        const shape = this.broadcast(a.shape, b.shape, e.left, e.right, e.span);
        return {
          shape,
          dep: maxDep(a.dep, b.dep),
          integer: a.integer && b.integer && e.op !== '/' && e.op !== '^',
        };
      }
      case 'array': {
        const ts = e.items.map((x) => this.typeOf(x));
        if (ts.every((t) => t.shape.length === 0)) {
          return { shape: [ts.length], dep: maxDep(...ts.map((t) => t.dep)), integer: ts.every((t) => t.integer) };
        }
        const first = ts[0].shape;
        for (let k = 0; k < ts.length; k++) {
          if (ts[k].shape.length !== 1 || ts[k].shape[0] !== first[0] || first.length !== 1)
            throw new LangError(e.items[k].span, 'a bracket list holds either single numbers (a vector) or columns of equal length (a matrix)');
          if (ts[k].dep === 2) throw new LangError(e.items[k].span, 'a matrix can only be built from data columns and constants');
        }
        return { shape: [first[0], ts.length], dep: maxDep(...ts.map((t) => t.dep)), integer: false };
      }
      case 'compare':
        throw new LangError(e.span, 'a comparison only belongs at the top of a constrain line');
      case 'call':
        return this.inferCall(e);
    }
  }

  broadcast(a: Shape, b: Shape, ea: Expr, eb: Expr, span: Span): Shape {
    if (a.length === 0) return b;
    if (b.length === 0) return a;
    if (a[0] !== b[0])
      throw new LangError(span, `lengths do not match: \`${this.text(ea)}\` has ${a[0]} elements and \`${this.text(eb)}\` has ${b[0]}`);
    return a;
  }

  currentText = '';
  text(e: Expr): string {
    const s = this.currentText.slice(e.span.start, e.span.end);
    return s.length > 40 ? s.slice(0, 37) + '…' : s;
  }

  inferCall(e: Extract<Expr, { kind: 'call' }>): ExprType {
    const f = FUNCTIONS.get(e.fn);
    const retired = f ? undefined : RETIRED_FUNCTIONS.get(e.fn);
    if (retired) {
      const spelled = replacementCall(retired, e.args.map((a) => this.currentText.slice(a.span.start, a.span.end)));
      throw new LangError(
        e.span,
        `\`${e.fn}\` is not a function of this language; write the link as a function of its own: \`${spelled}\` (computed just as stably)`,
        `did you mean \`${spelled}\`?`,
      );
    }
    if (!f) {
      if (this.syms.has(e.fn) || this.bareColumns.has(e.fn))
        throw new LangError(e.fnSpan, `\`${e.fn}\` is not a function; use [ ] to pick elements, as in ${e.fn}[1]`);
      const near = closest(e.fn, FUNCTIONS.keys());
      throw new LangError(e.fnSpan, `unknown function \`${e.fn}\``, near ? `did you mean \`${near}\`?` : undefined);
    }
    if (e.args.length !== f.params.length) {
      throw new LangError(
        e.span,
        `\`${e.fn}\` takes ${f.params.length} argument${f.params.length === 1 ? '' : 's'} (${f.params.map((p) => p.name).join(', ')}); found ${e.args.length}`,
        `write ${f.signature.split(' →')[0]}`,
      );
    }
    const ts = e.args.map((a) => this.typeOf(a));
    ts.forEach((t, k) => {
      if (t.shape.length === 2) throw new LangError(e.args[k].span, `\`${e.fn}\` does not take a matrix; multiply it by a vector first`);
      if (f.params[k].discrete && t.dep === 2)
        throw new LangError(e.args[k].span, `the argument \`${f.params[k].name}\` of \`${e.fn}\` is a count or outcome and must be data or a constant, not an unknown`);
    });
    const dep = maxDep(...ts.map((t) => t.dep));
    switch (f.kind) {
      case 'elementwise':
        return { shape: ts[0].shape, dep, integer: false };
      case 'elementwise2':
        return { shape: this.broadcast(ts[0].shape, ts[1].shape, e.args[0], e.args[1], e.span), dep, integer: false };
      case 'reduce':
        return { shape: SCALAR, dep, integer: false };
      case 'dot':
        if (ts[0].shape.length !== 1 || ts[1].shape.length !== 1 || ts[0].shape[0] !== ts[1].shape[0])
          throw new LangError(e.span, `dot needs two vectors of equal length; found ${fmtShape(ts[0].shape)} and ${fmtShape(ts[1].shape)}`);
        return { shape: SCALAR, dep, integer: false };
      case 'scan':
        if (ts[0].shape.length !== 1) throw new LangError(e.args[0].span, `${e.fn} needs a vector`);
        return { shape: ts[0].shape, dep, integer: false };
      case 'diff':
        if (ts[0].shape.length !== 1 || ts[0].shape[0] < 2) throw new LangError(e.args[0].span, 'diff needs a vector of at least 2 elements');
        return { shape: [ts[0].shape[0] - 1], dep, integer: false };
      case 'density': {
        let shape: Shape = SCALAR;
        for (let k = 0; k < ts.length; k++) {
          if (shape.length === 1 && ts[k].shape.length === 1 && shape[0] !== ts[k].shape[0])
            throw new LangError(e.args[k].span, `lengths do not match: \`${this.text(e.args[k])}\` has ${ts[k].shape[0]} elements, earlier arguments have ${shape[0]}`);
          if (ts[k].shape.length === 1) shape = ts[k].shape;
        }
        return { shape: SCALAR, dep, integer: false };
      }
      case 'density_vector': {
        if (ts[0].shape.length !== 1) throw new LangError(e.args[0].span, `the first argument of ${e.fn} must be a vector`);
        const K = ts[0].shape[0];
        if (e.fn === 'ld_multinomial' && (ts[1].shape.length !== 1 || ts[1].shape[0] !== K))
          throw new LangError(e.args[1].span, `p must be a vector of ${K} probabilities`);
        if (ts[1].shape.length === 1 && ts[1].shape[0] !== K)
          throw new LangError(e.args[1].span, `lengths do not match: ${K} and ${ts[1].shape[0]}`);
        return { shape: SCALAR, dep, integer: false };
      }
    }
  }

  /**
   * Every name on a line that cannot be resolved (unknown names, columns, tables, functions), each
   * with its own message. Name resolution does not depend on the rest of the line, so these are
   * independent problems: after the first error of a line, the others are still reported.
   */
  nameProblems(s: Statement): LangError[] {
    const out: LangError[] = [];
    const attempt = (f: () => unknown) => {
      try {
        f();
      } catch (err) {
        if (err instanceof LangError) out.push(err);
        else throw err;
      }
    };
    const walk = (e: Expr): void => {
      switch (e.kind) {
        case 'num':
          return;
        case 'name':
          return attempt(() => this.resolveName(e));
        case 'member':
          return attempt(() => this.infer(e));
        case 'index':
          walk(e.base);
          return walk(e.index);
        case 'unary':
          return walk(e.arg);
        case 'binary':
          walk(e.left);
          return walk(e.right);
        case 'compare':
          return e.operands.forEach(walk);
        case 'array':
          return e.items.forEach(walk);
        case 'call':
          if (!FUNCTIONS.has(e.fn)) {
            attempt(() => this.inferCall(e));
          }
          return e.args.forEach(walk);
      }
    };
    switch (s.kind) {
      case 'table':
        break;
      case 'unknown':
        for (const d of s.decls) if (d.lengthName !== undefined) attempt(() => this.constLength(d.lengthName!, d.lengthSpan!));
        break;
      default:
        walk(s.expr);
    }
    return out;
  }

  /* ---------------------------------------------------------------- statements */

  /**
   * `replicate NAME = ld_f(observed, p1, …)`: the density call of a likelihood term; every draw
   * simulates a new value of `observed` (same length) from that density with the draw's p1, ….
   */
  replicate(s: Extract<Statement, { kind: 'replicate' }>) {
    const e = s.expr;
    const f = FUNCTIONS.get(e.fn);
    if (!f || f.kind !== 'density') {
      const what = f?.kind === 'density_vector' ? `\`${e.fn}\` takes whole vectors and cannot be replicated` : `\`${e.fn}\` is not a density`;
      throw new LangError(e.fnSpan, `${what}; a replicate line uses one of the ld_ functions of a single observation`, 'for example: replicate kg_new = ld_normal(kg, mu, sigma)');
    }
    this.typeOf(e);
    const obs = e.args[0].type!;
    if (obs.dep === 2)
      throw new LangError(e.args[0].span, `the first argument is the observed data being replicated; it cannot depend on the unknowns`);
    let shape: Shape = SCALAR;
    for (const a of e.args) if (a.type!.shape.length === 1) shape = a.type!.shape;
    if (e.args.every((a) => a.type!.dep < 2))
      this.msg(s.line, e.span, 'no argument depends on an unknown: every draw simulates from the same fixed density', undefined, 'warning');
    this.declare(s.name, s.nameSpan, s.line, { kind: 'replicate', line: s.line });
    this.replicates.push({ name: s.name, shape, density: e.fn, line: s.line });
  }

  /** The value of a named whole-number constant used as a vector length. */
  constLength(name: string, span: Span): number {
    const sym = this.syms.get(name);
    if (!sym || sym.kind !== 'const') {
      const consts = [...this.syms].filter(([, v]) => v.kind === 'const').map(([k]) => k);
      const near = closest(name, consts);
      throw new LangError(span, `\`${name}\` is not a named constant; a length is a whole number or a const declared earlier`, near ? `did you mean \`${near}\`?` : undefined);
    }
    const v = sym.ref.value;
    if (typeof v !== 'number' || !Number.isInteger(v) || v < 1 || v > 100000)
      throw new LangError(span, `\`${name}\` must be a whole number between 1 and 100000 to be used as a length`);
    return v;
  }

  declare(name: string, span: Span, line: number, sym: Sym) {
    if (KEYWORD_NAMES.has(name)) throw new LangError(span, `\`${name}\` is a keyword and cannot be used as a name`);
    if (FUNCTIONS.has(name)) throw new LangError(span, `\`${name}\` is a function name and cannot be redeclared`);
    const prev = this.syms.get(name);
    if (prev) throw new LangError(span, `\`${name}\` is already declared on line ${prev.line}`);
    if (this.boundSet.has(name)) throw new LangError(span, `\`${name}\` is the name of a bound table`);
    const cols = this.bareColumns.get(name);
    if (cols)
      this.msg(line, span, `\`${name}\` hides the column ${name} of table ${cols[0]}; write ${cols[0]}.${name} to use the column`, undefined, 'warning');
    this.syms.set(name, sym);
  }

  statement(s: Statement) {
    this.line = s.line;
    this.currentText = s.text;
    switch (s.kind) {
      case 'table': {
        if (!this.schemaTables.has(s.name)) {
          const near = closest(s.name, this.schemaTables.keys());
          const have = [...this.schemaTables.keys()];
          throw new LangError(
            s.nameSpan,
            `there is no table \`${s.name}\`` + (have.length ? '' : ' (no data has been uploaded yet)'),
            near ? `did you mean \`${near}\`?` : undefined,
          );
        }
        if (this.boundSet.has(s.name)) throw new LangError(s.nameSpan, `table \`${s.name}\` is already bound`);
        if (this.syms.has(s.name)) throw new LangError(s.nameSpan, `\`${s.name}\` is already a declared name`);
        this.boundSet.add(s.name);
        this.bound.push(s.name);
        for (const c of this.columnsOf(s.name).keys()) {
          const l = this.bareColumns.get(c);
          if (l) l.push(s.name);
          else this.bareColumns.set(c, [s.name]);
        }
        return;
      }
      case 'unknown':
        for (const d of s.decls) {
          if (d.lengthName !== undefined) d.length = this.constLength(d.lengthName, d.lengthSpan!);
          const shape: Shape = d.length === undefined ? SCALAR : [d.length];
          const size = d.length ?? 1;
          const ref = { kind: 'unknown' as const, name: d.name, offset: this.offset, size, shape };
          this.declare(d.name, d.span, s.line, { kind: 'unknown', ref, line: s.line });
          this.unknowns.push({ name: d.name, shape, size, offset: this.offset });
          this.offset += size;
        }
        return;
      case 'const': {
        const t = this.typeOf(s.expr);
        if (t.dep !== 0) throw new LangError(s.expr.span, 'a const must be made of numbers only (use let for expressions with data or unknowns)');
        if (t.shape.length === 2) throw new LangError(s.expr.span, 'a const is a number or a vector of numbers');
        const value = evaluateValue(s.expr, undefined);
        if (typeof value === 'object' && isMat(value)) throw new LangError(s.expr.span, 'a const is a number or a vector of numbers');
        const ref = { kind: 'const' as const, name: s.name, value };
        this.declare(s.name, s.nameSpan, s.line, { kind: 'const', ref, line: s.line, type: t });
        return;
      }
      case 'let': {
        const t = this.typeOf(s.expr);
        const ref = { kind: 'let' as const, name: s.name, expr: s.expr };
        this.declare(s.name, s.nameSpan, s.line, { kind: 'let', ref, line: s.line, type: t });
        return;
      }
      case 'term': {
        const t = this.typeOf(s.expr);
        if (t.shape.length !== 0)
          throw new LangError(s.expr.span, `a term must be a single number; this is ${fmtShape(t.shape)}`, 'wrap it in sum(…) or use an ld_ function');
        if (t.dep < 2)
          this.msg(s.line, s.expr.span, 'this term does not depend on any unknown; it only shifts the log-density by a constant', undefined, 'warning');
        return;
      }
      case 'constrain': {
        const e = s.expr;
        if (e.kind !== 'compare')
          throw new LangError(e.span, 'a constrain line needs a comparison: <=, <, >=, > or ==', 'for example: constrain sigma >= 0');
        const ts = e.operands.map((x) => this.typeOf(x));
        ts.forEach((t, k) => {
          if (t.shape.length === 2) throw new LangError(e.operands[k].span, 'a matrix cannot be compared; multiply it by a vector first');
        });
        for (let k = 0; k < e.ops.length; k++) this.broadcast(ts[k].shape, ts[k + 1].shape, e.operands[k], e.operands[k + 1], e.span);
        if (ts.every((t) => t.dep < 2)) throw new LangError(e.span, 'this constraint does not involve any unknown');
        e.type = { shape: SCALAR, dep: 2, integer: false };
        return;
      }
      case 'derive': {
        const t = this.typeOf(s.expr);
        if (t.shape.length === 2) throw new LangError(s.expr.span, 'a derived quantity is a number or a vector');
        this.declare(s.name, s.nameSpan, s.line, { kind: 'derive', line: s.line });
        this.derived.push({ name: s.name, shape: t.shape });
        return;
      }
      case 'replicate':
        this.replicate(s);
        return;
    }
  }
}

/** Names a statement declares. */
function declaredNames(s: Statement): string[] {
  return s.kind === 'unknown'
    ? s.decls.map((d) => d.name)
    : s.kind === 'const' || s.kind === 'let' || s.kind === 'derive' || s.kind === 'replicate'
      ? [s.name]
      : [];
}

/** Check a program against a data schema (column names, types and row counts). */
export function checkProgram(source: string, schema: DataSchema): CheckResult {
  const safeSchema: DataSchema = Object.create(null) as DataSchema;
  for (const k of Object.keys(schema ?? {})) safeSchema[k] = schema[k];
  const c = new Checker(safeSchema);
  const lines = String(source ?? '').split('\n');
  const statements: Statement[] = [];
  const parsed = lines.map((raw, i) => ({ line: i + 1, ...parseLine(raw, i + 1) }));
  for (const p of parsed) {
    const s = p.statement;
    if (!s) continue;
    for (const n of declaredNames(s)) if (!c.laterDecl.has(n)) c.laterDecl.set(n, s.line);
  }
  for (const p of parsed) {
    if (p.error) {
      c.msg(p.line, p.error.span, p.error.message, p.error.suggestion);
      continue;
    }
    if (!p.statement) continue;
    try {
      c.statement(p.statement);
      statements.push(p.statement);
    } catch (e) {
      if (e instanceof LangError) c.msg(p.line, e.span, e.message, e.suggestion);
      else c.msg(p.line, { start: 0, end: Math.max(1, p.statement.text.length) }, 'could not check this line');
      // The line's other names that cannot be resolved are independent problems: report them too.
      const first = e instanceof LangError ? e : undefined;
      let more: LangError[] = [];
      try {
        more = c.nameProblems(p.statement);
      } catch {
        more = [];
      }
      const seen = new Set(first ? [`${first.span.start}:${first.span.end}:${first.message}`] : []);
      for (const m of more) {
        const key = `${m.span.start}:${m.span.end}:${m.message}`;
        if (seen.has(key)) continue;
        seen.add(key);
        c.msg(p.line, m.span, m.message, m.suggestion);
      }
      for (const n of declaredNames(p.statement)) if (!c.syms.has(n) && !c.failedDecl.has(n)) c.failedDecl.set(n, p.line);
    }
  }
  const program: Program = { statements };
  const names = c.unknowns.flatMap((u) => flatNames(u.name, u.shape));
  const derivedNames = c.derived.flatMap((d) => flatNames(d.name, d.shape));
  let counts = { inequalities: 0, equalities: 0 };
  let constraints: CheckResult['constraints'];
  let needData = false;
  {
    const res = extractConstraintsFrom(program, c.offset, undefined, c.schema);
    for (const m of res.messages) c.messages.push(m);
    counts = { inequalities: res.inequalities.rows, equalities: res.equalities.rows };
    needData = res.needsData;
    if (!res.needsData && !c.messages.some((m) => m.severity === 'error')) constraints = { inequalities: res.inequalities, equalities: res.equalities };
  }
  if (c.unknowns.length === 0 && !c.messages.some((m) => m.severity === 'error') && statements.length > 0) {
    c.msg(statements[statements.length - 1].line, { start: 0, end: 1 }, 'the model declares no unknowns', 'add a line such as: unknown mu', 'warning');
  }
  c.messages.sort((a, b) => a.line - b.line || a.column - b.column);
  const symbols: SymbolInfo[] = [];
  const describe = (shape: Shape) => (shape.length === 0 ? 'number' : shape.length === 1 ? `vector of ${shape[0]}` : `${shape[0]}×${shape[1]} matrix`);
  for (const t of c.bound) {
    const tbl = c.schemaTables.get(t)!;
    symbols.push({ name: t, kind: 'table', shape: [], detail: `table, ${tbl.rows} rows` });
    for (const [col, info] of c.columnsOf(t)) {
      const lv = info.type === 'category' && info.levels !== undefined ? `, ${info.levels} levels` : '';
      symbols.push({ name: col, kind: 'column', table: t, shape: [tbl.rows], detail: `${info.type} column of ${t}${lv}` });
    }
  }
  for (const [name, sym] of c.syms) {
    if (sym.kind === 'unknown') symbols.push({ name, kind: 'unknown', shape: sym.ref.shape, detail: `unknown, ${describe(sym.ref.shape)}`, line: sym.line });
    else if (sym.kind === 'const') symbols.push({ name, kind: 'const', shape: sym.type.shape, detail: `const, ${describe(sym.type.shape)}`, line: sym.line });
    else if (sym.kind === 'let') symbols.push({ name, kind: 'let', shape: sym.type.shape, detail: `let, ${describe(sym.type.shape)}`, line: sym.line });
    else if (sym.kind === 'replicate') {
      const r = c.replicates.find((x) => x.name === name);
      symbols.push({ name, kind: 'replicate', shape: r?.shape ?? [], detail: 'replicated data (output only)', line: sym.line });
    }
    else {
      const d = c.derived.find((x) => x.name === name);
      symbols.push({ name, kind: 'derive', shape: d?.shape ?? [], detail: 'derived quantity (output only)', line: sym.line });
    }
  }
  return {
    symbols,
    ok: !c.messages.some((m) => m.severity === 'error'),
    messages: c.messages,
    unknowns: c.unknowns,
    dim: c.offset,
    names,
    derived: c.derived,
    derivedNames,
    replicates: c.replicates,
    constraintCounts: counts,
    tables: c.bound,
    program,
    constraintsNeedData: needData,
    constraints,
    schema: c.schema,
  };
}
