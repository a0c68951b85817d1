/**
 * Model checks of a run as stored with its summary and shown in the fit cell: predictive checks
 * (observed data against data sets replicated from the fitted model, or from the priors alone in a
 * prior-only run) and leave-one-out with Pareto-k per row. Compact by design: distributions are
 * binned, per-row numbers are capped (see docs/engine.md, "Model checks in the notebook").
 */
import { z } from 'zod';

/** Replicated data sets per run: the settings' bounds and the default when a fit does not say. */
export const CHECK_LIMITS = { replicates: { min: 20, max: 1000, default: 200 } } as const;

/**
 * A predictive p-value below `low` or above `high` marks an extreme statistic: the fitted model
 * rarely reproduces that feature of the data (a common-practice cut; the p-value is not a test).
 */
export const EXTREME_P = { low: 0.05, high: 0.95 } as const;
export const isExtremeP = (p: number): boolean => p < EXTREME_P.low || p > EXTREME_P.high;

/**
 * The user's own column statistic, by name: median, iqr, a quantile qP (0 < P < 1, e.g. q0.9), or
 * a share above or below a number (above:10, below:0). The built-in mean, sd, min, max and share of
 * zeros are always computed.
 */
export const CHECK_STAT_PATTERN = /^(median|iqr|q0?\.[0-9]*[1-9][0-9]*|(above|below):-?[0-9]+(\.[0-9]+)?)$/;
export const checkStatSchema = z
  .string()
  .max(24)
  .regex(CHECK_STAT_PATTERN, 'Use median, iqr, a quantile such as q0.9, or a share such as above:10 or below:0');

/** The built-in statistics' names, in display order. */
export const BUILTIN_CHECK_STATS = ['mean', 'sd', 'min', 'max', 'zeros'] as const;

/** Plain words for a statistic name. */
export function describeStat(name: string): string {
  switch (name) {
    case 'mean':
      return 'mean';
    case 'sd':
      return 'standard deviation';
    case 'min':
      return 'smallest value';
    case 'max':
      return 'largest value';
    case 'zeros':
      return 'share of zeros';
    case 'median':
      return 'median';
    case 'iqr':
      return 'interquartile range';
    default:
      break;
  }
  const q = /^q(0?\.[0-9]+)$/.exec(name);
  if (q) return `${Number(q[1]) * 100}% quantile`;
  const s = /^(above|below):(.+)$/.exec(name);
  if (s) return `share ${s[1]} ${s[2]}`;
  return name;
}

export const statCheckSchema = z.object({
  stat: z.string(),
  observed: z.number().nullable(),
  /** Mean and the 5% and 95% quantiles of the statistic over the replicated data sets. */
  mean: z.number().nullable(),
  lo: z.number().nullable(),
  hi: z.number().nullable(),
  /** Pr(T(y_rep) > T(y)) + ½·Pr(T(y_rep) = T(y)). */
  p: z.number(),
});
export type StatCheckSummary = z.infer<typeof statCheckSchema>;

export const overlaySchema = z.object({
  /** Bin edges (bins + 1 numbers, ascending). */
  edges: z.array(z.number()),
  /** Share of the observed values in each bin. */
  observed: z.array(z.number()),
  /** Per bin, quantiles (5%, 25%, 50%, 75%, 95%) of the replicated data sets' shares. */
  q05: z.array(z.number()),
  q25: z.array(z.number()),
  q50: z.array(z.number()),
  q75: z.array(z.number()),
  q95: z.array(z.number()),
  /** A thinned sample of replicated data sets' shares (at most 20), for a look at single replicates. */
  sample: z.array(z.array(z.number())),
  /** Values outside the edges (far tails of the replicates), counted but not drawn. */
  clipped: z.number().int(),
});
export type Overlay = z.infer<typeof overlaySchema>;

export const replicateCheckSchema = z.object({
  /** Name of the replicate statement, its line, density and number of values. */
  name: z.string(),
  line: z.number().int(),
  density: z.string(),
  rows: z.number().int(),
  table: z.string().optional(),
  stats: z.array(statCheckSchema),
  groups: z.array(z.object({ column: z.string(), level: z.string(), rows: z.number().int(), stats: z.array(statCheckSchema) })),
  overlay: overlaySchema.nullable(),
});
export type ReplicateCheck = z.infer<typeof replicateCheckSchema>;

/** Rows listed by name with their Pareto k at most this many (the count says how many there were). */
export const LOO_LISTED_ROWS = 50;
/** Per-row Pareto k kept for the plot when the data have at most this many rows. */
export const LOO_PLOTTED_ROWS = 5000;

export const looSummarySchema = z.object({
  elpd: z.number(),
  se: z.number(),
  mcse: z.number(),
  pLoo: z.number(),
  kThreshold: z.number(),
  draws: z.number().int(),
  rows: z.number().int(),
  kMax: z.number().nullable(),
  /** Rows with k above the threshold: their count, then the worst of them by table and 1-based row. */
  highKCount: z.number().int(),
  highK: z.array(z.object({ table: z.string(), row: z.number().int(), k: z.number().nullable() })),
  /** Pareto k per row in data order (absent above LOO_PLOTTED_ROWS rows). */
  k: z.array(z.number().nullable()).optional(),
});
export type LooSummary = z.infer<typeof looSummarySchema>;

export const runChecksSchema = z.object({
  /** 'prior': replicates from a prior-only run (no leave-one-out then). */
  kind: z.enum(['posterior', 'prior']),
  /** Replicated data sets simulated (0 when the model has no replicate line). */
  replicates: z.number().int(),
  /** Statistics computed, in order (the built-in ones, then the user's). */
  statistics: z.array(z.string()),
  items: z.array(replicateCheckSchema),
  loo: looSummarySchema.optional(),
  /** Why leave-one-out was not computed, when it was not (e.g. a prior-only run). */
  looUnavailable: z.string().optional(),
  /** Why no predictive check was computed, when none was (no replicate line, too large, time limit). */
  skipped: z.string().optional(),
  /** Posterior draws the checks used (every `thin`-th kept draw of each chain). */
  draws: z.number().int(),
  thin: z.number().int(),
});
export type RunChecks = z.infer<typeof runChecksSchema>;
