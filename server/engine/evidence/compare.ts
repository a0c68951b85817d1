/**
 * A comparison of models and constraint hypotheses: the computation behind the compare cell.
 *
 * Rows. Every model as written is a row; every tested hypothesis (constraint lines of a model) adds
 * the row "that model without those lines". A row's log marginal likelihood is
 *
 *   log p(y | row) = log Z(prior × likelihood on the row's region) − log Z(prior on the row's region),
 *
 * i.e. the prior is renormalised to the row's region (the prior is the program without its
 * likelihood term lines, shared/lang/roles.ts). The log Bayes factor of two rows is the difference
 * of their log marginal likelihoods; for a model against itself without lines R this is the
 * encompassing-prior Bayes factor posterior mass of R / prior mass of R of program.ts, computed by
 * testHypothesis with the same seeds, so the evidence command gives the same number.
 *
 * Seeds: model i (0-based, in the cell's order) uses seed + 100·i for all of its log Z, laid out as
 * testHypothesis lays them out (posterior with lines +0, without +1, prior with +2, without +3).
 * Every log Z of a row comes from its own seeds, so the errors of different rows are independent and
 * the standard error of a difference is the root sum of squares. Intervals are ±1.96 SE (Monte Carlo
 * error only, normal approximation).
 *
 * Posterior probabilities of the rows: p_i ∝ odds_i · p(y | row i) (point values).
 *
 * Leave-one-out: for a model with a fit of the same program and tables, PSIS-LOO from that fit's
 * draws (predictive/checks.ts); elpd differences against one row with the standard error of the
 * pointwise differences (√n · sd), when both fits saw the same rows.
 *
 * Prior sensitivity: the same rows with every prior scale multiplied by each factor
 * (shared/lang/prior-scale.ts); the seeds are the same, only the programs change.
 */
import type { CompareEntry, CompareEntryKey, CompareHypothesisResult, CompareLoo, CompareResult } from '../../../shared/api/compare';
import { checkProgram } from '../../../shared/lang/index';
import { scalePriors, type PriorScaleResult } from '../../../shared/lang/prior-scale';
import { compileProgram } from '../compile';
import { dataSchemaOf as schemaOf } from '../../../shared/lang/index';
import { runModelChecks } from '../predictive/checks';
import type { ChainResult, DataTables, FitResult } from '../types';
import type { EvidenceResult } from './index';
import { cachedEvidence, hypothesisLines, priorOnlySource, testHypothesis, withoutLines, type ProgramEvidenceOptions } from './program';

export const SEED_STRIDE = 100;
export const Z95 = 1.959963984540054;

export interface CompareFit {
  runId: string;
  unknownNames: string[];
  derivedNames: string[];
  chains: ChainResult[];
}

export interface CompareModelInput {
  cellId: string;
  label: string;
  source: string;
  tables: DataTables;
  /** Table name → dataset id (rows of two models match only when these are equal). */
  tableIds: Record<string, string>;
  /** The latest finished fit of this very program and tables, or null with the reason. */
  fit: CompareFit | null;
  fitNote?: string;
}

export interface CompareInput {
  models: CompareModelInput[];
  hypotheses: { modelCellId: string; lines: number[] }[];
  reference: CompareEntryKey | null;
  priorOdds: { key: CompareEntryKey; odds: number }[];
  replicates: number;
  seed: number;
  /** Prior scale factors; 1 is always computed (first). */
  factors: number[];
}

export interface CompareProgressInfo {
  step: number;
  steps: number;
  what: string;
  replicate: number;
  replicates: number;
  stage: number;
}

export interface CompareRunOptions {
  signal?: AbortSignal;
  onProgress?(p: CompareProgressInfo): void;
}

const keyOf = (modelCellId: string, without: number[]): CompareEntryKey => ({ modelCellId, without: [...without].sort((a, b) => a - b) });
const keyText = (k: CompareEntryKey) => `${k.modelCellId}|${k.without.join(',')}`;
const lineList = (ls: number[]) => (ls.length === 1 ? `line ${ls[0]}` : `lines ${ls.join(', ')}`);

/** "about 12", "about 1.4", "about 3 × 10⁵" for a positive factor. */
export function factorWords(logBF: number): string {
  const f = Math.exp(Math.abs(logBF));
  if (!Number.isFinite(f)) return `e^${Math.abs(logBF).toFixed(0)}`;
  if (f < 10) return f.toFixed(1);
  if (f < 1e4) return String(Number(f.toPrecision(2)));
  const [mant, exp] = f.toExponential(1).split('e');
  return `${mant} × 10^${Number(exp)}`;
}

/** One sentence for a log BF of "a" against "b" with its Monte Carlo standard error. */
export function readingOf(a: string, b: string, logBF: number, se: number): string {
  const lo = logBF - Z95 * se;
  const hi = logBF + Z95 * se;
  const [win, lose] = logBF >= 0 ? [a, b] : [b, a];
  const pm = `log BF ${logBF.toFixed(2)} ± ${se.toFixed(2)}`;
  if (Math.abs(logBF) < 0.05 && lo < 0 && hi > 0) return `The data barely separate ${a} and ${b} (${pm}): neither is favoured.`;
  const settled = lo > 0 || hi < 0 ? '' : ` The Monte Carlo error still allows either direction (95 % interval ${lo.toFixed(2)} to ${hi.toFixed(2)}): run more replicates before reading it.`;
  return `The data favour ${win} over ${lose} by a factor of about ${factorWords(logBF)} (${pm}).${settled}`;
}

export const PRIOR_CAUTION =
  'Bayes factors depend on the priors, not only on the data: widening the prior of an unknown that one model has and the other lacks (or constrains) lowers that model\'s marginal likelihood even when its fit hardly changes. ' +
  'Leave-one-out differences do not have this dependence to the same degree. Rerun with every prior scale halved and doubled to see how far the numbers move.';

function pmOf(r: { logZ: number; se: number }) {
  return { value: r.logZ, se: r.se };
}

interface RowZ {
  post: EvidenceResult;
  prior: EvidenceResult;
}

/** Pointwise elpd rows must be the same data rows: same tables (dataset ids), same row labels. */
function sameRows(a: CompareModelInput, b: CompareModelInput, la: ReturnType<typeof runModelChecks>['loo'], lb: ReturnType<typeof runModelChecks>['loo']): boolean {
  if (!la || !lb || la.rows.length !== lb.rows.length) return false;
  const ta = JSON.stringify(Object.entries(a.tableIds).sort());
  const tb = JSON.stringify(Object.entries(b.tableIds).sort());
  if (ta !== tb) return false;
  return la.rows.every((r, i) => r.table === lb.rows[i].table && r.row === lb.rows[i].row);
}

export function computeComparison(input: CompareInput, opts: CompareRunOptions = {}): CompareResult {
  const started = performance.now();
  const { models } = input;
  if (models.length === 0) throw new Error('Pick at least one model cell to compare.');
  const factors = [1, ...input.factors.filter((f) => f !== 1)];
  const byCell = new Map(models.map((m, i) => [m.cellId, { m, i }]));
  for (const h of input.hypotheses) {
    const x = byCell.get(h.modelCellId);
    if (!x) throw new Error('A hypothesis names a model cell that is not among the compared models.');
    try {
      hypothesisLines(x.m.source, x.m.tables, h.lines);
    } catch (e) {
      throw new Error(`${x.m.label}: ${(e as Error).message}`);
    }
  }
  const warnings: string[] = [];
  // Rows: each model as written, then each hypothesis's "without" row (once per distinct line set).
  const rows: { key: CompareEntryKey; model: CompareModelInput; index: number }[] = [];
  const seen = new Set<string>();
  const addRow = (m: CompareModelInput, i: number, without: number[]) => {
    const key = keyOf(m.cellId, without);
    if (seen.has(keyText(key))) return;
    seen.add(keyText(key));
    rows.push({ key, model: m, index: i });
  };
  models.forEach((m, i) => addRow(m, i, []));
  for (const h of input.hypotheses) {
    const x = byCell.get(h.modelCellId)!;
    addRow(x.m, x.i, h.lines);
  }
  const reference = input.reference && seen.has(keyText(input.reference)) ? keyOf(input.reference.modelCellId, input.reference.without) : rows[0].key;
  if (input.reference && !seen.has(keyText(input.reference))) warnings.push('The chosen reference is no longer among the rows; the first model is the reference.');
  const tableSets = new Set(models.map((m) => JSON.stringify(Object.entries(m.tableIds).sort())));
  if (tableSets.size > 1) warnings.push('The models do not all bind the same tables: a Bayes factor between models fitted to different data has no meaning as a comparison of models.');

  // Progress: one step per log Z that is not shared.
  const steps = factors.length * rows.length * 2;
  let step = 0;
  let what = '';
  const progressOpts = (): ProgramEvidenceOptions => ({
    replicates: input.replicates,
    signal: opts.signal,
    onStep: (w) => {
      step++;
      what = w;
      opts.onProgress?.({ step, steps, what, replicate: 1, replicates: input.replicates, stage: 0 });
    },
    onProgress: (r, stage) => opts.onProgress?.({ step, steps, what, replicate: r + 1, replicates: input.replicates, stage }),
  });

  const perFactor: { factor: number; rowZ: Map<string, RowZ>; hyps: ReturnType<typeof testHypothesis>[] }[] = [];
  const priorScales: PriorScaleResult[][] = [];
  for (const factor of factors) {
    const cache = new Map<string, EvidenceResult>();
    const eo: ProgramEvidenceOptions = { ...progressOpts(), cache };
    const tag = factor === 1 ? '' : ` (prior scales × ${factor})`;
    const sources = models.map((m) => (factor === 1 ? null : scalePriors(m.source, schemaOf(m.tables), factor)));
    if (factor !== 1) priorScales.push(sources.map((s) => s!));
    const src = (i: number) => sources[i]?.source ?? models[i].source;
    const rowZ = new Map<string, RowZ>();
    for (const row of rows) {
      const i = row.index;
      const seedM = input.seed + SEED_STRIDE * i;
      // The same strings testHypothesis builds, so its log Z come from the cache.
      const full = row.key.without.length ? withoutLines(src(i), row.key.without) : src(i);
      const prior = priorOnlySource(src(i), row.model.tables).source;
      const priorRow = row.key.without.length ? withoutLines(prior, row.key.without) : prior;
      const off = row.key.without.length ? 1 : 0;
      const name = `${row.model.label}${row.key.without.length ? ` without ${lineList(row.key.without)}` : ''}${tag}`;
      const post = cachedEvidence(`the posterior of ${name}`, full, row.model.tables, eo, seedM + off);
      const pri = cachedEvidence(`the prior of ${name}`, priorRow, row.model.tables, eo, seedM + 2 + off);
      rowZ.set(keyText(row.key), { post, prior: pri });
    }
    // The hypotheses through testHypothesis itself (every log Z is in the cache by now).
    const hyps = input.hypotheses.map((h) => {
      const x = byCell.get(h.modelCellId)!;
      return testHypothesis(src(x.i), x.m.tables, h.lines, { ...eo, seed: input.seed + SEED_STRIDE * x.i });
    });
    perFactor.push({ factor, rowZ, hyps });
  }

  const base = perFactor[0];
  const ml = (z: RowZ) => ({ value: z.post.logZ - z.prior.logZ, se: Math.hypot(z.post.se, z.prior.se) });
  const refZ = (f: (typeof perFactor)[number]) => ml(f.rowZ.get(keyText(reference))!);
  const odds = (k: CompareEntryKey) => input.priorOdds.find((o) => keyText(keyOf(o.key.modelCellId, o.key.without)) === keyText(k))?.odds ?? 1;

  // Leave-one-out for rows that are a model as written with a matching fit.
  const looOf = new Map<string, NonNullable<ReturnType<typeof runModelChecks>['loo']>>();
  const looNotes = new Map<string, string>();
  for (const row of rows) {
    if (row.key.without.length) {
      looNotes.set(keyText(row.key), 'No fit of this variant: leave-one-out needs draws of the model without these lines.');
      continue;
    }
    const m = row.model;
    if (!m.fit) {
      looNotes.set(keyText(row.key), m.fitNote ?? 'Fit this model to see leave-one-out.');
      continue;
    }
    const check = checkProgram(m.source, schemaOf(m.tables));
    const fr: FitResult = { unknownNames: m.fit.unknownNames, derivedNames: m.fit.derivedNames, chains: m.fit.chains, summary: undefined as unknown as FitResult['summary'] };
    // compileProgram throws a readable error when the program no longer compiles.
    compileProgram(m.source, m.tables);
    const checks = runModelChecks(check, m.tables, fr, { seed: input.seed, replicates: 1 });
    if (checks.loo) looOf.set(keyText(row.key), checks.loo);
    else looNotes.set(keyText(row.key), checks.looUnavailable ?? 'Leave-one-out is not available for this model.');
  }
  const looRefKey = looOf.has(keyText(reference)) ? reference : (rows.find((r) => looOf.has(keyText(r.key)))?.key ?? null);
  const looRefRow = looRefKey ? rows.find((r) => keyText(r.key) === keyText(looRefKey))! : null;

  const mls = rows.map((r) => ml(base.rowZ.get(keyText(r.key))!));
  const w = rows.map((r, j) => Math.log(odds(r.key)) + mls[j].value);
  const wMax = Math.max(...w);
  const wSum = w.reduce((s, x) => s + Math.exp(x - wMax), 0);
  const refLabel = (k: CompareEntryKey) => {
    const r = rows.find((x) => keyText(x.key) === keyText(k))!;
    return r.key.without.length ? `'${r.model.label}' without ${lineList(r.key.without)}` : `'${r.model.label}'`;
  };

  const entries: CompareEntry[] = rows.map((r, j) => {
    const z = base.rowZ.get(keyText(r.key))!;
    const isRef = keyText(r.key) === keyText(reference);
    const m = mls[j];
    const ref = refZ(base);
    const lb = isRef ? null : m.value - ref.value;
    const lbSe = isRef ? null : Math.hypot(m.se, ref.se);
    const loo = looOf.get(keyText(r.key));
    let looOut: CompareLoo | null = null;
    if (loo) {
      let diff: number | null = null;
      let diffSe: number | null = null;
      const refLoo = looRefKey ? looOf.get(keyText(looRefKey)) : undefined;
      if (refLoo && looRefRow && keyText(looRefKey!) !== keyText(r.key) && sameRows(r.model, looRefRow.model, loo, refLoo)) {
        const n = loo.rows.length;
        const d = loo.rows.map((x, q) => x.elpd - refLoo.rows[q].elpd);
        const mean = d.reduce((s, x) => s + x, 0) / n;
        const v = d.reduce((s, x) => s + (x - mean) ** 2, 0) / Math.max(1, n - 1);
        diff = d.reduce((s, x) => s + x, 0);
        diffSe = Math.sqrt(n * v);
      } else if (refLoo && looRefRow && keyText(looRefKey!) !== keyText(r.key)) {
        looNotes.set(keyText(r.key), 'Its fit saw other data rows than the leave-one-out reference, so no elpd difference is given.');
      }
      looOut = {
        runId: r.model.fit!.runId,
        elpd: loo.elpd,
        se: loo.se,
        pLoo: loo.pLoo,
        draws: loo.draws,
        kThreshold: loo.kThreshold,
        highK: loo.highK.slice(0, 50),
        highKCount: loo.highK.length,
        diff,
        diffSe,
      };
    }
    return {
      key: r.key,
      label: r.key.without.length ? `${r.model.label} without ${lineList(r.key.without)}` : r.model.label,
      modelLabel: r.model.label,
      logML: m,
      logZPosterior: pmOf(z.post),
      logZPrior: pmOf(z.prior),
      priorOdds: odds(r.key),
      posteriorProbability: Math.exp(w[j] - wMax) / wSum,
      logBF: lb,
      logBFSe: lbSe,
      logBFInterval: lb === null ? null : [lb - Z95 * lbSe!, lb + Z95 * lbSe!],
      sensitivity: perFactor.map((f) => {
        const mm = ml(f.rowZ.get(keyText(r.key))!);
        const rr = refZ(f);
        return { factor: f.factor, logML: mm.value, se: mm.se, logBF: isRef ? null : mm.value - rr.value, logBFSe: isRef ? null : Math.hypot(mm.se, rr.se) };
      }),
      loo: looOut,
      looNote: looOut && looOut.diff !== null ? null : (looNotes.get(keyText(r.key)) ?? null),
    };
  });

  const hypotheses: CompareHypothesisResult[] = input.hypotheses.map((h, q) => {
    const x = byCell.get(h.modelCellId)!;
    const r = base.hyps[q];
    const srcLines = x.m.source.split(/\r?\n/);
    const lineText = h.lines.map((l) => (srcLines[l - 1] ?? '').trim());
    const withName = `'${x.m.label}' (with ${lineList(h.lines)}: ${lineText.map((t) => t.replace(/^constrain\s+/, '')).join('; ')})`;
    const withoutName = `the same model without ${h.lines.length === 1 ? 'it' : 'them'}`;
    const pm = (v: number) => (v < 1e-3 ? v.toExponential(1) : String(Number(v.toPrecision(2))));
    const massText = ` The tested region holds ${pm(Math.exp(r.prior.log))} of the prior and ${pm(Math.exp(r.posterior.log))} of the posterior.`;
    return {
      modelCellId: h.modelCellId,
      modelLabel: x.m.label,
      lines: h.lines.slice(),
      lineText,
      logBF: r.logBF,
      se: r.se,
      interval: [r.logBF - Z95 * r.se, r.logBF + Z95 * r.se],
      logPriorMass: { value: r.prior.log, se: r.prior.se },
      logPosteriorMass: { value: r.posterior.log, se: r.posterior.se },
      sensitivity: perFactor.map((f) => ({ factor: f.factor, logBF: f.hyps[q].logBF, se: f.hyps[q].se, logPriorMass: f.hyps[q].prior.log, logPosteriorMass: f.hyps[q].posterior.log })),
      reading: readingOf(withName, withoutName, r.logBF, r.se) + massText,
    };
  });

  const reading: string[] = hypotheses.map((h) => h.reading);
  for (const e of entries) {
    if (e.logBF === null) continue;
    // A hypothesis row pair is already read above.
    const covered = input.hypotheses.some((h) => {
      const pair = [keyText(keyOf(h.modelCellId, [])), keyText(keyOf(h.modelCellId, h.lines))];
      return pair.includes(keyText(e.key)) && pair.includes(keyText(reference));
    });
    if (covered) continue;
    const a = e.key.without.length ? `'${e.modelLabel}' without ${lineList(e.key.without)}` : `'${e.modelLabel}'`;
    reading.push(readingOf(a, refLabel(reference), e.logBF, e.logBFSe!));
  }
  if (factors.length > 1) {
    for (const h of hypotheses) {
      const parts = h.sensitivity.map((s) => `×${s.factor}: ${s.logBF.toFixed(2)}`).join(', ');
      reading.push(`With every prior scale multiplied, the log BF of ${lineList(h.lines)} of '${h.modelLabel}' is ${parts}.`);
    }
  }
  const withLoo = entries.filter((e) => e.loo && e.loo.diff !== null);
  if (withLoo.length && looRefKey) {
    for (const e of withLoo) {
      reading.push(
        `Leave-one-out: '${e.label}' predicts held-out rows ${e.loo!.diff! >= 0 ? 'better' : 'worse'} than ${refLabel(looRefKey)} by ${Math.abs(e.loo!.diff!).toFixed(1)} ± ${e.loo!.diffSe!.toFixed(1)} in expected log predictive density.`,
      );
    }
  }
  for (const e of entries) {
    if (e.loo && e.loo.highKCount > 0) warnings.push(`'${e.label}': ${e.loo.highKCount} row(s) have Pareto k̂ above ${e.loo.kThreshold} (${e.loo.highK.slice(0, 5).map((x) => `${x.table} row ${x.row}`).join(', ')}${e.loo.highKCount > 5 ? ', …' : ''}); its leave-one-out estimate is unreliable there.`);
  }

  return {
    kind: 'compare',
    seed: input.seed,
    replicates: input.replicates,
    factors,
    reference,
    referenceLabel: refLabel(reference).replace(/^'|'$/g, ''),
    looReference: looRefKey,
    entries,
    hypotheses,
    priorScales: priorScales.length
      ? models.map((m, i) => ({ modelCellId: m.cellId, modelLabel: m.label, lines: priorScales[0][i].lines, flatUnknowns: priorScales[0][i].flatUnknowns }))
      : [],
    reading,
    caution: PRIOR_CAUTION,
    warnings,
    seconds: (performance.now() - started) / 1000,
  };
}
