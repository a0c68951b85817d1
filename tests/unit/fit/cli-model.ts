/**
 * A model module for the headless fit's tests: normal mean of the column y of the table "trial"
 * with known σ = 1 and a flat prior on −10 ≤ mu ≤ 10; derived shift = mu − 5.
 * `broken` throws an error shaped like the compiler's, to test how the command reports it.
 */
import type { DataTables, ModelTarget } from '../../../server/engine/types';

export function target(tables: DataTables): ModelTarget {
  const t = tables.trial;
  if (!t || !t.columns.y) throw new Error('table "trial" with a column "y" is required');
  const y = t.columns.y.values;
  let sum = 0;
  for (const v of y) sum += v;
  const n = y.length;
  return {
    dim: 1,
    names: ['mu'],
    logDensity: (theta, grad) => {
      // Σ −(y − mu)²/2 = −n(mu − ȳ)²/2 + const
      const d = theta[0] - sum / n;
      grad[0] = -n * d;
      return -0.5 * n * d * d;
    },
    inequalities: {
      rows: 2, cols: 1, A: Float64Array.from([-1, 1]), b: Float64Array.from([10, 10]),
      labels: ['mu >= -10', 'mu <= 10'],
    },
    equalities: { rows: 0, cols: 1, A: new Float64Array(0), b: new Float64Array(0), labels: [] },
    derived: { names: ['shift'], evaluate: (theta, out) => { out[0] = theta[0] - 5; } },
  };
}

export function broken(): ModelTarget {
  const e = new Error('2 problems') as Error & {
    messages: { line: number; column: number; message: string; severity: string; suggestion?: string }[];
  };
  e.name = 'CompileError';
  e.messages = [
    { line: 3, column: 7, message: 'unknown name "sigmaa"', severity: 'error', suggestion: 'did you mean "sigma"?' },
    { line: 5, column: 1, message: 'constraint is not affine in the unknowns', severity: 'error' },
    { line: 6, column: 3, message: 'this term does not depend on any unknown', severity: 'warning' },
  ];
  throw e;
}
