/**
 * Evidence command: `npm run evidence -- <model file> [options]` (see evidence-args.ts).
 *
 * Runs in-process (it is a command, not the server). Exit codes: 0 computed; 1 the model, data or
 * computation failed; 2 the command line was wrong; Ctrl-C ends the process (status 130). An
 * AbortSignal passed by a caller (opts.signal) is checked between annealing stages.
 */
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import type { EvidenceOptions, EvidenceResult } from '../evidence';
import { programEvidence, testHypothesis, type HypothesisResult } from '../evidence/program';
import { loadTables, processIo, readOrFail, type CliIo } from './fit';
import { scalePriors } from '../../../shared/lang/prior-scale';
import { dataSchemaOf as schemaOf } from '../../../shared/lang/index';
import { EVIDENCE_USAGE, parseEvidenceArgs, UsageError, type EvidenceCliArgs } from './evidence-args';

export interface EvidenceCliOptions {
  signal?: AbortSignal;
}

const r4 = (x: number | null) => (x === null || !Number.isFinite(x) ? x : Number(x.toPrecision(6)));

function evidenceJson(r: EvidenceResult, model: string) {
  return {
    model,
    logZ: r4(r.logZ),
    se: r4(r.se),
    volumeLog: r4(r.volumeLog),
    volumeSe: r4(r.volumeSe),
    reference: r.reference,
    dimension: r.dimension,
    replicates: r.replicates,
    replicateLogZ: r.replicateLogZ.map((x) => r4(x)),
    stages: r.stages,
    draws: r.draws,
    seconds: r4(r.seconds),
  };
}

function pm(x: number, se: number): string {
  return `${x.toFixed(4)} ± ${se.toFixed(4)}`;
}

function describe(r: EvidenceResult, name: string): string[] {
  const lines = [`${name}`];
  if (r.reference === 'volume') lines.push(`  log volume        ${pm(r.volumeLog!, r.volumeSe!)}   (volume ${Math.exp(r.volumeLog!).toPrecision(4)})`);
  lines.push(`  log Z             ${pm(r.logZ, r.se)}`);
  if (r.reference !== 'volume' && r.volumeLog !== null) lines.push(`  log volume        ${pm(r.volumeLog, r.volumeSe!)}`);
  lines.push(
    `  reference ${r.reference}, dimension ${r.dimension}, ${r.replicates} replicates, ${r.stages} stages each, ${r.draws} draws, ${r.seconds.toFixed(2)} s`,
  );
  return lines;
}

function hypothesisText(h: HypothesisResult, model: string): string {
  const lines = [
    `${model}: constrain line(s) ${h.lines.join(', ')} against the model without them`,
    `  log BF            ${pm(h.logBF, h.se)}   (BF ${Math.exp(h.logBF).toPrecision(4)})`,
    `  posterior mass    ${Math.exp(h.posterior.log).toPrecision(4)}   (log ${pm(h.posterior.log, h.posterior.se)})`,
    `  prior mass        ${Math.exp(h.prior.log).toPrecision(4)}   (log ${pm(h.prior.log, h.prior.se)})`,
    `  prior = the model without its likelihood line(s) ${h.likelihoodLines.join(', ') || '(none)'}`,
    `  ${h.stages} stages, ${h.draws} draws, ${h.seconds.toFixed(2)} s in all`,
  ];
  return lines.join('\n');
}

/** Runs the command; returns the exit code. */
export async function main(argv: string[], io: CliIo = processIo, opts: EvidenceCliOptions = {}): Promise<number> {
  let args: EvidenceCliArgs;
  try {
    args = parseEvidenceArgs(argv);
  } catch (e) {
    if (e instanceof UsageError) {
      io.stderr(`${e.message}\n\n${EVIDENCE_USAGE}\n`);
      return 2;
    }
    throw e;
  }
  if (args.help) {
    io.stdout(`${EVIDENCE_USAGE}\n`);
    return 0;
  }
  let currentModel = args.modelPath;
  try {
    const started = performance.now();
    const tables = loadTables(args, io);
    const written = new TextDecoder('utf-8').decode(readOrFail(io, args.modelPath, 'model file'));
    const scaled = args.priorScale !== undefined && args.priorScale !== 1 ? scalePriors(written, schemaOf(tables), args.priorScale) : null;
    const source = scaled?.source ?? written;
    const model = path.basename(args.modelPath);
    const eo: EvidenceOptions = {
      replicates: args.replicates,
      targetSe: args.targetSe,
      seed: args.seed,
      reference: args.reference,
      signal: opts.signal,
      onReplicate: io.progress ? (i, z) => io.stderr(`\rreplicate ${i + 1}: log Z ${z.toFixed(4)}        `) : undefined,
    };
    // Let a Ctrl-C that arrived while reading land before the heavy work starts.
    await new Promise((r) => setImmediate(r));
    const clear = () => {
      if (io.progress) io.stderr('\r' + ' '.repeat(60) + '\r');
    };
    if (args.hypothesis.length > 0) {
      const h = testHypothesis(source, tables, args.hypothesis, eo);
      clear();
      const own = h.posterior.withLines;
      if (args.json) {
        io.stdout(
          JSON.stringify(
            {
              format: 'slackline-evidence',
              version: 1,
              ...evidenceJson(own, model),
              stages: h.stages,
              draws: h.draws,
              seconds: r4(h.seconds),
              hypothesis: {
                lines: h.lines,
                logBF: r4(h.logBF),
                se: r4(h.se),
                priorMass: Math.exp(h.prior.log),
                posteriorMass: Math.exp(h.posterior.log),
                logPriorMass: r4(h.prior.log),
                logPriorMassSe: r4(h.prior.se),
                logPosteriorMass: r4(h.posterior.log),
                logPosteriorMassSe: r4(h.posterior.se),
                likelihoodLines: h.likelihoodLines,
              },
            },
            null,
            2,
          ) + '\n',
        );
      } else io.stdout(hypothesisText(h, model) + '\n');
      return 0;
    }
    const a = programEvidence(source, tables, eo);
    clear();
    if (!args.againstPath) {
      if (args.json) {
        io.stdout(JSON.stringify({ format: 'slackline-evidence', version: 1, ...evidenceJson(a, model) }, null, 2) + '\n');
      } else io.stdout(describe(a, model).join('\n') + '\n');
      return 0;
    }
    currentModel = args.againstPath;
    const otherWritten = new TextDecoder('utf-8').decode(readOrFail(io, args.againstPath, 'model file'));
    const otherSource = args.priorScale !== undefined && args.priorScale !== 1 ? scalePriors(otherWritten, schemaOf(tables), args.priorScale).source : otherWritten;
    const other = path.basename(args.againstPath);
    const b = programEvidence(otherSource, tables, { ...eo, seed: (args.seed ?? 20261201) + 1 });
    clear();
    const logBF = a.logZ - b.logZ;
    const se = Math.hypot(a.se, b.se);
    const seconds = (performance.now() - started) / 1000;
    if (args.json) {
      io.stdout(
        JSON.stringify(
          {
            format: 'slackline-evidence',
            version: 1,
            ...evidenceJson(a, model),
            stages: a.stages + b.stages,
            draws: a.draws + b.draws,
            seconds: r4(seconds),
            against: evidenceJson(b, other),
            comparison: { logBF: r4(logBF), se: r4(se) },
          },
          null,
          2,
        ) + '\n',
      );
    } else {
      io.stdout(
        [
          ...describe(a, model),
          ...describe(b, other),
          `${model} against ${other}: log BF ${pm(logBF, se)}   (BF ${Math.exp(logBF).toPrecision(4)})`,
        ].join('\n') + '\n',
      );
    }
    return 0;
  } catch (e) {
    const err = e as Error & { messages?: { line: number; column: number; message: string; severity?: string; suggestion?: string }[] };
    if (err?.name === 'AbortError') {
      io.stderr('Cancelled.\n');
      return 130;
    }
    if (err?.name === 'CompileError' && Array.isArray(err.messages)) {
      for (const m of err.messages) {
        const sev = m.severity && m.severity !== 'error' ? `${m.severity}: ` : '';
        const hint = m.suggestion ? ` (${m.suggestion})` : '';
        io.stderr(`${currentModel}:${m.line}:${m.column}: ${sev}${m.message}${hint}\n`);
      }
      if (err.messages.length === 0) io.stderr(`${currentModel}: ${err.message}\n`);
      return 1;
    }
    io.stderr(`${err?.message ?? String(e)}\n`);
    return 1;
  }
}

const invokedDirectly = process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href;
if (invokedDirectly) {
  // The computation runs synchronously in this thread, so Ctrl-C keeps Node's default (the process
  // ends at once, exit status 130 in the shell) rather than an abort signal that could not land.
  main(process.argv.slice(2), processIo).then(
    (code) => process.exit(code),
    (e) => {
      process.stderr.write(`${(e as Error).stack ?? e}\n`);
      process.exit(1);
    },
  );
}
