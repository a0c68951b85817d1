/**
 * The work the compute pool runs off the main thread: parsing an uploaded or stored table, the
 * model check with its region test, and reading stored draws for plots and the CSV export.
 * Each task takes and returns structured-cloneable values (typed arrays travel as transfers).
 */
import { parseCsv, type ParsedTable } from '../../shared/data';
import { drawsCsvHeader, drawsCsvRows } from '../../shared/export-csv';
import type { CompileResponse, DatasetColumn, RegionSystem } from '../../shared/api/notebook';
import type { DataTables } from '../engine/types';
import { decodeDraws, decodeFlags, encodeChain, type DrawNames, type EncodedChain } from '../runs/draws-codec';
import type { ChainResult } from '../engine/types';
import { checkModel, regionSystem } from '../notebook/model';
import { columnsOf, describeCsvErrors } from '../notebook/tables';
import { PROJECTION_MAX_UNKNOWNS, regionProjections } from '../notebook/projections';
import type { RegionProjection, RunDraws } from '../../shared/api/notebook';
import { BUILTIN_CHECK_STATS, type RunChecks } from '../../shared/checks';
import { checkProgram, dataSchemaOf } from '../../shared/lang/index';
import { runModelChecks } from '../engine/predictive/checks';
import { summariseChecks } from '../engine/predictive/summary';
import type { ModelChecksInput } from '../runs/checks';

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

type Task<I, O> = (input: I) => { output: O; transfer?: ArrayBuffer[] };

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

/** A finished chain encoded for storage (its draws arrive back as a Uint8Array: see encodedChain). */
const encode: Task<{ names: DrawNames; chain: ChainResult }, EncodedChain> = ({ names, chain }) => {
  const enc = encodeChain(names, chain);
  const own = enc.draws.byteOffset === 0 && enc.draws.byteLength === enc.draws.buffer.byteLength;
  return { output: enc, transfer: own ? [enc.draws.buffer as ArrayBuffer] : [] };
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

export const TASKS = { parseTable, checkModel: check, thinDraws, drawsCsv, encodeChain: encode, projections, modelChecks };
export type TaskName = keyof typeof TASKS;
export type TaskInput<K extends TaskName> = Parameters<(typeof TASKS)[K]>[0];
export type TaskOutput<K extends TaskName> = ReturnType<(typeof TASKS)[K]>['output'];
