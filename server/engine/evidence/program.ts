/**
 * Evidence of model-language programs: log Z of a program, its prior-only variant, and Bayes factors
 * of constraint lines (hypotheses) or of two programs.
 *
 * Hypotheses (the encompassing-prior identity, "An encompassing prior generalization of the
 * Savage–Dickey density ratio", Psychological Methods 10, 2005): for constraint lines R of a model
 * whose other constraints make the region P, the Bayes factor of "with R, the prior renormalised to
 * P ∩ R" against "without R" is
 *
 *   BF = posterior mass of R / prior mass of R,
 *   mass of R under a density π on P = Z(π on P ∩ R) / Z(π on P),
 *
 * each Z by annealing (index.ts), so masses as small as 1/10! are as cheap as large ones. The prior is
 * the program with its likelihood term lines removed (shared/lang termRoles). The four Z are computed
 * with different seeds, so their errors are independent and the standard errors add in quadrature.
 */
import { checkProgram, dataSchemaOf, termRoles, type Statement } from '../../../shared/lang/index';
import type { DataTables } from '../types';
import { compileProgram } from '../compile';
import { prepareTarget } from '../geometry';
import { computeEvidence, type EvidenceOptions, type EvidenceResult } from './index';

/** The source with the given 1-based lines blanked (line numbers of the others are kept). */
export function withoutLines(source: string, lines: Iterable<number>): string {
  const drop = new Set(lines);
  return source
    .split(/\r?\n/)
    .map((l, i) => (drop.has(i + 1) ? '' : l))
    .join('\n');
}

function checked(source: string, tables: DataTables) {
  const c = checkProgram(source, dataSchemaOf(tables));
  return c;
}

/** The prior-only program: every likelihood term line removed. */
export function priorOnlySource(source: string, tables: DataTables): { source: string; likelihoodLines: number[] } {
  const c = checked(source, tables);
  const likelihoodLines = termRoles(c.program)
    .filter((r) => r.role === 'likelihood')
    .map((r) => r.line);
  return { source: withoutLines(source, likelihoodLines), likelihoodLines };
}

export function programEvidence(source: string, tables: DataTables, opts: EvidenceOptions = {}): EvidenceResult {
  const target = compileProgram(source, tables);
  return computeEvidence(prepareTarget(target), opts);
}

export interface MassResult {
  /** log of the mass and its standard error. */
  log: number;
  se: number;
  withLines: EvidenceResult;
  withoutLines: EvidenceResult;
}

export interface HypothesisResult {
  lines: number[];
  logBF: number;
  se: number;
  prior: MassResult;
  posterior: MassResult;
  /** Likelihood term lines removed for the prior. */
  likelihoodLines: number[];
  stages: number;
  draws: number;
  seconds: number;
}

export function hypothesisLines(source: string, tables: DataTables, lines: number[]): void {
  const c = checked(source, tables);
  const byLine = new Map<number, Statement>();
  for (const s of c.program.statements) byLine.set(s.line, s);
  if (lines.length === 0) throw new Error('Name at least one constrain line to test.');
  for (const l of lines) {
    const s = byLine.get(l);
    if (!s || s.kind !== 'constrain') throw new Error(`Line ${l} is not a constrain line, so it cannot be tested.`);
    if (s.expr.kind === 'compare' && s.expr.ops.includes('==')) {
      throw new Error(`Line ${l} is an equality: its region has no volume, so its prior and posterior masses are zero. Test inequalities only.`);
    }
  }
}

function labelled<T>(what: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    const err = e as Error;
    if (err?.name === 'AbortError' || err?.name === 'CompileError') throw e;
    const wrapped = new Error(`${what}: ${err?.message ?? String(e)}`);
    wrapped.name = err?.name ?? 'Error';
    throw wrapped;
  }
}

/**
 * Options of testHypothesis and of the compare job: `cache` keeps log Z results by seed and source
 * (a log Z is a function of the program, the tables, the seed and the settings, so a job testing
 * several hypotheses of one model computes the model's own log Z once); `onStep` names each log Z
 * before it starts.
 */
export interface ProgramEvidenceOptions extends EvidenceOptions {
  cache?: Map<string, EvidenceResult>;
  onStep?(what: string): void;
}

/** log Z of a program with its prior or posterior named in errors, through the cache. */
export function cachedEvidence(what: string, src: string, tables: DataTables, opts: ProgramEvidenceOptions, seed: number): EvidenceResult {
  const key = `${seed}\u0000${src}`;
  const hit = opts.cache?.get(key);
  if (hit) return hit;
  opts.onStep?.(what);
  const { cache: _c, onStep: _s, ...eo } = opts;
  const r = labelled(what, () => programEvidence(src, tables, { ...eo, seed, volume: false }));
  opts.cache?.set(key, r);
  return r;
}

/** Bayes factor of the constraint lines `lines` (with against without), from one program. */
export function testHypothesis(source: string, tables: DataTables, lines: number[], opts: ProgramEvidenceOptions = {}): HypothesisResult {
  const started = performance.now();
  hypothesisLines(source, tables, lines);
  const seed = opts.seed ?? 20261201;
  const base = withoutLines(source, lines);
  const prior = priorOnlySource(source, tables);
  const priorBase = withoutLines(prior.source, lines);
  const linesText = lines.join(', ');
  const run = (what: string, src: string, k: number) => cachedEvidence(what, src, tables, opts, seed + k);
  const post1 = run(`the posterior with line(s) ${linesText}`, source, 0);
  const post0 = run(`the posterior without line(s) ${linesText}`, base, 1);
  const pri1 = run(`the prior with line(s) ${linesText}`, prior.source, 2);
  const pri0 = run(`the prior without line(s) ${linesText}`, priorBase, 3);
  const mass = (a: EvidenceResult, b: EvidenceResult): MassResult => ({
    log: a.logZ - b.logZ,
    se: Math.hypot(a.se, b.se),
    withLines: a,
    withoutLines: b,
  });
  const posterior = mass(post1, post0);
  const priorMass = mass(pri1, pri0);
  const all = [post1, post0, pri1, pri0];
  return {
    lines: lines.slice(),
    logBF: posterior.log - priorMass.log,
    se: Math.hypot(posterior.se, priorMass.se),
    prior: priorMass,
    posterior,
    likelihoodLines: prior.likelihoodLines,
    stages: all.reduce((s, r) => s + r.stages, 0),
    draws: all.reduce((s, r) => s + r.draws, 0),
    seconds: (performance.now() - started) / 1000,
  };
}
