/**
 * Maximum a posteriori by an interior-point (barrier) Newton method.
 */
import type { PreparedTarget } from './geometry';

export function findMode(_p: PreparedTarget): {
  theta: Float64Array;
  logDensity: number;
  iterations: number;
  converged: boolean;
} {
  throw new Error('not implemented');
}
