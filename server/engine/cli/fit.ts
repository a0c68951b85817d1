/**
 * Headless fit: `npm run fit -- <model file> [options]` (see args.ts for the options).
 *
 * Exit codes: 0 the fit ran (whatever its verdict — read it); 1 the model, data or fit failed;
 * 2 the command line was wrong; 130 cancelled with Ctrl-C.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { parseCsv } from '../../../shared/data';
import type { DataTables, TargetSpec } from '../types';
import { runFit } from '../fit';
import { parseCliArgs, USAGE, UsageError, type CliArgs, type DataArg } from './args';
import { drawsCsv, summaryJson, summaryTable } from './format';
import { checkProgram, dataSchemaOf } from '../../../shared/lang/index';
import { runModelChecks, type ModelChecks } from '../predictive/checks';
import { checksJson, checksTable, replicatesCsv } from './checks-format';

export interface CliIo {
  stdout(text: string): void;
  stderr(text: string): void;
  readFile(file: string): Uint8Array;
  writeFile(file: string, text: string): void;
  /** Whether to draw a progress line on stderr. */
  progress: boolean;
}

export const processIo: CliIo = {
  stdout: (t) => process.stdout.write(t),
  stderr: (t) => process.stderr.write(t),
  readFile: (f) => readFileSync(f),
  writeFile: (f, t) => writeFileSync(f, t),
  progress: Boolean(process.stderr.isTTY),
};

export interface CliOptions {
  /** Run chains in worker threads (default true). */
  parallel?: boolean;
  signal?: AbortSignal;
}

/** The file's bytes, or an InputError saying why it cannot be read. */
export function readOrFail(io: CliIo, file: string, what: string): Uint8Array {
  try {
    return io.readFile(file);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a folder' : (e as Error).message;
    throw new InputError(`Cannot read ${what} "${file}": ${why}.`);
  }
}

/** A problem with the command's input files: reported in one line, exit code 1. */
export class InputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'InputError';
  }
}

/** Reads and parses every `--data` file; each CSV problem goes to stderr with its file name. */
export function loadTables(args: { data: readonly DataArg[] }, io: CliIo): DataTables {
  const tables: DataTables = {};
  for (const d of args.data) {
    const bytes = readOrFail(io, d.path, 'data file');
    const r = parseCsv(bytes);
    for (const issue of r.issues) {
      // Each message names its own row and column.
      io.stderr(`${d.path}: ${issue.severity}: ${issue.message}\n`);
    }
    if (!r.table) throw new InputError(`The data file "${d.path}" has errors (listed above).`);
    tables[d.name] = r.table;
  }
  return tables;
}

function buildSpec(args: CliArgs, io: CliIo, tables: DataTables): TargetSpec {
  if (args.modelKind === 'module') {
    readOrFail(io, args.modelPath, 'model module');
    return {
      kind: 'module',
      modulePath: pathToFileURL(path.resolve(args.modelPath)).href,
      exportName: args.exportName,
      args: tables,
    };
  }
  const source = new TextDecoder('utf-8').decode(readOrFail(io, args.modelPath, 'model file'));
  return { kind: 'program', source, tables, ...(args.priorOnly ? { priorOnly: true } : {}) };
}

/** Runs the command; returns the exit code. */
export async function main(argv: string[], io: CliIo = processIo, opts: CliOptions = {}): Promise<number> {
  let args: CliArgs;
  try {
    args = parseCliArgs(argv);
  } catch (e) {
    if (e instanceof UsageError) {
      io.stderr(`${e.message}\n\n${USAGE}\n`);
      return 2;
    }
    throw e;
  }
  if (args.help) {
    io.stdout(`${USAGE}\n`);
    return 0;
  }
  try {
    const tables = loadTables(args, io);
    const spec = buildSpec(args, io, tables);
    let lastLine = 0;
    const result = await runFit(spec, args.settings, {
      parallel: opts.parallel ?? true,
      signal: opts.signal,
      computeMode: args.mode,
      onProgress: io.progress
        ? (p) => {
            const now = Date.now();
            if (now - lastLine < 200 && p.phase !== 'done') return;
            lastLine = now;
            io.stderr(`\rchain ${p.chain + 1}: ${p.phase} ${p.iteration}/${p.total} (${Math.round(p.itersPerSecond)} it/s)   `);
          }
        : undefined,
    });
    if (io.progress) io.stderr('\r' + ' '.repeat(60) + '\r');
    if (args.mode && !result.summary.mode) {
      io.stderr('The maximum a posteriori search did not converge, so no mode is reported.\n');
    }
    const model = path.basename(args.modelPath);
    let checks: ModelChecks | undefined;
    if (spec.kind === 'program') {
      checks = runModelChecks(checkProgram(spec.source, dataSchemaOf(spec.tables)), spec.tables, result, {
        seed: result.summary.settings.seed,
        replicates: args.replicates,
        extraStats: args.checkStats,
        kind: args.priorOnly ? 'prior' : 'posterior',
      });
    }
    if (args.json) {
      const extra = { ...(args.priorOnly ? { priorOnly: true } : {}), ...(checks ? checksJson(checks) : {}) };
      io.stdout(summaryJson(result.summary, model, extra) + '\n');
    } else {
      const prior = args.priorOnly ? '\n\nPrior-only run: every term line that reads a data column was left out.' : '';
      io.stdout(summaryTable(result.summary, model) + prior + (checks ? checksTable(checks) : '') + '\n');
    }
    if (args.replicatesOut && checks) {
      if (!checks.replicated.length) {
        io.stderr('The model has no replicate line, so no replicated data were written.\n');
      } else {
        try {
          io.writeFile(args.replicatesOut, replicatesCsv(checks, result));
        } catch (e) {
          throw new InputError(`Cannot write the replicates to "${args.replicatesOut}": ${(e as Error).message}`);
        }
        if (!args.json) io.stdout(`Replicated data written to ${args.replicatesOut}.\n`);
      }
    }
    if (args.drawsOut) {
      try {
        io.writeFile(args.drawsOut, drawsCsv(result));
      } catch (e) {
        throw new InputError(`Cannot write the draws to "${args.drawsOut}": ${(e as Error).message}`);
      }
      if (!args.json) io.stdout(`Draws written to ${args.drawsOut}.\n`);
    }
    return 0;
  } catch (e) {
    return reportFailure(e, args, io);
  }
}

function reportFailure(e: unknown, args: CliArgs, io: CliIo): number {
  const err = e as Error & {
    messages?: { line: number; column: number; message: string; severity?: string; suggestion?: string }[];
    conflicting?: string[];
  };
  if (err?.name === 'AbortError') {
    io.stderr('Cancelled.\n');
    return 130;
  }
  if (err?.name === 'CompileError' && Array.isArray(err.messages)) {
    for (const m of err.messages) {
      const sev = m.severity && m.severity !== 'error' ? `${m.severity}: ` : '';
      const hint = m.suggestion ? ` (${m.suggestion})` : '';
      io.stderr(`${args.modelPath}:${m.line}:${m.column}: ${sev}${m.message}${hint}\n`);
    }
    if (err.messages.length === 0) io.stderr(`${args.modelPath}: ${err.message}\n`);
    return 1;
  }
  io.stderr(`${err?.message ?? String(e)}\n`);
  return 1;
}

const invokedDirectly = process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href;
if (invokedDirectly) {
  const controller = new AbortController();
  process.on('SIGINT', () => controller.abort());
  main(process.argv.slice(2), processIo, { signal: controller.signal }).then(
    (code) => process.exit(code),
    (e) => {
      process.stderr.write(`${(e as Error).stack ?? e}\n`);
      process.exit(1);
    },
  );
}
