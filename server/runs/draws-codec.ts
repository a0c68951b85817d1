import type { ChainResult } from '../engine/types';
import type { ChainStats } from '../../shared/fit';

/**
 * Compact binary storage of one chain's draws: little-endian Float64, draw-major
 * (drawCount × dimension), the unknowns' coordinates first and then the derived quantities.
 * Per-draw flags (divergent, rejected) travel in the chain's stats as a run-length list to stay small.
 */

export function encodeDraws(unknowns: Float64Array, dimU: number, derived: Float64Array, dimD: number): { buffer: Buffer; drawCount: number; dimension: number } {
  const n = dimU > 0 ? unknowns.length / dimU : dimD > 0 ? derived.length / dimD : 0;
  const dim = dimU + dimD;
  const buf = Buffer.alloc(n * dim * 8);
  for (let t = 0; t < n; t++) {
    for (let k = 0; k < dimU; k++) buf.writeDoubleLE(unknowns[t * dimU + k], (t * dim + k) * 8);
    for (let k = 0; k < dimD; k++) buf.writeDoubleLE(derived[t * dimD + k], (t * dim + dimU + k) * 8);
  }
  return { buffer: buf, drawCount: n, dimension: dim };
}

/** Decode into draw-major rows of length `dimension`. */
export function decodeDraws(buffer: Buffer, drawCount: number, dimension: number): Float64Array {
  if (buffer.length !== drawCount * dimension * 8) {
    throw new Error(`stored draws have ${buffer.length} bytes, expected ${drawCount * dimension * 8}`);
  }
  const out = new Float64Array(drawCount * dimension);
  for (let i = 0; i < out.length; i++) out[i] = buffer.readDoubleLE(i * 8);
  return out;
}

/** Indices of set flags as [start, length] runs: [0,0,1,1,0,1] → [[2,2],[5,1]]. */
export function encodeFlags(flags: ArrayLike<number>): [number, number][] {
  const runs: [number, number][] = [];
  let t = 0;
  while (t < flags.length) {
    if (flags[t]) {
      const start = t;
      while (t < flags.length && flags[t]) t++;
      runs.push([start, t - start]);
    } else t++;
  }
  return runs;
}

export function decodeFlags(runs: readonly (readonly [number, number])[], length: number): Uint8Array {
  const out = new Uint8Array(length);
  for (const [start, len] of runs) out.fill(1, start, Math.min(length, start + len));
  return out;
}

/** A per-draw statistic (acceptance, energy) as base64 of little-endian Float64: exact and compact. */
export function encodeFloats(values: Float64Array): string {
  const buf = Buffer.alloc(values.length * 8);
  for (let i = 0; i < values.length; i++) buf.writeDoubleLE(values[i], i * 8);
  return buf.toString('base64');
}

export function decodeFloats(text: string): Float64Array {
  const buf = Buffer.from(text, 'base64');
  const out = new Float64Array(buf.length / 8);
  for (let i = 0; i < out.length; i++) out[i] = buf.readDoubleLE(i * 8);
  return out;
}


/** Names of the columns of a run's draws: the unknowns' coordinates, then derived quantities. */
export interface DrawNames {
  unknownNames: string[];
  derivedNames: string[];
}

/** A chain as stored: its draws encoded and its statistics. */
export interface EncodedChain {
  chain: number;
  drawCount: number;
  dimension: number;
  draws: Buffer;
  stats: ChainStats;
}

/** Encode one finished chain for storage (pure; the run worker calls it on the compute pool). */
export function encodeChain(names: DrawNames, ch: ChainResult): EncodedChain {
  const enc = encodeDraws(ch.draws, names.unknownNames.length, ch.derivedDraws, names.derivedNames.length);
  let accept = 0;
  for (let i = 0; i < ch.acceptStat.length; i++) accept += ch.acceptStat[i];
  const stats: ChainStats = {
    unknownNames: names.unknownNames,
    derivedNames: names.derivedNames,
    divergent: encodeFlags(ch.divergent),
    ...(ch.rejected ? { rejected: encodeFlags(ch.rejected) } : {}),
    stepSize: Number.isFinite(ch.stepSize) ? ch.stepSize : null,
    meanAcceptStat: ch.acceptStat.length ? accept / ch.acceptStat.length : NaN,
    ...(ch.factorizationsPerStep !== undefined ? { factorizationsPerStep: ch.factorizationsPerStep } : {}),
    acceptStat: encodeFloats(ch.acceptStat),
    ...(ch.energy ? { energy: encodeFloats(ch.energy) } : {}),
  };
  return { chain: ch.chain, drawCount: enc.drawCount, dimension: enc.dimension, draws: enc.buffer, stats };
}
