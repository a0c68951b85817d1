/**
 * Geometry of the constrained region: presolve, interior start, dispersed chain starts.
 * Pure numerics: no Express, no database.
 */
import type { LinearSystem, ModelTarget } from '../types';
import type { Rng } from '../rng';

/** The constraints cannot all hold (or have no interior). `conflicting` lists the rows' labels. */
export class RegionError extends Error {
  conflicting: string[];
  constructor(message: string, conflicting: string[]) {
    super(message);
    this.name = 'RegionError';
    this.conflicting = conflicting;
  }
}

/**
 * A target in reduced coordinates z: θ = θ₀ + N z (N an orthonormal null-space basis of E),
 * region {z : A z ≤ b} with rows normalised, duplicates and zero rows removed.
 */
export interface PreparedTarget {
  target: ModelTarget;
  /** Reduced dimension. */
  n: number;
  /** m × n, row-major. */
  A: Float64Array;
  b: Float64Array;
  m: number;
  toTheta(z: Float64Array, out: Float64Array): void;
  /** ℓ in z coordinates; writes ∇_z ℓ into grad (length n). */
  logDensity(z: Float64Array, grad: Float64Array): number;
  /** Strictly interior start (analytic centre, regularised on unbounded regions). */
  centre: Float64Array;
}

export function prepareTarget(_target: ModelTarget): PreparedTarget {
  throw new Error('not implemented');
}

export function checkRegion(
  _ineq: LinearSystem,
  _eq: LinearSystem,
):
  | { ok: true; interiorPoint: Float64Array; dimension: number }
  | { ok: false; message: string; conflicting: string[] } {
  throw new Error('not implemented');
}

/** `count` strictly interior starts in z coordinates, spread by a short hit-and-run from the centre. */
export function dispersedStarts(_p: PreparedTarget, _count: number, _rng: Rng): Float64Array[] {
  throw new Error('not implemented');
}
