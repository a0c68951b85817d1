/**
 * Command-line arguments of the headless fit:
 *
 *   npm run fit -- <model file> [--data name=path.csv | --data path.csv]... [--chains N]
 *       [--warmup N] [--draws N] [--seed N] [--sampler auto|ENGINE] [--json]
 *       [--draws-out file.csv] [--mode] [--export NAME] [--prior-only] [--replicates N]
 *       [--replicates-out file.csv] [--check-stat NAME]...
 *
 * A model file ending in .ts, .mts, .js or .mjs is an ES module whose export (default `target`, or
 * --export NAME) is a factory called with the data tables; any other file is model-language source.
 */
import { parseArgs } from 'node:util';
import path from 'node:path';
import { ENGINES, FIT_LIMITS, SAMPLERS, type FitSettings } from '../../../shared/fit';
import { statistic } from '../predictive/ppc';

export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export const USAGE = `Usage: npm run fit -- <model file> [options]

Options:
  --data name=path.csv   bind a CSV file as the table "name" (repeatable)
  --data path.csv        bind a CSV file under its base name ("trial.csv" → "trial")
  --chains N             number of chains (${FIT_LIMITS.chains.min}–${FIT_LIMITS.chains.max}, default 4)
  --warmup N             warm-up iterations per chain (${FIT_LIMITS.warmup.min}–${FIT_LIMITS.warmup.max}, default 1000)
  --draws N              kept draws per chain (${FIT_LIMITS.draws.min}–${FIT_LIMITS.draws.max}, default 1000)
  --seed N               random seed (0–2147483647, default 20261201)
  --sampler NAME         auto (default) or an engine: ${ENGINES.join(', ')}
  --mode                 also report the maximum a posteriori point
  --json                 print the summary as JSON (see docs/engine.md)
  --draws-out FILE       write every draw to FILE as CSV with chain and iteration columns
  --export NAME          for a .ts/.js model module: the factory's export name (default "target")
  --prior-only           fit the prior alone: every term line that reads a data column is dropped
  --replicates N         simulate N data sets from the model's replicate lines (default 500 for the
                         checks) and write them to the --replicates-out file
  --replicates-out FILE  where --replicates writes (default: <model name>.replicates.csv)
  --check-stat NAME      one more statistic for the predictive checks (repeatable): median, iqr,
                         a quantile such as q0.9, or a share such as above:10 or below:0
  --help                 show this text`;

export interface DataArg {
  name: string;
  path: string;
}

export interface CliArgs {
  modelPath: string;
  /** 'module' for .ts/.mts/.js/.mjs files, 'program' otherwise. */
  modelKind: 'program' | 'module';
  exportName: string;
  data: DataArg[];
  settings: Partial<FitSettings>;
  json: boolean;
  drawsOut?: string;
  mode: boolean;
  help: boolean;
  /** Fit with the likelihood terms dropped. */
  priorOnly: boolean;
  /** --replicates N: number of replicated data sets to simulate and write. */
  replicates?: number;
  /** Where the replicates are written (set whenever --replicates is given). */
  replicatesOut?: string;
  /** Extra statistics for the predictive checks. */
  checkStats: string[];
}

/** Most replicated data sets one run simulates. */
export const MAX_REPLICATES = 20000;

const TABLE_NAME_RE = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** A whole-number option within [min, max] (undefined when absent). */
export function intOption(flag: string, raw: string | undefined, min: number, max: number): number | undefined {
  if (raw === undefined) return undefined;
  if (!/^\d+$/.test(raw.trim())) throw new UsageError(`--${flag} needs a whole number, got "${raw}".`);
  const v = Number(raw);
  if (v < min || v > max) throw new UsageError(`--${flag} must be between ${min} and ${max}, got ${v}.`);
  return v;
}

/** `--data name=path` or `--data path` (the table named after the file). */
export function parseData(raw: string): DataArg {
  const eq = raw.indexOf('=');
  // "name=path" unless the part before "=" looks like a path (contains a separator or a dot).
  if (eq > 0 && !/[\\/.]/.test(raw.slice(0, eq))) {
    const name = raw.slice(0, eq);
    const p = raw.slice(eq + 1);
    if (!TABLE_NAME_RE.test(name)) throw new UsageError(`--data: "${name}" is not a valid table name.`);
    if (!p) throw new UsageError(`--data ${raw}: the file path is missing.`);
    return { name, path: p };
  }
  const base = path.basename(raw).replace(/\.[^.]*$/, '');
  if (!TABLE_NAME_RE.test(base)) {
    throw new UsageError(
      `--data ${raw}: "${base}" cannot be a table name; give one explicitly as --data name=${raw}.`,
    );
  }
  return { name: base, path: raw };
}

export function parseCliArgs(argv: string[]): CliArgs {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        data: { type: 'string', multiple: true },
        chains: { type: 'string' },
        warmup: { type: 'string' },
        draws: { type: 'string' },
        seed: { type: 'string' },
        sampler: { type: 'string' },
        json: { type: 'boolean' },
        'draws-out': { type: 'string' },
        mode: { type: 'boolean' },
        export: { type: 'string' },
        'prior-only': { type: 'boolean' },
        replicates: { type: 'string' },
        'replicates-out': { type: 'string' },
        'check-stat': { type: 'string', multiple: true },
        help: { type: 'boolean', short: 'h' },
      },
    });
  } catch (e) {
    throw new UsageError((e as Error).message);
  }
  const { values, positionals } = parsed;
  if (values.help) {
    return {
      modelPath: '', modelKind: 'program', exportName: 'target', data: [], settings: {},
      json: false, mode: false, help: true, priorOnly: false, checkStats: [],
    };
  }
  if (positionals.length === 0) throw new UsageError('Give the model file to fit.');
  if (positionals.length > 1) {
    throw new UsageError(`Give exactly one model file (got ${positionals.map((p) => `"${p}"`).join(', ')}); CSV files go after --data.`);
  }
  const modelPath = positionals[0];
  const modelKind = /\.(m?ts|m?js)$/.test(modelPath) ? 'module' : 'program';

  const settings: Partial<FitSettings> = {};
  const chains = intOption('chains', values.chains, FIT_LIMITS.chains.min, FIT_LIMITS.chains.max);
  const warmup = intOption('warmup', values.warmup, FIT_LIMITS.warmup.min, FIT_LIMITS.warmup.max);
  const draws = intOption('draws', values.draws, FIT_LIMITS.draws.min, FIT_LIMITS.draws.max);
  const seed = intOption('seed', values.seed, 0, 2 ** 31 - 1);
  if (chains !== undefined) settings.chains = chains;
  if (warmup !== undefined) settings.warmup = warmup;
  if (draws !== undefined) settings.draws = draws;
  if (seed !== undefined) settings.seed = seed;
  if (values.sampler !== undefined) {
    if (!(SAMPLERS as readonly string[]).includes(values.sampler)) {
      throw new UsageError(`--sampler must be one of ${SAMPLERS.join(', ')}, got "${values.sampler}".`);
    }
    settings.sampler = values.sampler as FitSettings['sampler'];
  }

  const data = (values.data ?? []).map(parseData);
  const names = new Set<string>();
  for (const d of data) {
    if (names.has(d.name)) throw new UsageError(`Two --data files are bound to the table name "${d.name}".`);
    names.add(d.name);
  }
  if (values.export !== undefined && modelKind !== 'module') {
    throw new UsageError('--export applies only to a .ts or .js model module.');
  }

  const replicates = intOption('replicates', values.replicates, 1, MAX_REPLICATES);
  if (values['replicates-out'] !== undefined && replicates === undefined) {
    throw new UsageError('--replicates-out needs --replicates N (how many data sets to write).');
  }
  const priorOnly = values['prior-only'] ?? false;
  if (modelKind === 'module' && (priorOnly || replicates !== undefined || values['check-stat'])) {
    throw new UsageError('--prior-only, --replicates and --check-stat apply only to model-language programs.');
  }
  const checkStats = values['check-stat'] ?? [];
  for (const s of checkStats) {
    try {
      statistic(s);
    } catch (e) {
      throw new UsageError(`--check-stat: ${(e as Error).message}.`);
    }
  }
  const replicatesOut =
    replicates === undefined ? undefined : (values['replicates-out'] ?? `${path.basename(modelPath).replace(/\.[^.]*$/, '')}.replicates.csv`);

  return {
    modelPath,
    modelKind,
    exportName: values.export ?? 'target',
    data,
    settings,
    json: values.json ?? false,
    drawsOut: values['draws-out'],
    mode: values.mode ?? false,
    help: false,
    priorOnly,
    ...(replicates !== undefined ? { replicates, replicatesOut } : {}),
    checkStats,
  };
}
