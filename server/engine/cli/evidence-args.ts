/**
 * Command-line arguments of the evidence command:
 *
 *   npm run evidence -- <model file> [--data name=path.csv | --data path.csv]... [--against <model>]
 *       [--hypothesis <line numbers>] [--replicates N] [--target-se X] [--seed N]
 *       [--reference auto|uniform|gaussian] [--prior-scale F] [--json]
 */
import { parseArgs } from 'node:util';
import { intOption, parseData, UsageError, type DataArg } from './args';

export { UsageError };

export const EVIDENCE_USAGE = `Usage: npm run evidence -- <model file> [options]

Computes log Z, the log of the model's normalising constant (its marginal likelihood when the
terms are prior and likelihood; the region's volume when there are no term lines), with a
standard error from independent replicates.

Options:
  --data name=path.csv     bind a CSV file as the table "name" (repeatable)
  --data path.csv          bind a CSV file under its base name ("trial.csv" → "trial")
  --against FILE           a second model on the same data: report the Bayes factor of the first
                           against it, log BF = log Z₁ − log Z₂
  --hypothesis LINES       constrain lines to test, e.g. 5 or 5,6: Bayes factor of the model with
                           them (prior renormalised to their region) against the model without
                           them = posterior mass / prior mass of their region
  --replicates N           independent replicates (2–64, default 4)
  --target-se X            add replicates (up to 64) until each log Z has a standard error ≤ X
  --seed N                 random seed (0–2147483647, default 20261201)
  --reference NAME         auto (default), uniform (bounded regions) or gaussian
  --prior-scale F          multiply the scale of every prior density by F (rates divided by F)
                           before computing, as the compare cell's sensitivity runs do
  --json                   print the result as JSON (see docs/engine.md)
  --help                   show this text`;

export interface EvidenceCliArgs {
  modelPath: string;
  againstPath?: string;
  data: DataArg[];
  hypothesis: number[];
  replicates?: number;
  targetSe?: number;
  seed?: number;
  reference?: 'auto' | 'uniform' | 'gaussian';
  /** Multiply every prior scale by this (shared/lang/prior-scale.ts). */
  priorScale?: number;
  json: boolean;
  help: boolean;
}

export function parseEvidenceArgs(argv: string[]): EvidenceCliArgs {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        data: { type: 'string', multiple: true },
        against: { type: 'string' },
        hypothesis: { type: 'string', multiple: true },
        replicates: { type: 'string' },
        'target-se': { type: 'string' },
        seed: { type: 'string' },
        reference: { type: 'string' },
        'prior-scale': { type: 'string' },
        json: { type: 'boolean' },
        help: { type: 'boolean', short: 'h' },
      },
    });
  } catch (e) {
    throw new UsageError((e as Error).message);
  }
  const { values, positionals } = parsed;
  if (values.help) return { modelPath: '', data: [], hypothesis: [], json: false, help: true };
  if (positionals.length === 0) throw new UsageError('Give the model file.');
  if (positionals.length > 1) {
    throw new UsageError(`Give exactly one model file (got ${positionals.map((p) => `"${p}"`).join(', ')}); CSV files go after --data.`);
  }
  const hypothesis: number[] = [];
  for (const raw of values.hypothesis ?? []) {
    for (const part of raw.split(/[\s,]+/).filter(Boolean)) {
      if (!/^\d+$/.test(part) || Number(part) < 1) throw new UsageError(`--hypothesis takes line numbers such as 5 or 5,6; got "${raw}".`);
      if (!hypothesis.includes(Number(part))) hypothesis.push(Number(part));
    }
  }
  if (values.hypothesis && hypothesis.length === 0) throw new UsageError('--hypothesis needs at least one line number.');
  if (hypothesis.length > 0 && values.against !== undefined) {
    throw new UsageError('Use either --against or --hypothesis, not both.');
  }
  let targetSe: number | undefined;
  if (values['target-se'] !== undefined) {
    targetSe = Number(values['target-se']);
    if (!(targetSe > 0) || !Number.isFinite(targetSe)) throw new UsageError(`--target-se needs a positive number, got "${values['target-se']}".`);
  }
  const reference = values.reference;
  if (reference !== undefined && !['auto', 'uniform', 'gaussian'].includes(reference)) {
    throw new UsageError(`--reference must be one of auto, uniform, gaussian, got "${reference}".`);
  }
  let priorScale: number | undefined;
  if (values['prior-scale'] !== undefined) {
    priorScale = Number(values['prior-scale']);
    if (!(priorScale > 0) || !Number.isFinite(priorScale)) throw new UsageError(`--prior-scale needs a positive number, got "${values['prior-scale']}".`);
  }
  const data = (values.data ?? []).map(parseData);
  const names = new Set<string>();
  for (const d of data) {
    if (names.has(d.name)) throw new UsageError(`Two --data files are bound to the table name "${d.name}".`);
    names.add(d.name);
  }
  for (const p of [positionals[0], values.against]) {
    if (p && /\.(m?ts|m?js)$/.test(p)) throw new UsageError(`"${p}": the evidence command reads model-language files only.`);
  }
  return {
    modelPath: positionals[0],
    againstPath: values.against,
    data,
    hypothesis,
    replicates: intOption('replicates', values.replicates, 2, 64),
    targetSe,
    seed: intOption('seed', values.seed, 0, 2 ** 31 - 1),
    reference: reference as EvidenceCliArgs['reference'],
    priorScale,
    json: values.json ?? false,
    help: false,
  };
}
