/**
 * Link fusion: a density whose parameter is written through its link function is computed by a
 * kernel that takes the linear predictor itself.
 *
 *   ld_binomial(k, n, logistic(η))  →  log C(n, k) − k·softplus(−η) − (n − k)·softplus(η)
 *   ld_bernoulli(y, logistic(η))    →  −softplus(−η) if y = 1, −softplus(η) if y = 0
 *   ld_poisson(k, exp(η))           →  k·η − e^η − log k!
 *
 * The match is on the checked tree: the argument must be exactly a call of the link (directly, or
 * a `let` name whose expression is that call); anything else (`0.5 * logistic(η)`, a probability
 * from `ld_beta`, …) keeps the plain kernel. The values are the same function of η; the fused
 * kernels never round the probability to 0 or 1 or overflow the rate, so they stay finite for
 * any finite η where the plain composition gives −∞ or NaN (e.g. logistic(40) rounds to 1).
 *
 * The pass is copy-on-write: untouched subtrees are kept (the code generator memoises by node),
 * and a rewritten node is produced once however many times a `let` is used.
 */
import type { Expr, Program, Statement } from '../../../shared/lang/index';
import { FUSED_DENSITY_TABLE } from '../densities/index';

/** Fused kernel name by density and link. */
const BY_DENSITY = new Map<string, { link: string; linkArg: number; fused: string }>();
for (const f of Object.values(FUSED_DENSITY_TABLE)) BY_DENSITY.set(f.base, { link: f.link, linkArg: f.linkArg, fused: f.name });

/** The argument of `link(…)` when `e` is exactly that call (looking through `let` names). */
function linkArgument(e: Expr, link: string): Expr | undefined {
  let x = e;
  while (x.kind === 'name' && x.ref?.kind === 'let') x = x.ref.expr;
  if (x.kind === 'call' && x.fn === link && x.args.length === 1) return x.args[0];
  return undefined;
}

export class LinkFuser {
  private memo = new Map<Expr, Expr>();
  /** How many calls were rewritten (for tests and inspection). */
  fusedCalls = 0;

  expr(e: Expr): Expr {
    const m = this.memo.get(e);
    if (m) return m;
    const out = this.rewrite(e);
    this.memo.set(e, out);
    return out;
  }

  private list(xs: Expr[]): Expr[] {
    const ys = xs.map((x) => this.expr(x));
    return ys.every((y, i) => y === xs[i]) ? xs : ys;
  }

  private rewrite(e: Expr): Expr {
    switch (e.kind) {
      case 'name':
      case 'member': {
        const ref = e.ref;
        if (ref?.kind !== 'let') return e;
        const x = this.expr(ref.expr);
        return x === ref.expr ? e : { ...e, ref: { ...ref, expr: x } };
      }
      case 'index': {
        const base = this.expr(e.base);
        const index = this.expr(e.index);
        return base === e.base && index === e.index ? e : { ...e, base, index };
      }
      case 'unary': {
        const arg = this.expr(e.arg);
        return arg === e.arg ? e : { ...e, arg };
      }
      case 'binary': {
        const left = this.expr(e.left);
        const right = this.expr(e.right);
        return left === e.left && right === e.right ? e : { ...e, left, right };
      }
      case 'array': {
        const items = this.list(e.items);
        return items === e.items ? e : { ...e, items };
      }
      case 'compare': {
        const operands = this.list(e.operands);
        return operands === e.operands ? e : { ...e, operands };
      }
      case 'call': {
        const args = this.list(e.args);
        const f = BY_DENSITY.get(e.fn);
        const inner = f && args.length > f.linkArg ? linkArgument(args[f.linkArg], f.link) : undefined;
        if (f && inner) {
          this.fusedCalls++;
          const fusedArgs = args.slice();
          fusedArgs[f.linkArg] = inner;
          return { ...e, fn: f.fused, args: fusedArgs };
        }
        return args === e.args ? e : { ...e, args };
      }
      default:
        return e;
    }
  }

  statement(s: Statement): Statement {
    if (s.kind === 'term' || s.kind === 'derive' || s.kind === 'let') {
      const expr = this.expr(s.expr);
      return expr === s.expr ? s : { ...s, expr };
    }
    return s;
  }
}

/** The program with every fusable density call rewritten to its fused kernel. */
export function fuseLinks(program: Program): { program: Program; fusedCalls: number } {
  const f = new LinkFuser();
  const statements = program.statements.map((s) => f.statement(s));
  return { program: { ...program, statements }, fusedCalls: f.fusedCalls };
}
