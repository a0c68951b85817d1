/**
 * The role of a `term` line: likelihood or prior.
 *
 * Rule: a term line is a **likelihood term** when its expression reads a column of a bound data
 * table — directly (`kg`, `harvest.kg`) or through a `let` it uses (`let X = [rain, shade]`).
 * Every other term (only unknowns and constants) is a **prior term**. Pointwise log-likelihood,
 * leave-one-out and prior-only runs all use this one predicate.
 *
 * The argument must be a checked statement (from `checkProgram(...).program`): the checker fills
 * in which table column a name refers to, so a declared name that hides a column is not mistaken
 * for data.
 */
import type { Expr, Statement } from './ast';

/** Whether a checked expression reads a data column (following `let` names). */
export function readsDataColumn(e: Expr): boolean {
  switch (e.kind) {
    case 'num':
      return false;
    case 'name':
    case 'member':
      if (e.ref?.kind === 'column') return true;
      if (e.ref?.kind === 'let') return readsDataColumn(e.ref.expr);
      return false;
    case 'index':
      return readsDataColumn(e.base) || readsDataColumn(e.index);
    case 'call':
      return e.args.some(readsDataColumn);
    case 'unary':
      return readsDataColumn(e.arg);
    case 'binary':
      return readsDataColumn(e.left) || readsDataColumn(e.right);
    case 'array':
      return e.items.some(readsDataColumn);
    case 'compare':
      return e.operands.some(readsDataColumn);
  }
}

/** True for a checked `term` statement that reads a data column (a likelihood term). */
export function isLikelihoodTerm(s: Statement): boolean {
  return s.kind === 'term' && readsDataColumn(s.expr);
}
