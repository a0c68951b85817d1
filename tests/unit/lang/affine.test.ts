/**
 * Affine-constraint extraction: (A, b) and (E, e) computed by hand for each form.
 * Convention: inequalities read A θ ≤ b, equalities E θ = e, columns are flat coordinates.
 */
import { describe, expect, it } from 'vitest';
import { checkProgram, extractConstraints, type DataSchema } from '../../../shared/lang/index';

function rows(sys: { rows: number; cols: number; A: Float64Array; b: Float64Array }) {
  const out: { a: number[]; b: number }[] = [];
  for (let i = 0; i < sys.rows; i++) out.push({ a: Array.from(sys.A.subarray(i * sys.cols, (i + 1) * sys.cols)).map((v) => v + 0), b: sys.b[i] + 0 });
  return out;
}

function constraints(src: string, schema: DataSchema = {}) {
  const r = checkProgram(src, schema);
  expect(r.messages.filter((m) => m.severity === 'error')).toEqual([]);
  expect(r.constraints).toBeDefined();
  return { ineq: rows(r.constraints!.inequalities), eq: rows(r.constraints!.equalities), r };
}

describe('hand-computed constraint rows', () => {
  it('bounds, including a two-sided chain and strict < read as <=', () => {
    const { ineq, eq, r } = constraints('unknown a, b\nconstrain a >= 0\nconstrain b <= 3\nconstrain 0.5 <= a < 2');
    expect(ineq).toEqual([
      { a: [-1, 0], b: 0 },
      { a: [0, 1], b: 3 },
      { a: [-1, 0], b: -0.5 },
      { a: [1, 0], b: 2 },
    ]);
    expect(eq).toEqual([]);
    expect(r.constraints!.inequalities.labels).toEqual(['line 2: a >= 0', 'line 3: b <= 3', 'line 4: 0.5 <= a', 'line 4: a < 2']);
    expect(r.constraintCounts).toEqual({ inequalities: 4, equalities: 0 });
  });

  it('simplex: w >= 0 elementwise and sum(w) == 1 as an equality row', () => {
    const { ineq, eq, r } = constraints('unknown w[3]\nconstrain w >= 0\nconstrain sum(w) == 1');
    expect(ineq).toEqual([
      { a: [-1, 0, 0], b: 0 },
      { a: [0, -1, 0], b: 0 },
      { a: [0, 0, -1], b: 0 },
    ]);
    expect(eq).toEqual([{ a: [1, 1, 1], b: 1 }]);
    expect(r.constraints!.inequalities.labels[2]).toBe('line 2: w >= 0 (element 3)');
    expect(r.constraints!.equalities.labels).toEqual(['line 3: sum(w) == 1']);
  });

  it('ordering as a chain and as diff(mu) >= 0 give the same rows up to sign', () => {
    const chain = constraints('unknown s, mu[3]\nconstrain mu[1] <= mu[2] <= mu[3]');
    expect(chain.ineq).toEqual([
      { a: [0, 1, -1, 0], b: 0 },
      { a: [0, 0, 1, -1], b: 0 },
    ]);
    expect(chain.r.constraints!.inequalities.labels).toEqual(['line 2: mu[1] <= mu[2]', 'line 2: mu[2] <= mu[3]']);
    const diff = constraints('unknown s, mu[3]\nconstrain diff(mu) >= 0');
    expect(diff.ineq).toEqual(chain.ineq);
  });

  it('vector constraints expand elementwise with broadcasting and arithmetic', () => {
    const { ineq } = constraints('unknown w[2], t\nconstrain 2 * w - 1 <= w / 4 + [0.5, t]');
    // 2w_i − 1 − w_i/4 − c_i ≤ 0 → 1.75 w_1 ≤ 1.5 ;  1.75 w_2 − t ≤ 1
    expect(ineq).toEqual([
      { a: [1.75, 0, 0], b: 1.5 },
      { a: [0, 1.75, -1], b: 1 },
    ]);
  });

  it('cumsum, mean, dot and named constants', () => {
    const { ineq, eq } = constraints('const cost = [2, 3, 5]\nconst cap = 4\nunknown w[3]\nconstrain dot(cost, w) <= cap\nconstrain cumsum(w) <= 1\nconstrain mean(w) == w[2]');
    expect(ineq).toEqual([
      { a: [2, 3, 5], b: 4 },
      { a: [1, 0, 0], b: 1 },
      { a: [1, 1, 0], b: 1 },
      { a: [1, 1, 1], b: 1 },
    ]);
    expect(eq[0].a.map((v) => +v.toFixed(12))).toEqual([1 / 3, 1 / 3 - 1, 1 / 3].map((v) => +v.toFixed(12)));
    expect(eq[0].b).toBe(0);
  });

  it('data in coefficients: counted at check time, filled in with the data values', () => {
    const schema: DataSchema = { beds: { rows: 3, columns: { area: { type: 'numeric' }, plot: { type: 'category', levels: 2 } } } };
    const src = 'table beds\nunknown k[2], rate\nconstrain area * rate <= 10\nconstrain k[plot] + area >= 0\nconstrain dot(area, [k[1], k[2], rate]) == mean(area)';
    const r = checkProgram(src, schema);
    expect(r.ok).toBe(true);
    expect(r.constraintsNeedData).toBe(true);
    expect(r.constraints).toBeUndefined();
    expect(r.constraintCounts).toEqual({ inequalities: 6, equalities: 1 });
    const data = {
      beds: {
        rows: 3,
        columns: {
          area: { type: 'numeric' as const, values: Float64Array.from([1.5, 2, 4]) },
          plot: { type: 'category' as const, values: Float64Array.from([2, 1, 2]), levels: ['east', 'west'] },
        },
      },
    };
    const x = extractConstraints(r, data);
    expect(x.messages).toEqual([]);
    expect(rows(x.inequalities)).toEqual([
      { a: [0, 0, 1.5], b: 10 },
      { a: [0, 0, 2], b: 10 },
      { a: [0, 0, 4], b: 10 },
      { a: [0, -1, 0], b: 1.5 },
      { a: [-1, 0, 0], b: 2 },
      { a: [0, -1, 0], b: 4 },
    ]);
    expect(rows(x.equalities)).toEqual([{ a: [1.5, 2, 4], b: 2.5 }]);
  });
});

describe('non-affine constraints are rejected, naming the part and its column', () => {
  const cases: [string, string, number][] = [
    ['constrain a*b <= 1', '`a*b` is not affine', 11],
    ['constrain exp(a) <= 2', '`exp(a)` is not affine', 11],
    ['constrain 1 + a/b <= 1', '`a/b` is not affine', 15],
    ['constrain abs(a) <= 1', '`abs(a)` is not affine', 11],
    ['constrain a ^ 2 + b <= 1', '`a ^ 2` is not affine', 11],
    ['constrain 0 <= b <= square(a)', '`square(a)` is not affine', 21],
    ['constrain a <= log_sum_exp([a, b])', '`log_sum_exp([a, b])` is not affine', 16],
  ];
  it.each(cases)('%s', (line, message, column) => {
    const r = checkProgram(`unknown a, b\n${line}`, {});
    expect(r.ok).toBe(false);
    const m = r.messages.find((x) => x.severity === 'error')!;
    expect(m.line).toBe(2);
    expect(m.message).toContain(message);
    expect(m.column).toBe(column);
    expect(m.endColumn).toBeGreaterThan(m.column);
  });
  it('a constraint that can never hold is reported', () => {
    const r = checkProgram('unknown a\nconstrain a - a >= 1', {});
    expect(r.messages[0].message).toContain('can never hold');
  });
  it('a constraint without unknowns is reported', () => {
    const r = checkProgram('unknown a\nconstrain 1 <= 2', {});
    expect(r.messages[0].message).toContain('does not involve any unknown');
  });
});
