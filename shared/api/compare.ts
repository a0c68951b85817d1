/**
 * The compare cell's contract: what the cell stores (models, hypotheses, reference, prior odds),
 * the compare job as the API shows it (status, progress, result) and the result itself. The job
 * runs in the run workers (server/runs/compare-job.ts); server and client validate with these.
 */
import { z } from 'zod';
import { idSchema, isoDateSchema } from './common';
import { RUN_STATUSES } from '../terms';

const lineNumber = z.number().int().min(1).max(100_000);

/** One row of the comparison: a model cell as written, or that model without some constraint lines. */
export const compareEntryKeySchema = z.strictObject({
  modelCellId: idSchema,
  /** Constraint lines removed ([] = the model as written), ascending. */
  without: z.array(lineNumber).max(20).default([]),
});
export type CompareEntryKey = z.infer<typeof compareEntryKeySchema>;

export const compareHypothesisSchema = z.strictObject({
  modelCellId: idSchema,
  /** Constraint lines tested together: the model with them against the model without them. */
  lines: z.array(lineNumber).min(1, 'Pick at least one constraint line').max(20),
});
export type CompareHypothesis = z.infer<typeof compareHypothesisSchema>;

export const COMPARE_DEFAULTS = { replicates: 4, seed: 20261201 } as const;
export const COMPARE_LIMITS = { models: 8, hypotheses: 8, replicates: 16 } as const;

/** Prior scale factors of the sensitivity run (the plain run is factor 1). */
export const SENSITIVITY_FACTORS = [0.5, 2] as const;

export const compareContentSchema = z.strictObject({
  modelCellIds: z.array(idSchema).max(COMPARE_LIMITS.models, `At most ${COMPARE_LIMITS.models} models`),
  hypotheses: z.array(compareHypothesisSchema).max(COMPARE_LIMITS.hypotheses, `At most ${COMPARE_LIMITS.hypotheses} hypotheses`).default([]),
  /** The row every Bayes factor is taken against; null = the first model as written. */
  reference: compareEntryKeySchema.nullable().default(null),
  /** Prior odds of rows (relative weights, default 1 each). */
  priorOdds: z.array(z.strictObject({ key: compareEntryKeySchema, odds: z.number().positive().max(1e12) })).max(64).default([]),
  replicates: z.number().int().min(2).max(COMPARE_LIMITS.replicates).default(COMPARE_DEFAULTS.replicates),
  seed: z.number().int().min(0).max(2_147_483_647).default(COMPARE_DEFAULTS.seed),
});
export type CompareContent = z.infer<typeof compareContentSchema>;

export function sameEntry(a: CompareEntryKey, b: CompareEntryKey): boolean {
  return a.modelCellId === b.modelCellId && a.without.length === b.without.length && a.without.every((l, i) => l === b.without[i]);
}

/* -------------------------------------------------------------------------------------------- */
/* Result                                                                                        */
/* -------------------------------------------------------------------------------------------- */

const pmSchema = z.object({ value: z.number(), se: z.number() });

export const compareLooSchema = z.object({
  /** The fit whose draws gave it. */
  runId: idSchema,
  elpd: z.number(),
  se: z.number(),
  pLoo: z.number(),
  draws: z.number().int(),
  kThreshold: z.number(),
  /** Rows whose Pareto k̂ is above the threshold, named by table and row (at most 50 listed). */
  highK: z.array(z.object({ table: z.string(), row: z.number().int(), k: z.number() })),
  highKCount: z.number().int(),
  /** Against the leave-one-out reference row (null for that row itself or when rows differ). */
  diff: z.number().nullable(),
  diffSe: z.number().nullable(),
});
export type CompareLoo = z.infer<typeof compareLooSchema>;

export const compareEntrySchema = z.object({
  key: compareEntryKeySchema,
  label: z.string(),
  modelLabel: z.string(),
  /** log marginal likelihood = log Z(prior × likelihood on the region) − log Z(prior on the region). */
  logML: pmSchema,
  logZPosterior: pmSchema,
  logZPrior: pmSchema,
  priorOdds: z.number(),
  /** Posterior probability among the rows under the stated prior odds (Monte Carlo point value). */
  posteriorProbability: z.number(),
  /** log BF against the reference row, its standard error and 95 % interval (null for the reference). */
  logBF: z.number().nullable(),
  logBFSe: z.number().nullable(),
  logBFInterval: z.tuple([z.number(), z.number()]).nullable(),
  /** The same log BF with every prior scale multiplied by each factor (factor 1 included). */
  sensitivity: z.array(z.object({ factor: z.number(), logML: z.number(), se: z.number(), logBF: z.number().nullable(), logBFSe: z.number().nullable() })),
  loo: compareLooSchema.nullable(),
  /** Why there is no leave-one-out for this row. */
  looNote: z.string().nullable(),
});
export type CompareEntry = z.infer<typeof compareEntrySchema>;

export const compareHypothesisResultSchema = z.object({
  modelCellId: idSchema,
  modelLabel: z.string(),
  lines: z.array(z.number().int()),
  /** The constraint lines as written. */
  lineText: z.array(z.string()),
  /** Bayes factor of the model with the lines against it without them = posterior mass / prior mass. */
  logBF: z.number(),
  se: z.number(),
  interval: z.tuple([z.number(), z.number()]),
  logPriorMass: pmSchema,
  logPosteriorMass: pmSchema,
  sensitivity: z.array(z.object({ factor: z.number(), logBF: z.number(), se: z.number(), logPriorMass: z.number(), logPosteriorMass: z.number() })),
  reading: z.string(),
});
export type CompareHypothesisResult = z.infer<typeof compareHypothesisResultSchema>;

export const comparePriorScaleSchema = z.object({
  modelCellId: idSchema,
  modelLabel: z.string(),
  lines: z.array(z.object({ line: z.number().int(), text: z.string(), scaled: z.array(z.string()), unscaled: z.array(z.string()) })),
  flatUnknowns: z.array(z.string()),
});

export const compareResultSchema = z.object({
  kind: z.literal('compare'),
  seed: z.number().int(),
  replicates: z.number().int(),
  /** 1 alone, or 1 with the sensitivity factors. */
  factors: z.array(z.number()),
  reference: compareEntryKeySchema,
  referenceLabel: z.string(),
  /** Row that elpd differences are taken against (null when no row has leave-one-out). */
  looReference: compareEntryKeySchema.nullable(),
  entries: z.array(compareEntrySchema),
  hypotheses: z.array(compareHypothesisResultSchema),
  /** Which prior lines the sensitivity runs scaled (present when factors other than 1 ran). */
  priorScales: z.array(comparePriorScaleSchema),
  reading: z.array(z.string()),
  caution: z.string(),
  warnings: z.array(z.string()),
  seconds: z.number(),
});
export type CompareResult = z.infer<typeof compareResultSchema>;

/* -------------------------------------------------------------------------------------------- */
/* Job                                                                                           */
/* -------------------------------------------------------------------------------------------- */

export const compareProgressSchema = z.object({
  /** 1-based step of `steps` (one step = one log Z). */
  step: z.number().int(),
  steps: z.number().int(),
  /** What this step computes, in words. */
  what: z.string(),
  replicate: z.number().int(),
  replicates: z.number().int(),
  /** Annealing stages run so far in this replicate. */
  stage: z.number().int(),
});
export type CompareProgress = z.infer<typeof compareProgressSchema>;

export const compareRunSchema = z.object({
  id: idSchema,
  cellId: idSchema.nullable(),
  notebookId: idSchema,
  status: z.enum(RUN_STATUSES),
  /** The settings the job ran with (the cell's content at queue time, plus the prior factors). */
  settings: compareContentSchema.extend({ factors: z.array(z.number()) }),
  createdBy: z.object({ id: idSchema, name: z.string() }).nullable(),
  createdAt: isoDateSchema,
  startedAt: isoDateSchema.nullable(),
  finishedAt: isoDateSchema.nullable(),
  error: z.string().nullable(),
  progress: compareProgressSchema.nullable(),
  result: compareResultSchema.nullable(),
  worker: z.enum(['active', 'lost']).nullable(),
  queuePosition: z.number().int().min(1).nullable(),
});
export type CompareRun = z.infer<typeof compareRunSchema>;

export const queueCompareBody = z.strictObject({
  /** Also run with every prior scale halved and doubled. */
  sensitivity: z.boolean().default(false),
  /** Settings to run with (the cell's draft); the cell's saved content when absent. */
  content: compareContentSchema.optional(),
});
export const compareRunResponse = z.object({ run: compareRunSchema });
export const compareRunListResponse = z.object({ runs: z.array(compareRunSchema) });
