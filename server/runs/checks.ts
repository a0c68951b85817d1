/**
 * The model checks of a finished fit, computed on the compute pool (never on the event loop of the
 * process that holds the run): replicated data from a bounded sample of draws, test statistics with
 * their predictive p-values (overall and per group), and leave-one-out with Pareto k per row. The
 * answer rides in the run's summary (FitSummary.checks). Too large a problem, or a computation past
 * its time limit, gives checks that say why they were skipped instead of failing the run.
 */
import { BUILTIN_CHECK_STATS, CHECK_LIMITS, type RunChecks } from '../../shared/checks';
import type { FitSettings } from '../../shared/fit';
import { computePool } from '../compute/pool';
import type { DataTables } from '../engine/types';

/** Posterior draws the checks read at most (every t-th kept draw of each chain beyond this). */
export const CHECK_MAX_DRAWS = 4000;
/** Largest replicated data: replicates × values of all replicate lines (numbers). */
export const CHECK_MAX_REPLICATED = 10_000_000;
/** Largest draws × rows matrix of pointwise log-likelihoods (its draws are thinned to fit). */
export const CHECK_LOO_MAX_CELLS = 4_000_000;
/** Time limit of the checks' computation on the compute pool. */
export const CHECK_TIMEOUT_MS = 60_000;

export interface ModelChecksInput {
  source: string;
  tables: DataTables;
  unknownNames: string[];
  /** Each chain's draws of the unknowns (draws × unknowns, row-major), already thinned. */
  chains: { draws: Float64Array }[];
  priorOnly: boolean;
  seed: number;
  replicates: number;
  statistics: string[];
  looMaxCells: number;
  /** For the summary: draws used and the stride they were taken with. */
  draws: number;
  thin: number;
}

/** The statistics a fit's checks compute: the built-in ones, then the user's own (once). */
export function checkStatistics(settings: Pick<FitSettings, 'checkStat'>): string[] {
  const out: string[] = [...BUILTIN_CHECK_STATS];
  if (settings.checkStat && !out.includes(settings.checkStat)) out.push(settings.checkStat);
  return out;
}

/** A checks answer that computed nothing, saying why. */
export function skippedChecks(settings: Pick<FitSettings, 'priorOnly' | 'checkStat'>, why: string): RunChecks {
  return { kind: settings.priorOnly ? 'prior' : 'posterior', replicates: 0, statistics: checkStatistics(settings), items: [], skipped: why, draws: 0, thin: 1 };
}

/**
 * The task's input from a fit's chains: every t-th draw of each chain so at most CHECK_MAX_DRAWS
 * are used, or a reason to skip when the data are too large for the limits above.
 */
export function checksInput(
  source: string,
  tables: DataTables,
  fit: { unknownNames: string[]; chains: { draws: Float64Array }[] },
  settings: FitSettings,
): { ok: true; input: ModelChecksInput } | { ok: false; reason: string } {
  const dim = fit.unknownNames.length;
  const replicates = settings.replicates ?? CHECK_LIMITS.replicates.default;
  const rows = Object.values(tables).reduce((n, t) => n + t.rows, 0);
  if (replicates * rows > CHECK_MAX_REPLICATED)
    return {
      ok: false,
      reason: `${replicates} replicated data sets of ${rows.toLocaleString('en')} rows would be ${(replicates * rows).toLocaleString('en')} numbers; the checks allow ${CHECK_MAX_REPLICATED.toLocaleString('en')}. Ask for fewer replicated data sets`,
    };
  const total = fit.chains.reduce((n, c) => n + (dim > 0 ? c.draws.length / dim : 0), 0);
  if (total === 0) return { ok: false, reason: 'the fit kept no draws' };
  const thin = Math.max(1, Math.ceil(total / CHECK_MAX_DRAWS));
  let used = 0;
  const chains = fit.chains.map((c) => {
    const n = c.draws.length / dim;
    const keep = Math.ceil(n / thin);
    const out = new Float64Array(keep * dim);
    for (let j = 0; j < keep; j++) out.set(c.draws.subarray(j * thin * dim, (j * thin + 1) * dim), j * dim);
    used += keep;
    return { draws: out };
  });
  return {
    ok: true,
    input: {
      source,
      tables,
      unknownNames: fit.unknownNames.slice(),
      chains,
      priorOnly: settings.priorOnly ?? false,
      seed: settings.seed,
      replicates,
      statistics: checkStatistics(settings),
      looMaxCells: CHECK_LOO_MAX_CELLS,
      draws: used,
      thin,
    },
  };
}

/**
 * The checks of a fit, on the compute pool. Never throws: a failure or the time limit is reported
 * in `skipped`, so the run keeps its draws and summary.
 */
export async function computeRunChecks(
  source: string,
  tables: DataTables,
  fit: { unknownNames: string[]; chains: { draws: Float64Array }[] },
  settings: FitSettings,
  opts: { timeoutMs?: number } = {},
): Promise<RunChecks> {
  const timeoutMs = opts.timeoutMs ?? CHECK_TIMEOUT_MS;
  const prep = checksInput(source, tables, fit, settings);
  if (!prep.ok) return skippedChecks(settings, prep.reason);
  try {
    return await computePool().run('modelChecks', prep.input, {
      timeoutMs,
      transfer: prep.input.chains.map((c) => c.draws.buffer as ArrayBuffer),
    });
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    return skippedChecks(
      settings,
      e instanceof Error && e.name === 'ComputeTimeoutError'
        ? `the checks took longer than ${timeoutMs / 1000} s and were stopped; ask for fewer replicated data sets`
        : `the checks could not be computed: ${msg}`,
    );
  }
}
