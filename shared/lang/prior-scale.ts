/**
 * Prior scales: a source transform that multiplies the scale of every prior density by a factor,
 * for showing how much a Bayes factor depends on the priors (the compare cell's sensitivity runs).
 *
 * Only prior term lines (roles.ts) are touched, and in them only density calls whose scale is a
 * known constant (it reads neither unknowns nor data):
 *
 *   ld_normal(x, mu, sigma)        sigma × f        ld_halfnormal(x, sigma)   sigma × f
 *   ld_student_t(x, nu, mu, sigma) sigma × f        ld_cauchy(x, loc, scale)  scale × f
 *   ld_laplace(x, loc, scale)      scale × f        ld_logistic(x, loc, scale) scale × f
 *   ld_lognormal(x, mu, sigma)     sigma × f  (the spread on the log scale)
 *   ld_exponential(x, rate)        rate ÷ f         ld_gamma(x, shape, rate)  rate ÷ f
 *
 * A rate is divided because the scale is its reciprocal. Densities without a scale parameter
 * (ld_beta, ld_dirichlet, …), scales that depend on unknowns (a hierarchical prior: its hyperprior
 * is scaled instead) and unknowns that no prior line mentions (flat on their region) are reported,
 * not changed. Line numbers are kept, so constraint lines keep their numbers.
 */
import type { Expr, Statement } from './ast';
import { checkProgram, type CheckResult } from './check';
import type { DataSchema } from './ast';
import { termRole } from './roles';

/** Argument index (0-based) of the scale, and whether it is a rate (divided instead). */
export const SCALE_ARGUMENTS: Record<string, { arg: number; rate: boolean }> = {
  ld_normal: { arg: 2, rate: false },
  ld_student_t: { arg: 3, rate: false },
  ld_cauchy: { arg: 2, rate: false },
  ld_laplace: { arg: 2, rate: false },
  ld_logistic: { arg: 2, rate: false },
  ld_lognormal: { arg: 2, rate: false },
  ld_halfnormal: { arg: 1, rate: false },
  ld_exponential: { arg: 1, rate: true },
  ld_gamma: { arg: 2, rate: true },
};

export interface ScaledLine {
  line: number;
  /** The line as written. */
  text: string;
  /** Density calls whose scale was changed, e.g. "ld_normal (sigma 5)". */
  scaled: string[];
  /** Density calls left alone, each with the reason. */
  unscaled: string[];
}

export interface PriorScaleResult {
  source: string;
  factor: number;
  /** Prior term lines and what happened to each of their density calls. */
  lines: ScaledLine[];
  /** Unknowns no prior line mentions: flat on their region, nothing to scale. */
  flatUnknowns: string[];
}

function walk(e: Expr, visit: (e: Expr) => void): void {
  visit(e);
  switch (e.kind) {
    case 'index':
      walk(e.base, visit);
      walk(e.index, visit);
      return;
    case 'call':
      e.args.forEach((a) => walk(a, visit));
      return;
    case 'unary':
      walk(e.arg, visit);
      return;
    case 'binary':
      walk(e.left, visit);
      walk(e.right, visit);
      return;
    case 'compare':
      e.operands.forEach((a) => walk(a, visit));
      return;
    case 'array':
      e.items.forEach((a) => walk(a, visit));
      return;
    default:
      return;
  }
}

function unknownsIn(e: Expr, out: Set<string>): void {
  walk(e, (x) => {
    if (x.kind === 'name' && x.ref?.kind === 'unknown') out.add(x.ref.name);
    if (x.kind === 'name' && x.ref?.kind === 'let') unknownsIn(x.ref.expr, out);
  });
}

/** Shortest decimal text of a factor (0.5, 2, 1.5, …). */
function num(f: number): string {
  return String(Number(f.toPrecision(12)));
}

/**
 * The source with every prior density's constant scale multiplied by `factor` (rates divided), and
 * a report of what was and was not scaled. Throws when the program does not check.
 */
export function scalePriors(source: string, schema: DataSchema, factor: number, checked?: CheckResult): PriorScaleResult {
  if (!(factor > 0) || !Number.isFinite(factor)) throw new Error('The prior scale factor must be a positive number.');
  const c = checked ?? checkProgram(source, schema);
  if (!c.ok) {
    const m = c.messages.find((x) => x.severity === 'error');
    throw new Error(`The model has a problem at line ${m?.line ?? '?'}: ${m?.message ?? 'it does not check'}`);
  }
  const lines = source.split('\n');
  const report: ScaledLine[] = [];
  const mentioned = new Set<string>();
  for (const s of c.program.statements) {
    if (s.kind !== 'term' || termRole(s).role !== 'prior') continue;
    unknownsIn(s.expr, mentioned);
    const edits: { start: number; end: number; text: string }[] = [];
    const info: ScaledLine = { line: s.line, text: s.text ?? lines[s.line - 1], scaled: [], unscaled: [] };
    walk((s as Extract<Statement, { kind: 'term' }>).expr, (x) => {
      if (x.kind !== 'call' || !x.fn.startsWith('ld_')) return;
      const spec = SCALE_ARGUMENTS[x.fn];
      if (!spec) {
        info.unscaled.push(`${x.fn}: no scale parameter`);
        return;
      }
      const a = x.args[spec.arg];
      if (!a) return;
      const raw = lines[s.line - 1].slice(a.span.start, a.span.end);
      if ((a.type?.dep ?? 2) !== 0) {
        info.unscaled.push(`${x.fn}: its ${spec.rate ? 'rate' : 'scale'} ${raw} depends on ${a.type?.dep === 1 ? 'the data' : 'unknowns'}`);
        return;
      }
      const simple = /^[A-Za-z0-9_.]+$/.test(raw);
      const inner = simple ? raw : `(${raw})`;
      edits.push({ start: a.span.start, end: a.span.end, text: spec.rate ? `${inner} / ${num(factor)}` : `${inner} * ${num(factor)}` });
      info.scaled.push(`${x.fn} (${spec.rate ? 'rate' : 'scale'} ${raw} ${spec.rate ? '÷' : '×'} ${num(factor)})`);
    });
    // Scale arguments never nest inside one another's spans (a scale is a constant expression
    // with no density call), so the edits apply right to left on the line.
    edits.sort((p, q) => q.start - p.start);
    let text = lines[s.line - 1];
    if (factor !== 1) for (const e of edits) text = text.slice(0, e.start) + e.text + text.slice(e.end);
    lines[s.line - 1] = text;
    report.push(info);
  }
  const flatUnknowns = c.unknowns.map((u) => u.name).filter((n) => !mentioned.has(n));
  return { source: lines.join('\n'), factor, lines: report, flatUnknowns };
}
