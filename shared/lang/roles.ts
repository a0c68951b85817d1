/**
 * Prior or likelihood: the role of each `term` line.
 *
 * Rule: a term line that reads a table column — directly (`kg`, `harvest.kg`), through a gather
 * (`mu[field]`) or through a `let` that does — is likelihood; one that reads no column is prior.
 * A trailing `:: prior` or `:: likelihood` on the term line overrides the rule (e.g. a prior whose
 * scale is computed from the data, or a penalty on the unknowns that belongs with the likelihood).
 *
 * Used wherever a model is split into its prior and its likelihood: prior-only runs, the prior mass
 * of a constrained region, Bayes factors of constraint lines.
 */
import type { Expr, Program, Statement, TermRole } from './ast';

export interface TermRoleInfo {
  line: number;
  role: TermRole;
  /** True when the line says its role with `:: prior` / `:: likelihood`. */
  explicit: boolean;
  /** Columns the term reads, as `table.column` (empty for a prior by the rule). */
  columns: string[];
}

function collectColumns(e: Expr, out: Set<string>, seen: Set<Expr>): void {
  if (seen.has(e)) return;
  seen.add(e);
  switch (e.kind) {
    case 'name':
      if (e.ref?.kind === 'column') out.add(`${e.ref.table}.${e.ref.column}`);
      else if (e.ref?.kind === 'let') collectColumns(e.ref.expr, out, seen);
      return;
    case 'member':
      if (e.ref?.kind === 'column') out.add(`${e.ref.table}.${e.ref.column}`);
      else out.add(`${e.table}.${e.column}`);
      return;
    case 'index':
      collectColumns(e.base, out, seen);
      collectColumns(e.index, out, seen);
      return;
    case 'call':
      e.args.forEach((a) => collectColumns(a, out, seen));
      return;
    case 'unary':
      collectColumns(e.arg, out, seen);
      return;
    case 'binary':
      collectColumns(e.left, out, seen);
      collectColumns(e.right, out, seen);
      return;
    case 'compare':
      e.operands.forEach((a) => collectColumns(a, out, seen));
      return;
    case 'array':
      e.items.forEach((a) => collectColumns(a, out, seen));
      return;
    default:
      return;
  }
}

/**
 * The role of one term statement. Needs a checked program (names resolved to columns, lets and
 * unknowns); on an unchecked statement only `table.column` members are recognised.
 */
export function termRole(s: Extract<Statement, { kind: 'term' }>): TermRoleInfo {
  const cols = new Set<string>();
  collectColumns(s.expr, cols, new Set());
  const columns = [...cols].sort();
  if (s.role) return { line: s.line, role: s.role, explicit: true, columns };
  return { line: s.line, role: columns.length > 0 ? 'likelihood' : 'prior', explicit: false, columns };
}

/** The roles of every term line of a checked program, in line order. */
export function termRoles(program: Program): TermRoleInfo[] {
  return program.statements.filter((s): s is Extract<Statement, { kind: 'term' }> => s.kind === 'term').map(termRole);
}

/**
 * True for a checked `term` statement whose role is likelihood (by the rule or by its `:: likelihood`
 * mark). Pointwise log-likelihood, leave-one-out and prior-only fits use this one predicate.
 */
export function isLikelihoodTerm(s: Statement): boolean {
  return s.kind === 'term' && termRole(s).role === 'likelihood';
}
