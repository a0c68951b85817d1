/**
 * The thread a compare job computes in: decodes the fits' stored draws, runs computeComparison
 * (engine/evidence/compare.ts) and posts progress and the result to the job (compare-job.ts). One
 * thread per job; the job terminates it to cancel.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { computeComparison, type CompareInput, type CompareModelInput } from '../engine/evidence/compare';
import type { ChainResult } from '../engine/types';
import { decodeDraws } from './draws-codec';

export interface StoredFitRows {
  runId: string;
  unknownNames: string[];
  derivedNames: string[];
  chains: { chainIndex: number; drawCount: number; dimension: number; draws: Uint8Array }[];
}

export interface CompareThreadInput extends Omit<CompareInput, 'models'> {
  models: (Omit<CompareModelInput, 'fit'> & { fit: StoredFitRows | null })[];
}

export type CompareThreadMessage =
  | { type: 'progress'; progress: import('../engine/evidence/compare').CompareProgressInfo }
  | { type: 'done'; result: import('../../shared/api/compare').CompareResult }
  | { type: 'error'; message: string };

/** Stored chains → the unknowns' draws per chain (what leave-one-out reads). */
export function decodeFit(f: StoredFitRows): CompareModelInput['fit'] {
  const dimU = f.unknownNames.length;
  const chains = f.chains.map((c) => {
    const all = decodeDraws(Buffer.from(c.draws.buffer, c.draws.byteOffset, c.draws.byteLength), c.drawCount, c.dimension);
    const draws = new Float64Array(c.drawCount * dimU);
    for (let t = 0; t < c.drawCount; t++) draws.set(all.subarray(t * c.dimension, t * c.dimension + dimU), t * dimU);
    return { chain: c.chainIndex, draws, derivedDraws: new Float64Array(0) } as unknown as ChainResult;
  });
  return { runId: f.runId, unknownNames: f.unknownNames, derivedNames: f.derivedNames, chains };
}

/** The computation of one job, as the thread runs it (also called in-process by tests and the seed). */
export function runCompareInput(input: CompareThreadInput, onProgress?: (p: import('../engine/evidence/compare').CompareProgressInfo) => void) {
  const models = input.models.map((m) => ({ ...m, fit: m.fit ? decodeFit(m.fit) : null }));
  return computeComparison({ ...input, models }, { onProgress });
}

if (parentPort && (workerData as { slacklineCompare?: boolean } | undefined)?.slacklineCompare) {
  const port = parentPort;
  port.once('message', (input: CompareThreadInput) => {
    let last = 0;
    try {
      const result = runCompareInput(input, (progress) => {
        const now = Date.now();
        if (now - last < 200 && progress.stage !== 0) return;
        last = now;
        port.postMessage({ type: 'progress', progress } satisfies CompareThreadMessage);
      });
      port.postMessage({ type: 'done', result } satisfies CompareThreadMessage);
    } catch (e) {
      port.postMessage({ type: 'error', message: e instanceof Error ? e.message : String(e) } satisfies CompareThreadMessage);
    }
  });
}
