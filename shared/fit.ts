/**
 * Fit settings and results as exchanged between the engine, the job runner, the API and the client.
 * zod schemas so the server and the client validate with the same objects.
 */
import { z } from 'zod';
import { CHECK_LIMITS, checkStatSchema, runChecksSchema } from './checks';

/** Sampling engines a chain can run with (docs/engine.md §9). */
export const ENGINES = [
  'rhmc',
  'rhmc-gl',
  'hitrun',
  'hitrun-plain',
  'coord-hitrun',
  'ball-walk',
  'dikin-walk',
  'rwm',
  'transform-hmc',
  'reflect-hmc',
] as const;
export type EngineName = (typeof ENGINES)[number];

/** What the fit settings accept: an engine, or 'auto' (the engine picks and says why). */
export const SAMPLERS = ['auto', ...ENGINES] as const;

/**
 * Most unknown coordinates a model may have, everywhere: the model check (editor, compile route)
 * refuses more before any region check, and a fit refuses more.
 */
export const MAX_UNKNOWNS = 500;

export const FIT_LIMITS = {
  chains: { min: 1, max: 8 },
  warmup: { min: 50, max: 20_000 },
  draws: { min: 50, max: 20_000 },
  dimension: MAX_UNKNOWNS,
} as const;

export const fitSettingsSchema = z
  .object({
    chains: z.number().int().min(FIT_LIMITS.chains.min).max(FIT_LIMITS.chains.max).default(4),
    warmup: z.number().int().min(FIT_LIMITS.warmup.min).max(FIT_LIMITS.warmup.max).default(1000),
    draws: z.number().int().min(FIT_LIMITS.draws.min).max(FIT_LIMITS.draws.max).default(1000),
    seed: z.number().int().min(0).max(2 ** 31 - 1).default(20261201),
    sampler: z.enum(SAMPLERS).default('auto'),
    /**
     * Before the data: fit with the likelihood terms left out (priors, constraints and derive lines
     * only); the checks are then prior predictive checks. Absent = false.
     */
    priorOnly: z.boolean().optional(),
    /** Data sets replicated for the model checks (absent = CHECK_LIMITS.replicates.default). */
    replicates: z.number().int().min(CHECK_LIMITS.replicates.min).max(CHECK_LIMITS.replicates.max).optional(),
    /** The user's own column statistic for the checks (checkStatSchema), beside the built-in ones. */
    checkStat: checkStatSchema.optional(),
  })
  .strict();
export type FitSettings = z.infer<typeof fitSettingsSchema>;

export const quantitySummarySchema = z.object({
  name: z.string(),
  kind: z.enum(['unknown', 'derived']),
  mean: z.number(),
  sd: z.number(),
  q5: z.number(),
  q50: z.number(),
  q95: z.number(),
  rhat: z.number(),
  essBulk: z.number(),
  essTail: z.number(),
  mcseMean: z.number(),
  mcseQ5: z.number(),
  mcseQ50: z.number(),
  mcseQ95: z.number(),
});
export type QuantitySummary = z.infer<typeof quantitySummarySchema>;

export const VERDICT_LEVELS = ['trustworthy', 'run-longer', 'do-not-use'] as const;
export type VerdictLevel = (typeof VERDICT_LEVELS)[number];

export const verdictSchema = z.object({
  level: z.enum(VERDICT_LEVELS),
  /** One plain-language sentence. */
  reason: z.string(),
  /** Every rule that was checked, with its outcome, so the user sees why. */
  rules: z.array(z.object({ rule: z.string(), passed: z.boolean(), detail: z.string() })),
});
export type Verdict = z.infer<typeof verdictSchema>;

export const runDiagnosticsSchema = z.object({
  /** Kept draws whose transition diverged (energy error non-finite or above 1000). */
  divergences: z.number().int(),
  /**
   * Kept draws whose transition was rejected because a step could not be completed (implicit solve
   * not converged, M not positive definite, step left the region, run-back mismatch). Exact but
   * costly in efficiency. Optional so summaries stored before it existed stay valid.
   */
  rejectedSteps: z.number().int().optional(),
  acceptance: z.number(),
  stepSize: z.number(),
  maxRhat: z.number(),
  minEssBulk: z.number(),
  minEssTail: z.number(),
  /** Energy fraction of missing information per chain (absent for samplers without energy). */
  efmi: z.array(z.number()).optional(),
  /** Mean number of metric factorisations per integrator step (RHMC only). */
  factorizationsPerStep: z.number().optional(),
  /** Sampler actually used and why (when settings.sampler was 'auto'). */
  samplerUsed: z.enum(ENGINES),
  samplerReason: z.string(),
});
export type RunDiagnostics = z.infer<typeof runDiagnosticsSchema>;

export const fitSummarySchema = z.object({
  quantities: z.array(quantitySummarySchema),
  diagnostics: runDiagnosticsSchema,
  verdict: verdictSchema,
  settings: fitSettingsSchema,
  seconds: z.number(),
  /** Maximum a posteriori point, when computed. */
  mode: z.record(z.string(), z.number()).optional(),
  /**
   * Model checks computed after the chains (predictive checks from the model's replicate lines,
   * leave-one-out). Absent in summaries stored before the checks existed and in the engine's own
   * summary (the run worker adds them).
   */
  checks: runChecksSchema.optional(),
});
export type FitSummary = z.infer<typeof fitSummarySchema>;

export const fitProgressSchema = z.object({
  chain: z.number().int(),
  phase: z.enum(['warmup', 'sampling', 'done']),
  iteration: z.number().int(),
  total: z.number().int(),
  itersPerSecond: z.number(),
});
export type FitProgress = z.infer<typeof fitProgressSchema>;

// ---- what a run stores beside its rows (typed JSON columns of server/db/schema.ts) ----

/** What a run needs, frozen when it is queued. */
export interface RunSpec {
  source: string;
  /** Table name → dataset id. */
  tables: Record<string, string>;
}

/** Stored with every chain: names of the columns of its draws, and per-draw flags. */
export interface ChainStats {
  unknownNames: string[];
  derivedNames: string[];
  divergent: [number, number][];
  /** Draws whose transition was rejected (a step could not be completed); absent in older rows = none. */
  rejected?: [number, number][];
  stepSize: number | null;
  meanAcceptStat: number;
  factorizationsPerStep?: number;
  /** Per-draw acceptance statistic and energy (encodeFloats), so a resumed fit summarises exactly. */
  acceptStat?: string;
  energy?: string;
}

/** Phase durations of a run in milliseconds, e.g. { compile, warmup, sampling, diagnostics }. */
export type RunTimings = Record<string, number>;
