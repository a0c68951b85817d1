/**
 * The work the compute pool runs off the main thread: parsing an uploaded or stored table, the
 * model check with its region test, and reading stored draws for plots and the CSV export.
 * Each task takes and returns structured-cloneable values (typed arrays travel as transfers).
 */
import { parseCsv, type ParsedTable } from '../../shared/data';
import { drawsCsvHeader, drawsCsvRows } from '../../shared/export-csv';
import type { CompileResponse, DatasetColumn, RegionSystem } from '../../shared/api/notebook';
import type { DataTables, TargetSpec } from '../engine/types';
import { planFit, runFitChain, type FitPlan } from '../engine/fit';
import type { FitSettings } from '../../shared/fit';
import { encodeDrawsBinary, type DrawsBinaryHeader } from '../../shared/api/draws-binary';
import { decodeDraws, decodeFlags, encodeChain, type DrawNames, type EncodedChain } from '../runs/draws-codec';
import type { ChainResult } from '../engine/types';
import { checkModel, regionSystem } from '../notebook/model';
import { columnsOf, describeCsvErrors } from '../notebook/tables';
import { PROJECTION_MAX_UNKNOWNS, regionProjections } from '../notebook/projections';
import type { RegionProjection, RunDraws } from '../../shared/api/notebook';

export type ParseTableOutput =
  | { ok: true; table: ParsedTable; columns: DatasetColumn[]; rows: number }
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
  chains: { chain: number; values: number[][]; divergent: number[] }[];
}

type Task<I, O> = (input: I) => { output: O; transfer?: ArrayBuffer[] } | Promise<{ output: O; transfer?: ArrayBuffer[] }>;

const asBuffer = (u: Uint8Array) => Buffer.from(u.buffer, u.byteOffset, u.byteLength);

const parseTable: Task<{ bytes: Uint8Array }, ParseTableOutput> = ({ bytes }) => {
  const result = parseCsv(bytes);
  if (!result.table) {
    return { output: { ok: false, message: describeCsvErrors(result), field: result.issues.find((i) => i.severity === 'error')?.message ?? 'Not a usable CSV file' } };
  }
  const transfer = Object.values(result.table.columns).map((c) => c.values.buffer as ArrayBuffer);
  return { output: { ok: true, table: result.table, columns: columnsOf(result), rows: result.table.rows }, transfer };
};

const check: Task<CheckModelInput, CheckModelOutput> = ({ source, tables, region, regionNames }) => {
  const m = checkModel(source, tables, region);
  const sys = regionNames && m.rows && m.rows.inequalities.cols === regionNames.length ? regionSystem(regionNames, m.rows) : null;
  return { output: { response: m.response, dim: m.check.dim, derivedNames: m.check.derivedNames.slice(), regionSystem: sys } };
};

/** Every `thin`-th draw of each chain, at most `max` per chain, per quantity. */
const thinDraws: Task<{ chains: StoredChainInput[]; quantities: number; max: number }, ThinDrawsOutput> = ({ chains, quantities, max }) => {
  const n = chains[0]?.drawCount ?? 0;
  // A regular stride, so "every thin-th draw" is exact and iterations can be labelled.
  const thin = Math.max(1, Math.ceil(n / Math.max(1, max)));
  const idx: number[] = [];
  for (let t = 0; t < n; t += thin) idx.push(t);
  const out = chains.map((c) => {
    const draws = decodeDraws(asBuffer(c.draws), c.drawCount, c.dimension);
    const flags = decodeFlags(c.divergent, c.drawCount);
    return {
      chain: c.chain,
      values: Array.from({ length: quantities }, (_, q) => idx.map((t) => draws[t * c.dimension + q])),
      divergent: idx.map((t) => flags[t]),
    };
  });
  return { output: { thin, chains: out } };
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

/** The draws export as UTF-8 CSV: header, then every draw of every chain. */
const drawsCsv: Task<{ names: string[]; chains: StoredChainInput[] }, Uint8Array> = ({ names, chains }) => {
  const parts: string[] = [drawsCsvHeader(names) + '\n'];
  for (const c of chains) {
    const draws = decodeDraws(asBuffer(c.draws), c.drawCount, c.dimension);
    // Stored draws hold unknowns and derived quantities side by side in one row.
    for (const row of drawsCsvRows(c.chain, draws, c.dimension, new Float64Array(0), 0)) parts.push(row + '\n');
  }
  const bytes = new TextEncoder().encode(parts.join(''));
  return { output: bytes, transfer: [bytes.buffer as ArrayBuffer] };
};

/** The draws for plots as the columnar binary of shared/api/draws-binary.ts, thinned like thinDraws. */
const drawsBinary: Task<{ chains: StoredChainInput[]; max: number; header: Omit<DrawsBinaryHeader, 'chains' | 'thin'> }, Uint8Array> = ({ chains, max, header }) => {
  const n = chains[0]?.drawCount ?? 0;
  const thin = Math.max(1, Math.ceil(n / Math.max(1, max)));
  const idx: number[] = [];
  for (let t = 0; t < n; t += thin) idx.push(t);
  const q = header.names.length;
  const columns = chains.map((c) => {
    const draws = decodeDraws(asBuffer(c.draws), c.drawCount, c.dimension);
    return Array.from({ length: q }, (_, k) => Float32Array.from(idx, (t) => draws[t * c.dimension + k]));
  });
  const meta = chains.map((c) => {
    const flags = decodeFlags(c.divergent, c.drawCount);
    return { chain: c.chain, n: idx.length, divergent: idx.flatMap((t, i) => (flags[t] ? [i] : [])) };
  });
  const bytes = encodeDrawsBinary({ ...header, thin, chains: meta }, columns);
  return { output: bytes, transfer: [bytes.buffer as ArrayBuffer] };
};

/** One chain's rows of the draws export (no header), for writing the file chain by chain. */
const drawsCsvChain: Task<{ chain: StoredChainInput }, Uint8Array> = ({ chain: c }) => {
  const draws = decodeDraws(asBuffer(c.draws), c.drawCount, c.dimension);
  const parts: string[] = [];
  for (const row of drawsCsvRows(c.chain, draws, c.dimension, new Float64Array(0), 0)) parts.push(row + '\n');
  const bytes = new TextEncoder().encode(parts.join(''));
  return { output: bytes, transfer: [bytes.buffer as ArrayBuffer] };
};

/** A finished chain encoded for storage (its draws arrive back as a Uint8Array: see encodedChain). */
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

export const TASKS = { parseTable, checkModel: check, thinDraws, drawsCsv, drawsCsvChain, drawsBinary, encodeChain: encode, projections, pilotFit };
export type TaskName = keyof typeof TASKS;
export type TaskInput<K extends TaskName> = Parameters<(typeof TASKS)[K]>[0];
export type TaskOutput<K extends TaskName> = Awaited<ReturnType<(typeof TASKS)[K]>>['output'];
