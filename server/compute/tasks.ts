/**
 * The work the compute pool runs off the main thread: parsing an uploaded table (and encoding it as
 * the typed columns stored beside the CSV), the
 * model check with its region test, and reading stored draws for plots and the CSV export.
 * Each task takes and returns structured-cloneable values (typed arrays travel as transfers).
 */
import { parseCsv, type ParsedTable } from '../../shared/data';
import { drawsCsvHeader, drawsCsvRows } from '../../shared/export-csv';
import { encodeDrawsBody } from '../../shared/draws-binary';
import type { CompileResponse, DatasetColumn, RegionSystem } from '../../shared/api/notebook';
import type { DataTables, TargetSpec } from '../engine/types';
import { planFit, runFitChain, type FitPlan } from '../engine/fit';
import type { FitSettings } from '../../shared/fit';
import { decodeDraws, decodeFlags, encodeChain, type DrawNames, type EncodedChain } from '../runs/draws-codec';
import type { ChainResult } from '../engine/types';
import { checkModel, regionSystem } from '../notebook/model';
import { columnsOf, describeCsvErrors } from '../notebook/tables';
import { encodeTableColumns } from '../notebook/table-columns';
import { PROJECTION_MAX_UNKNOWNS, regionProjections } from '../notebook/projections';
import type { RegionProjection, RunDraws } from '../../shared/api/notebook';
import { BUILTIN_CHECK_STATS, type RunChecks } from '../../shared/checks';
import { checkProgram, dataSchemaOf } from '../../shared/lang/index';
import { runModelChecks } from '../engine/predictive/checks';
import { summariseChecks } from '../engine/predictive/summary';
import type { ModelChecksInput } from '../runs/checks';

export type ParseTableOutput =
  | { ok: true; table: ParsedTable; columns: DatasetColumn[]; rows: number; /** The table as stored typed columns (server/notebook/table-columns.ts). */ stored: Uint8Array }
  | { ok: false; message: string; field: string };

export interface CheckModelInput {
  source: string;
  tables: DataTables;
  /** Test the constraint set for an interior point (the slow part). */
  region: boolean;
  /** Also return the constraint rows for the feasible-region view when they have this many columns. */
  regionNames?: string[];
}
export interface CheckModelOutput {
  response: CompileResponse;
  /** Unknown coordinates of the model. */
  dim: number;
  derivedNames: string[];
  regionSystem: RegionSystem | null;
}

export interface StoredChainInput {
  chain: number;
  draws: Uint8Array;
  drawCount: number;
  dimension: number;
  divergent: [number, number][];
}
export interface ThinDrawsOutput {
  thin: number;
  drawsPerChain: number;
  /** The binary body of the draws response (shared/draws-binary.ts). */
  body: Uint8Array;
}

type Task<I, O> = (input: I) => { output: O; transfer?: ArrayBuffer[] } | Promise<{ output: O; transfer?: ArrayBuffer[] }>;

const asBuffer = (u: Uint8Array) => Buffer.from(u.buffer, u.byteOffset, u.byteLength);

const parseTable: Task<{ bytes: Uint8Array }, ParseTableOutput> = ({ bytes }) => {
  const result = parseCsv(bytes);
  if (!result.table) {
    return { output: { ok: false, message: describeCsvErrors(result), field: result.issues.find((i) => i.severity === 'error')?.message ?? 'Not a usable CSV file' } };
  }
  const stored = encodeTableColumns(result.table);
  const transfer = [...Object.values(result.table.columns).map((c) => c.values.buffer as ArrayBuffer), stored.buffer as ArrayBuffer];
  return { output: { ok: true, table: result.table, columns: columnsOf(result), rows: result.table.rows, stored }, transfer };
};

const check: Task<CheckModelInput, CheckModelOutput> = ({ source, tables, region, regionNames }) => {
  const m = checkModel(source, tables, region);
  const sys = regionNames && m.rows && m.rows.inequalities.cols === regionNames.length ? regionSystem(regionNames, m.rows) : null;
  return { output: { response: m.response, dim: m.check.dim, derivedNames: m.check.derivedNames.slice(), regionSystem: sys } };
};

/**
 * Every `thin`-th draw of each chain, at most `max` per chain, encoded once as the columnar binary
 * body the plots read (shared/draws-binary.ts: Float32 blocks per chain and quantity, then flags).
 */
const thinDraws: Task<{ chains: StoredChainInput[]; quantities: number; max: number }, ThinDrawsOutput> = ({ chains, quantities, max }) => {
  const n = chains[0]?.drawCount ?? 0;
  // A regular stride, so "every thin-th draw" is exact and iterations can be labelled.
  const thin = Math.max(1, Math.ceil(n / Math.max(1, max)));
  const idx: number[] = [];
  for (let t = 0; t < n; t += thin) idx.push(t);
  const body = encodeDrawsBody(
    chains.map((c) => ({ rows: decodeDraws(asBuffer(c.draws), c.drawCount, c.dimension), dimension: c.dimension, divergent: decodeFlags(c.divergent, c.drawCount) })),
    quantities,
    idx,
  );
  return { output: { thin, drawsPerChain: idx.length, body }, transfer: [body.buffer as ArrayBuffer] };
};

/**
 * The feasible-region view's polygons for a run: the range of each of the first unknowns over every
 * kept draw (for the clip box of unbounded pairs), then the region's projections (small LPs).
 */
const projections: Task<{ region: NonNullable<RunDraws['region']>; chains: StoredChainInput[] }, RegionProjection[]> = ({ region, chains }) => {
  const k = Math.min(region.names.length, PROJECTION_MAX_UNKNOWNS);
  const ranges: [number, number][] = Array.from({ length: k }, () => [Infinity, -Infinity]);
  for (const c of chains) {
    const draws = decodeDraws(asBuffer(c.draws), c.drawCount, c.dimension);
    for (let t = 0; t < c.drawCount; t++)
      for (let q = 0; q < k; q++) {
        const v = draws[t * c.dimension + q];
        if (v < ranges[q][0]) ranges[q][0] = v;
        if (v > ranges[q][1]) ranges[q][1] = v;
      }
  }
  return { output: regionProjections(region, ranges) };
};

/**
 * One bounded piece of the draws export as UTF-8 CSV: the header when `names` is given, then the
 * rows of `drawCount` consecutive draws of one chain starting at iteration `firstIteration` (1-based).
 * The server streams the pieces to the response one after another (server/runs/read.ts).
 */
const drawsCsvChunk: Task<{ names?: string[]; chain: number; firstIteration: number; draws: Uint8Array; drawCount: number; dimension: number }, Uint8Array> = (x) => {
  const parts: string[] = x.names ? [drawsCsvHeader(x.names) + '\n'] : [];
  const draws = decodeDraws(asBuffer(x.draws), x.drawCount, x.dimension);
  // Stored draws hold unknowns and derived quantities side by side in one row.
  for (const row of drawsCsvRows(x.chain, draws, x.dimension, new Float64Array(0), 0, x.firstIteration)) parts.push(row + '\n');
  const bytes = new TextEncoder().encode(parts.join(''));
  return { output: bytes, transfer: [bytes.buffer as ArrayBuffer] };
};

const encode: Task<{ names: DrawNames; chain: ChainResult }, EncodedChain> = ({ names, chain }) => {
  const enc = encodeChain(names, chain);
  const own = enc.draws.byteOffset === 0 && enc.draws.byteLength === enc.draws.buffer.byteLength;
  return { output: enc, transfer: own ? [enc.draws.buffer as ArrayBuffer] : [] };
};

export interface PilotFitOutput {
  /** The engine the fit will run (the automatic choice decided here, as every chain would). */
  plan: FitPlan;
  /** Seconds per iteration (warm-up and draws together) of a short timed chain with that engine. */
  secondsPerIteration: number;
  pilotIterations: number;
}

/**
 * A short timed pilot of a fit: its engine (the automatic choice by pilots when asked), then one
 * untimed short chain, then one chain of that engine lengthened ×4 until it takes at least 100 ms
 * (or 6,400 iterations).
 */
const pilotFit: Task<{ source: string; tables: DataTables; settings: FitSettings }, PilotFitOutput> = async ({ source, tables, settings }) => {
  const spec: TargetSpec = { kind: 'program', source, tables };
  const plan = await planFit(spec, settings, { parallel: false });
  // One untimed short chain first: building the target and the first iterations (compilation in
  // this thread) cost once, not per iteration.
  await runFitChain(spec, { ...settings, chains: 1, warmup: 50, draws: 50 }, 0, plan, { parallel: false });
  let half = 50;
  for (;;) {
    const t0 = performance.now();
    await runFitChain(spec, { ...settings, chains: 1, warmup: half, draws: half }, 0, plan, { parallel: false });
    const seconds = (performance.now() - t0) / 1000;
    if (seconds >= 0.1 || half >= 3200) return { output: { plan, secondsPerIteration: seconds / (2 * half), pilotIterations: 2 * half } };
    half *= 4;
  }
};

/** A fit's model checks (server/runs/checks.ts): replicates, statistics, leave-one-out, in their stored form. */
const modelChecks: Task<ModelChecksInput, RunChecks> = (x) => {
  const check = checkProgram(x.source, dataSchemaOf(x.tables));
  if (!check.ok) throw new Error(`the model no longer checks: ${check.messages[0]?.message ?? 'unknown problem'}`);
  const c = runModelChecks(check, x.tables, { unknownNames: x.unknownNames, chains: x.chains }, {
    seed: x.seed,
    replicates: x.replicates,
    extraStats: x.statistics.slice(BUILTIN_CHECK_STATS.length),
    kind: x.priorOnly ? 'prior' : 'posterior',
    looMaxCells: x.looMaxCells,
  });
  return { output: summariseChecks(c, x.statistics, { draws: x.draws, thin: x.thin }) };
};

export const TASKS = { parseTable, checkModel: check, thinDraws, drawsCsvChunk, encodeChain: encode, projections, modelChecks, pilotFit };
export type TaskName = keyof typeof TASKS;
export type TaskInput<K extends TaskName> = Parameters<(typeof TASKS)[K]>[0];
export type TaskOutput<K extends TaskName> = Awaited<ReturnType<(typeof TASKS)[K]>>['output'];
