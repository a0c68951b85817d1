/**
 * The model compiler: program text + data → ModelTarget (log-density with gradient, constraints,
 * derived quantities). See ./codegen.ts for the structure of the generated code and ./fuse.ts for
 * the densities whose link function is fused into a stable kernel.
 */
import {
  checkProgram,
  extractConstraints,
  dataSchemaOf,
  type CheckResult,
  type DataSchema,
  type Expr,
  type LangMessage,
  LangError,
} from '../../../shared/lang/index';
import type { DataTables, DerivedQuantities, LinearSystem, ModelTarget } from '../types';
import { CodeGen, isRowReduction, lit, reductionLength, splitTerm } from './codegen';
import { fuseLinks } from './fuse';
import { RUNTIME } from './runtime';

export class CompileError extends Error {
  constructor(public messages: LangMessage[]) {
    super(
      messages
        .filter((m) => m.severity === 'error')
        .slice(0, 5)
        .map((m) => `line ${m.line}, column ${m.column}: ${m.message}`)
        .join('; ') || 'the model could not be compiled',
    );
    this.name = 'CompileError';
  }
}

export interface CompiledModel extends ModelTarget {
  /** Generated source of the log-density (for inspection and tests). */
  source: string;
  /** Generated source of the derived quantities, when there are any. */
  derivedSource?: string;
  check: CheckResult;
}


function messageAt(line: number, err: unknown): LangMessage {
  if (err instanceof LangError)
    return {
      line,
      column: err.span.start + 1,
      endColumn: Math.max(err.span.end + 1, err.span.start + 2),
      severity: 'error',
      message: err.message,
      ...(err.suggestion ? { suggestion: err.suggestion } : {}),
    };
  return { line, column: 1, endColumn: 2, severity: 'error', message: `could not compile this line (${err instanceof Error ? err.message.slice(0, 120) : 'error'})` };
}

/** Wrap generated body text into a factory: (R, C) => function. */
function build(gen: CodeGen, params: string, body: string[]): { fn: (...a: never[]) => unknown; source: string } {
  const closure = [...gen.closure, `const P = new Float64Array(${Math.max(1, gen.tapeSize)});`, `const Q = new Float64Array(${gen.scratch});`];
  const source = [
    '"use strict";',
    ...closure,
    `return function compiled(${params}) {`,
    ...body,
    '};',
  ].join('\n');
  const factory = new Function('R', 'C', source) as (r: unknown, c: unknown[]) => (...a: never[]) => unknown;
  return { fn: factory(RUNTIME, gen.consts), source };
}

function compileLogDensity(check: CheckResult, tables: DataTables): { fn: ModelTarget['logDensity']; source: string } {
  const gen = new CodeGen(tables, true);
  const constValue = (x: Expr) => gen.value(x) as number;
  let constant = 0;
  const outerPieces: { coef: number; ref: string; seedVar: string }[] = [];
  const rowPieces = new Map<number, { coef: number; expr: Extract<Expr, { kind: 'call' }> }[]>();
  const constPieces: { coef: number; expr: Expr }[] = [];
  const errors: LangMessage[] = [];
  for (const s of check.program.statements) {
    if (s.kind !== 'term') continue;
    try {
      const pieces: { coef: number; expr: Expr }[] = [];
      splitTerm(s.expr, 1, pieces, constValue);
      for (const p of pieces) {
        if (p.coef === 0) continue;
        if (p.expr.type!.dep < 2) {
          constPieces.push(p);
        } else if (isRowReduction(p.expr)) {
          const L = reductionLength(p.expr);
          const list = rowPieces.get(L) ?? [];
          list.push({ coef: p.coef, expr: p.expr });
          rowPieces.set(L, list);
          // Validate data-dependent parts now so errors carry this line.
          gen.line = s.line;
        } else {
          const r = gen.outer(p.expr);
          if (r.k !== 's') throw new LangError(p.expr.span, 'internal: a term piece must be a scalar');
          outerPieces.push({ coef: p.coef, ref: r.v, seedVar: r.a });
        }
      }
    } catch (e) {
      errors.push(messageAt(s.line, e));
    }
  }
  // Constant pieces (no unknowns): evaluated once here with a value-only function.
  if (constPieces.length) {
    const cg = new CodeGen(tables, false);
    const refs = constPieces.map((p) => ({ coef: p.coef, r: forceScalar(cg, p.expr) }));
    const body = [...cg.fwd, `return ${refs.map((x) => `${lit(x.coef)} * ${x.r}`).join(' + ')};`];
    const { fn } = build(cg, '', body);
    constant = (fn as () => number)();
  }
  // Fused row loops.
  const loops: string[] = [];
  for (const [L, pieces] of rowPieces) {
    const ctx = gen.rowCtx(L, true);
    const body: string[] = [];
    const accs: string[] = [];
    for (const p of pieces) {
      try {
        const rr = gen.rowReduction(p.expr, ctx, true);
        const acc = gen.id('s');
        accs.push(`let ${acc} = 0;`);
        const seed = p.expr.fn === 'mean' ? lit(p.coef / L) : lit(p.coef);
        body.push(...rr.lines, `${acc} += ${rr.val};`, ...rr.back(seed));
        loops.push(`lp += ${lit(p.expr.fn === 'mean' ? p.coef / L : p.coef)} * ${acc};`);
      } catch (e) {
        errors.push(messageAt(lineOf(check, p.expr), e));
      }
    }
    loops.unshift(...accs, ...ctx.pre, `for (let ${ctx.i} = 0; ${ctx.i} < ${L}; ${ctx.i}++) {`, ...body, '}', ...ctx.post);
  }
  if (errors.length) throw new CompileError(errors);
  const seeds = outerPieces.map((p) => `${p.seedVar} += ${lit(p.coef)};`);
  const value = outerPieces.map((p) => `${lit(p.coef)} * ${p.ref}`);
  const body = [
    'grad.fill(0);',
    ...gen.init,
    ...gen.fwd,
    `let lp = ${[lit(constant), ...value].join(' + ')};`,
    ...seeds,
    ...loops,
    ...gen.revBlocks
      .slice()
      .reverse()
      .flat(),
    'return lp === lp ? lp : NINF_;',
  ];
  const { fn, source } = build(gen, 'theta, grad', body);
  return { fn: fn as unknown as ModelTarget['logDensity'], source };
}

/** Find the line of the term that holds an expression (for messages). */
function lineOf(check: CheckResult, e: Expr): number {
  for (const s of check.program.statements) if (s.kind === 'term' && s.expr.span.start <= e.span.start && contains(s.expr, e)) return s.line;
  return 1;
}
function contains(root: Expr, e: Expr): boolean {
  if (root === e) return true;
  switch (root.kind) {
    case 'index':
      return contains(root.base, e) || contains(root.index, e);
    case 'call':
      return root.args.some((a) => contains(a, e));
    case 'unary':
      return contains(root.arg, e);
    case 'binary':
      return contains(root.left, e) || contains(root.right, e);
    case 'array':
      return root.items.some((a) => contains(a, e));
    case 'compare':
      return root.operands.some((a) => contains(a, e));
    case 'name':
      return root.ref?.kind === 'let' ? contains(root.ref.expr, e) : false;
    default:
      return false;
  }
}

/** A scalar value expression for any scalar expression (constants as literals). */
function forceScalar(gen: CodeGen, e: Expr): string {
  const r = e.type!.dep < 2 && e.kind === 'call' ? gen.outer({ ...e, type: { ...e.type!, dep: 2 } } as Expr) : gen.outer(e);
  return CodeGen.valOf(r, 0);
}

function compileDerived(check: CheckResult, tables: DataTables): { d: DerivedQuantities; source: string } | undefined {
  const derives = check.program.statements.filter((s): s is Extract<typeof s, { kind: 'derive' }> => s.kind === 'derive');
  if (!derives.length) return undefined;
  const gen = new CodeGen(tables, false);
  const outLines: string[] = [];
  let k = 0;
  const errors: LangMessage[] = [];
  for (const s of derives) {
    try {
      const e = s.expr;
      const shape = e.type!.shape;
      if (shape.length === 0) {
        outLines.push(`out[${k}] = ${forceScalar(gen, e)};`);
        k += 1;
      } else {
        const L = shape[0];
        const r = e.type!.dep < 2 ? gen.constant(e) : gen.outer(e);
        outLines.push(...gen.loopAlways(L, (j) => [`out[${k} + ${j}] = ${CodeGen.valOf(r, j)};`]));
        k += L;
      }
    } catch (err) {
      errors.push(messageAt(s.line, err));
    }
  }
  if (errors.length) throw new CompileError(errors);
  const { fn, source } = build(gen, 'theta, out', [...gen.fwd, ...outLines]);
  return { d: { names: check.derivedNames.slice(), evaluate: fn as unknown as DerivedQuantities['evaluate'] }, source };
}

function toSystem(r: { rows: number; cols: number; A: Float64Array; b: Float64Array; labels: string[] }): LinearSystem {
  return { rows: r.rows, cols: r.cols, A: r.A, b: r.b, labels: r.labels };
}

/** Compile an already checked program with its data. Throws CompileError. */
export function compileChecked(check: CheckResult, tables: DataTables): CompiledModel {
  if (!check.ok) throw new CompileError(check.messages);
  // The data must match the schema the program was checked against.
  const schema = dataSchemaOf(tables);
  for (const t of check.tables) {
    const want = check.schema[t];
    const have = Object.prototype.hasOwnProperty.call(schema, t) ? schema[t] : undefined;
    if (!have || have.rows !== want.rows)
      throw new CompileError([{ line: 1, column: 1, endColumn: 2, severity: 'error', message: `the data of table \`${t}\` does not match the checked program` }]);
  }
  const cons = extractConstraints(check, tables);
  if (cons.messages.length) throw new CompileError(cons.messages);
  // Densities written through their link (ld_binomial(k, n, logistic(η)), …) use fused kernels.
  const fused: CheckResult = { ...check, program: fuseLinks(check.program).program };
  const ld = compileLogDensity(fused, tables);
  const der = compileDerived(fused, tables);
  const model: CompiledModel = {
    dim: check.dim,
    names: check.names.slice(),
    logDensity: ld.fn,
    inequalities: toSystem(cons.inequalities),
    equalities: toSystem(cons.equalities),
    source: ld.source,
    check,
  };
  if (der) {
    model.derived = der.d;
    model.derivedSource = der.source;
  }
  return model;
}

/** Check and compile program text against data tables. Throws CompileError with the messages. */
export function compileProgram(source: string, tables: DataTables): CompiledModel {
  const check = checkProgram(source, dataSchemaOf(tables));
  return compileChecked(check, tables);
}

export { lit } from './codegen';
