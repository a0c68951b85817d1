/**
 * Compiled pieces for model checking, built from the same checked tree as the log-density:
 *
 *  - replicates: every `replicate` statement becomes code that, given a draw θ and a seeded stream,
 *    simulates a new copy of its observed data from its density (server/engine/predictive/generators);
 *  - pointwise log-likelihood: the likelihood terms (shared/lang/roles.ts) as a function
 *    θ → one log-likelihood value per data row;
 *  - prior-only programs: the checked program without its likelihood terms.
 *
 * Same code generator as the log-density (value-only mode): only generated identifiers, numeric
 * literals, the runtime object `R` and the generator object `G` (keys from the density table, never
 * from user text) appear in the generated source.
 */
import {
  checkProgram,
  dataSchemaOf,
  isLikelihoodTerm,
  type CheckResult,
  type Expr,
  type LangMessage,
  LangError,
} from '../../../shared/lang/index';
import type { DataTables } from '../types';
import type { Rng } from '../rng';
import { generatorsFor, REPLICABLE_DENSITIES, type Generator } from '../predictive/generators';
import { CodeGen, lit, reductionLength, splitTerm } from './codegen';
import { densityInfo, RUNTIME } from './runtime';
import { CompileError, compileChecked, type CompiledModel } from './index';

function buildFn(gen: CodeGen, params: string, body: string[]): { fn: (...a: never[]) => unknown; source: string } {
  const closure = [...gen.closure, `const P = new Float64Array(${Math.max(1, gen.tapeSize)});`, `const Q = new Float64Array(${gen.scratch});`];
  const source = ['"use strict";', ...closure, `return function compiled(${params}) {`, ...body, '};'].join('\n');
  const factory = new Function('R', 'C', source) as (r: unknown, c: unknown[]) => (...a: never[]) => unknown;
  return { fn: factory(RUNTIME, gen.consts), source };
}

function messageAt(line: number, err: unknown): LangMessage {
  if (err instanceof LangError)
    return { line, column: err.span.start + 1, endColumn: Math.max(err.span.end + 1, err.span.start + 2), severity: 'error', message: err.message };
  return { line, column: 1, endColumn: 2, severity: 'error', message: `could not compile this line (${err instanceof Error ? err.message.slice(0, 120) : 'error'})` };
}

/** Data columns an expression reads (following `let` names). */
export function columnsRead(e: Expr, out: { table: string; column: string; ctype: string; levels?: number }[] = []) {
  switch (e.kind) {
    case 'name':
    case 'member':
      if (e.ref?.kind === 'column') {
        const ref = e.ref;
        if (!out.some((c) => c.table === ref.table && c.column === ref.column))
          out.push({ table: ref.table, column: ref.column, ctype: ref.ctype, levels: ref.levels });
      } else if (e.ref?.kind === 'let') columnsRead(e.ref.expr, out);
      break;
    case 'index':
      columnsRead(e.base, out);
      columnsRead(e.index, out);
      break;
    case 'call':
      e.args.forEach((a) => columnsRead(a, out));
      break;
    case 'unary':
      columnsRead(e.arg, out);
      break;
    case 'binary':
      columnsRead(e.left, out);
      columnsRead(e.right, out);
      break;
    case 'array':
      e.items.forEach((a) => columnsRead(a, out));
      break;
    case 'compare':
      e.operands.forEach((a) => columnsRead(a, out));
      break;
    default:
      break;
  }
  return out;
}

/** Data columns used as an index somewhere in an expression (`field` in `mu[field]`). */
function indexColumns(e: Expr, out: { table: string; column: string; ctype: string; levels?: number }[] = []) {
  switch (e.kind) {
    case 'index':
      columnsRead(e.index, out);
      indexColumns(e.base, out);
      break;
    case 'name':
    case 'member':
      if (e.ref?.kind === 'let') indexColumns(e.ref.expr, out);
      break;
    case 'call':
      e.args.forEach((a) => indexColumns(a, out));
      break;
    case 'unary':
      indexColumns(e.arg, out);
      break;
    case 'binary':
      indexColumns(e.left, out);
      indexColumns(e.right, out);
      break;
    case 'array':
      e.items.forEach((a) => indexColumns(a, out));
      break;
    default:
      break;
  }
  return out;
}

/* ------------------------------------------------------------------------------------------ */
/* Replicated data                                                                             */
/* ------------------------------------------------------------------------------------------ */

/** Category columns with more levels than this are not used for per-group checks. */
export const MAX_GROUP_LEVELS = 50;

export interface ReplicateSpec {
  name: string;
  line: number;
  /** Language name of the density, e.g. "ld_normal". */
  density: string;
  /** Number of simulated values per draw (1 for a single number). */
  length: number;
  /** The observed data (the density's first argument), evaluated once. */
  observed: Float64Array;
  /** The table whose rows the replicate runs over (when the observation is one of its columns). */
  table?: string;
  /**
   * Columns of that table that group its rows for per-group checks: integer columns the
   * replicate's parameters use as an index (`dose_level` in `mu[dose_level]`), then every category
   * column of the table with at most MAX_GROUP_LEVELS levels.
   */
  groups: { column: string; codes: Float64Array; levels: string[] }[];
}

export interface CompiledReplicates {
  specs: ReplicateSpec[];
  /** One new Float64Array per replicate statement, simulated from the draw θ with the stream rng. */
  simulate(theta: Float64Array, rng: Rng): Float64Array[];
  source: string;
}

/** Compile the program's `replicate` statements; undefined when it has none. */
export function compileReplicates(check: CheckResult, tables: DataTables): CompiledReplicates | undefined {
  const stmts = check.program.statements.filter((s): s is Extract<typeof s, { kind: 'replicate' }> => s.kind === 'replicate');
  if (!stmts.length) return undefined;
  const gen = new CodeGen(tables, false);
  const errors: LangMessage[] = [];
  const specs: ReplicateSpec[] = [];
  const outLines: string[] = [];
  const outs: string[] = [];
  for (const s of stmts) {
    try {
      const e = s.expr;
      if (!REPLICABLE_DENSITIES.has(e.fn) || !/^ld_[a-z_]+$/.test(e.fn))
        throw new LangError(e.fnSpan, `\`${e.fn}\` has no random generator`);
      const L = Math.max(1, reductionLength(e));
      const params = e.args.slice(1).map((a) => gen.outer(a));
      const obsValue = gen.value(e.args[0]);
      const observed = typeof obsValue === 'number' ? new Float64Array(L).fill(obsValue) : (obsValue as Float64Array);
      const o = gen.id('o');
      outs.push(o);
      outLines.push(
        `const ${o} = new Float64Array(${L});`,
        ...gen.loopAlways(L, (j) => [`${o}[${j}] = G.${e.fn}(${params.map((p) => CodeGen.valOf(p, j)).join(', ')});`]),
      );
      const obsCols = columnsRead(e.args[0]);
      const table = obsCols.find((c) => tables[c.table]?.rows === L)?.table;
      const groups: ReplicateSpec['groups'] = [];
      if (table) {
        // Integer columns the parameters use as an index, then every category column of the table
        // (whether the model reads it or not: a model that ignores a grouping is checked by it).
        for (const a of e.args.slice(1))
          for (const c of indexColumns(a)) {
            if (c.table !== table || c.ctype !== 'integer' || groups.some((g) => g.column === c.column)) continue;
            groups.push({ column: c.column, codes: tables[table].columns[c.column].values, levels: [] });
          }
        for (const [name, col] of Object.entries(tables[table].columns)) {
          if (col.type !== 'category' || (col.levels?.length ?? 0) > MAX_GROUP_LEVELS || groups.some((g) => g.column === name)) continue;
          groups.push({ column: name, codes: col.values, levels: col.levels ?? [] });
        }
      }
      specs.push({ name: s.name, line: s.line, density: e.fn, length: L, observed, ...(table ? { table } : {}), groups });
    } catch (err) {
      errors.push(messageAt(s.line, err));
    }
  }
  if (errors.length) throw new CompileError(errors);
  const { fn, source } = buildFn(gen, 'theta, G', [...gen.fwd, ...outLines, `return [${outs.join(', ')}];`]);
  const run = fn as unknown as (theta: Float64Array, g: Readonly<Record<string, Generator>>) => Float64Array[];
  return { specs, simulate: (theta, rng) => run(theta, generatorsFor(rng)), source };
}

/* ------------------------------------------------------------------------------------------ */
/* Pointwise log-likelihood                                                                    */
/* ------------------------------------------------------------------------------------------ */

export interface CompiledPointwise {
  /** Total number of rows: the likelihood tables' rows one after another. */
  rows: number;
  /** Likelihood tables in order of first use by a likelihood term; their rows start at `offset`. */
  tables: { table: string; offset: number; rows: number }[];
  /** Writes the log-likelihood of every row at θ into out (length `rows`) and returns it. */
  evaluate(theta: Float64Array, out?: Float64Array): Float64Array;
  source: string;
}

export type PointwiseResult = { ok: true; pointwise: CompiledPointwise } | { ok: false; reason: string };

function isPerRow(e: Expr): e is Extract<Expr, { kind: 'call' }> {
  if (e.kind !== 'call' || reductionLength(e) === 0) return false;
  if (e.fn === 'sum' || e.fn === 'mean' || e.fn === 'dot') return true;
  const info = densityInfo(e.fn);
  return !!info && info.kind === 'scalar';
}

/**
 * The likelihood terms as a per-row function. Each term is split into its weighted pieces (as the
 * log-density does); every piece must be a sum over the rows of one data table (an ld_ function
 * over columns, or sum/mean/dot of a row-wise expression) — the table whose rows it runs over and
 * whose columns it reads. A piece that is not (e.g. a log-density of a column's mean) has no row
 * decomposition, and the answer says why.
 */
export function compilePointwise(check: CheckResult, tables: DataTables): PointwiseResult {
  const likes = check.program.statements.filter(isLikelihoodTerm);
  if (!likes.length) return { ok: false, reason: 'the model has no likelihood term (no term line reads a data column)' };
  const gen = new CodeGen(tables, false);
  const order: { table: string; offset: number; rows: number }[] = [];
  const loops: string[] = [];
  for (const s of likes) {
    if (s.kind !== 'term') continue;
    const pieces: { coef: number; expr: Expr }[] = [];
    try {
      splitTerm(s.expr, 1, pieces, (x) => gen.value(x) as number);
    } catch (err) {
      return { ok: false, reason: `line ${s.line}: ${(err as Error).message}` };
    }
    for (const p of pieces) {
      if (p.coef === 0) continue;
      const text = s.text.slice(p.expr.span.start, p.expr.span.end);
      if (!isPerRow(p.expr))
        return { ok: false, reason: `line ${s.line}: \`${text}\` is not a sum over data rows, so the log-likelihood has no per-row form` };
      const L = reductionLength(p.expr);
      const read = columnsRead(p.expr).map((c) => c.table);
      const candidates = [...new Set(read)].filter((t) => tables[t]?.rows === L);
      if (candidates.length !== 1)
        return {
          ok: false,
          reason:
            candidates.length === 0
              ? `line ${s.line}: \`${text}\` runs over ${L} elements, which are not the rows of a table it reads`
              : `line ${s.line}: \`${text}\` reads several tables of ${L} rows (${candidates.join(', ')}); its rows cannot be assigned`,
        };
      let slot = order.find((o) => o.table === candidates[0]);
      if (!slot) {
        slot = { table: candidates[0], offset: order.reduce((n, o) => n + o.rows, 0), rows: L };
        order.push(slot);
      }
      const ctx = gen.rowCtx(L, false);
      let rr;
      try {
        rr = gen.rowReduction(p.expr, ctx, false);
      } catch (err) {
        return { ok: false, reason: `line ${s.line}: ${(err as Error).message}` };
      }
      const w = p.expr.fn === 'mean' ? p.coef / L : p.coef;
      loops.push(...ctx.pre, `for (let ${ctx.i} = 0; ${ctx.i} < ${L}; ${ctx.i}++) {`, ...rr.lines, `out[${slot.offset} + ${ctx.i}] += ${lit(w)} * ${rr.val};`, '}');
    }
  }
  const rows = order.reduce((n, o) => n + o.rows, 0);
  const { fn, source } = buildFn(gen, 'theta, out', ['out.fill(0);', ...gen.fwd, ...loops, 'return out;']);
  const run = fn as unknown as (theta: Float64Array, out: Float64Array) => Float64Array;
  return { ok: true, pointwise: { rows, tables: order, evaluate: (theta, out = new Float64Array(rows)) => run(theta, out), source } };
}

/* ------------------------------------------------------------------------------------------ */
/* Prior-only programs                                                                         */
/* ------------------------------------------------------------------------------------------ */

/** The checked program without its likelihood terms (constraints, priors, derive lines kept). */
export function withoutLikelihood(check: CheckResult): CheckResult {
  return { ...check, program: { statements: check.program.statements.filter((s) => !isLikelihoodTerm(s)) } };
}

/** Check and compile program text with its likelihood terms dropped: a fit of the prior alone. */
export function compilePriorOnly(source: string, tables: DataTables): CompiledModel {
  const check = checkProgram(source, dataSchemaOf(tables));
  if (!check.ok) throw new CompileError(check.messages);
  return compileChecked(withoutLikelihood(check), tables);
}
