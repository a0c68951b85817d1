/**
 * How far a vector's sum may stray from 1 and still count as a point of the simplex:
 * |Σᵢ xᵢ − 1| ≤ SIMPLEX_TOLERANCE. Samplers keep equality constraints to round-off (~1e-15 per
 * coordinate), so 1e-8 leaves a wide margin while still catching vectors that are not proportions.
 */
export const SIMPLEX_TOLERANCE = 1e-8;
