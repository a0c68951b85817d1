/**
 * Densities written through their link — ld_binomial(k, n, logistic(η)), ld_bernoulli(y,
 * logistic(η)), ld_poisson(k, exp(η)) — compile to the stable log-odds / log-rate kernels.
 *
 * Checks:
 *  - value and gradient equal the kernels called directly (binomialLogitLpmf, bernoulliLogitLpmf,
 *    poissonLogLpmf with their partials and the chain rule through η = a + b·x) to 1e-10 relative;
 *  - value equals @stdlib's binomial-logpmf / bernoulli-pmf / poisson-logpmf at p = logistic(η),
 *    λ = e^η (0.3.x, npm) to 1e-10 relative, for moderate η where forming p or λ for the reference
 *    loses nothing measurable;
 *  - gradient against central differences with one Richardson step (common practice);
 *  - at η = ±800 the fused form stays finite where the written-out composition rounds p to 0 or 1
 *    (or λ to 0) and gives −∞; the finite values are the closed forms of the kernels' doc comments;
 *  - the earlier spellings are refused with the new form, its line and its column.
 */
import stdBinomial from '@stdlib/stats-base-dists-binomial-logpmf';
import stdBernoulliPmf from '@stdlib/stats-base-dists-bernoulli-pmf';
import stdPoisson from '@stdlib/stats-base-dists-poisson-logpmf';
import { describe, expect, it } from 'vitest';
import { CompileError } from '../../../server/engine/compile/index';
import { fuseLinks } from '../../../server/engine/compile/fuse';
import * as D from '../../../server/engine/densities';
import { checkProgram } from '../../../shared/lang/index';
import type { DataTables } from '../../../server/engine/types';
import { compile, gradError, integer, numeric, table, value } from './helpers';

const x = [0.3, -1.2, 2.1, 0.8, -0.4, 1.5];
const k = [2, 0, 9, 5, 1, 10];
const n = [4, 3, 10, 9, 6, 10];
const y = [1, 0, 1, 1, 0, 1];
const data: DataTables = { obs: table({ x: numeric(x), k: integer(k), n: integer(n), y: integer(y) }) };

const rel = (got: number, want: number) => Math.abs(got - want) / Math.max(1, Math.abs(want));

/** The model's value and gradient at θ. */
function evalModel(src: string, theta: number[]) {
  const m = compile(`table obs\n${src}`, data);
  const g = new Float64Array(m.dim);
  const v = m.logDensity(Float64Array.from(theta), g);
  return { m, v, g };
}

/** Σ over rows of a kernel with partial ∂η, and the chain rule for η = a + b·x. */
function direct(kernelGrad: (row: number, eta: number, out: Float64Array) => number, nParams: number, a: number, b: number) {
  const out = new Float64Array(nParams);
  let v = 0;
  let ga = 0;
  let gb = 0;
  for (let i = 0; i < x.length; i++) {
    const eta = a + b * x[i];
    v += kernelGrad(i, eta, out);
    ga += out[nParams - 1];
    gb += out[nParams - 1] * x[i];
  }
  return { v, g: [ga, gb] };
}

const FORMS = [
  {
    name: 'ld_binomial(k, n, logistic(η))',
    src: 'unknown a, b\nterm ld_binomial(k, n, logistic(a + b * x))',
    kernel: 'binomialLogitLpmfGrad',
    direct: (a: number, b: number) => direct((i, eta, out) => D.binomialLogitLpmfGrad(k[i], n[i], eta, out, 0), 3, a, b),
    stdlib: (a: number, b: number) => x.reduce((s, xi, i) => s + stdBinomial(k[i], n[i], 1 / (1 + Math.exp(-(a + b * xi)))), 0),
  },
  {
    name: 'ld_bernoulli(y, logistic(η))',
    src: 'unknown a, b\nterm ld_bernoulli(y, logistic(a + b * x))',
    kernel: 'bernoulliLogitLpmfGrad',
    direct: (a: number, b: number) => direct((i, eta, out) => D.bernoulliLogitLpmfGrad(y[i], eta, out, 0), 2, a, b),
    stdlib: (a: number, b: number) => x.reduce((s, xi, i) => s + Math.log(stdBernoulliPmf(y[i], 1 / (1 + Math.exp(-(a + b * xi))))), 0),
  },
  {
    name: 'ld_poisson(k, exp(η))',
    src: 'unknown a, b\nterm ld_poisson(k, exp(a + b * x))',
    kernel: 'poissonLogLpmfGrad',
    direct: (a: number, b: number) => direct((i, eta, out) => D.poissonLogLpmfGrad(k[i], eta, out, 0), 2, a, b),
    stdlib: (a: number, b: number) => x.reduce((s, xi, i) => s + stdPoisson(k[i], Math.exp(a + b * xi)), 0),
  },
];

const POINTS: [number, number][] = [
  [0.2, -0.4],
  [-1.1, 0.9],
  [1.4, 0.3],
];

describe.each(FORMS)('$name', (f) => {
  it('compiles to the fused kernel', () => {
    const { m } = evalModel(f.src, [0, 0]);
    expect(m.source).toContain(`R.${f.kernel}(`);
  });

  it.each(POINTS)('value and gradient equal the kernel called directly, and the value equals @stdlib (a=%f, b=%f)', (a, b) => {
    const { v, g } = evalModel(f.src, [a, b]);
    const want = f.direct(a, b);
    expect(rel(v, want.v)).toBeLessThanOrEqual(1e-10);
    expect(rel(g[0], want.g[0])).toBeLessThanOrEqual(1e-10);
    expect(rel(g[1], want.g[1])).toBeLessThanOrEqual(1e-10);
    // @stdlib at p = logistic(η) / λ = e^η: |η| ≤ 3.3 here, so forming p or λ costs < 1e-14.
    expect(rel(v, f.stdlib(a, b))).toBeLessThanOrEqual(1e-10);
  });

  it.each(POINTS)('gradient against central differences (a=%f, b=%f)', (a, b) => {
    const m = compile(`table obs\n${f.src}`, data);
    expect(gradError(m, [a, b]).err).toBeLessThan(1e-6);
  });
});

describe('matching', () => {
  it('looks through a let whose expression is exactly the link call', () => {
    const src = 'unknown a, b\nlet p = logistic(a + b * x)\nterm ld_bernoulli(y, p)';
    const fusedModel = evalModel(src, [0.2, -0.4]);
    const inline = evalModel('unknown a, b\nterm ld_bernoulli(y, logistic(a + b * x))', [0.2, -0.4]);
    expect(fusedModel.m.source).toContain('R.bernoulliLogitLpmfGrad(');
    expect(fusedModel.v).toBe(inline.v);
  });

  it('keeps the plain kernel when the argument is not exactly the link call', () => {
    for (const src of [
      'unknown a, b\nterm ld_bernoulli(y, 0.9 * logistic(a + b * x))',
      'unknown a, b\nterm ld_poisson(k, 2 * exp(a + b * x))',
      'unknown p\nterm ld_binomial(k, n, p)',
    ]) {
      const { m } = evalModel(src, [0.2, -0.4].slice(0, src.startsWith('unknown p') ? 1 : 2));
      expect(m.source).not.toMatch(/LogitLpmf|LogLpmf/);
    }
  });

  it('fuses in derived quantities and in constant terms too', () => {
    const m = compile('table obs\nunknown a\nterm ld_normal(a, 0, 1)\nterm ld_bernoulli(y, logistic(0.5 * x))\nderive fit = ld_binomial(k, n, logistic(a + x))', data);
    expect(m.derivedSource).toContain('R.binomialLogitLpmf(');
    const out = new Float64Array(1);
    m.derived!.evaluate(Float64Array.of(0.7), out);
    const want = x.reduce((s, xi, i) => s + D.binomialLogitLpmf(k[i], n[i], 0.7 + xi), 0);
    expect(rel(out[0], want)).toBeLessThanOrEqual(1e-12);
    // The constant term is the data-only Bernoulli log-likelihood (kernel called directly).
    const constant = x.reduce((s, xi, i) => s + D.bernoulliLogitLpmf(y[i], 0.5 * xi), 0);
    const normal = -0.5 * 0.7 * 0.7 - 0.5 * Math.log(2 * Math.PI);
    expect(rel(value(m, [0.7]), constant + normal)).toBeLessThanOrEqual(1e-12);
  });

  it('counts each rewritten call once, however often a let is used', () => {
    const check = checkProgram('unknown a\nlet d = ld_bernoulli(1, logistic(a))\nterm d + d', {});
    expect(check.ok).toBe(true);
    expect(fuseLinks(check.program).fusedCalls).toBe(1);
  });
});

describe('extreme linear predictors', () => {
  // Closed forms (the kernels' doc comments): log Bernoulli(1 | logistic(η)) = −softplus(−η) ≈ η for
  // η ≪ 0; log Binomial(k | n, logistic(η)) ≈ log C(n, k) + k·η for η ≪ 0 and − (n − k)·η for η ≫ 0.
  const one = (src: string, cols: DataTables[string]['columns'], theta: number[]) => {
    const m = compile(`table obs\n${src}`, { obs: table(cols) });
    const g = new Float64Array(m.dim);
    return { v: m.logDensity(Float64Array.from(theta), g), g };
  };

  it('ld_bernoulli(y, logistic(±800)) is finite; the written-out composition is −∞', () => {
    const fusedLo = one('unknown e\nterm ld_bernoulli(y, logistic(e))', { y: integer([1]) }, [-800]);
    expect(fusedLo.v).toBe(-800); // −softplus(800) = −800 − log1p(e^−800)
    expect(fusedLo.g[0]).toBe(1); // y − logistic(η) = 1 − 0
    const fusedHi = one('unknown e\nterm ld_bernoulli(y, logistic(e))', { y: integer([0]) }, [800]);
    expect(fusedHi.v).toBe(-800);
    expect(fusedHi.g[0]).toBe(-1);
    // 1 * logistic(η) is not the bare link call: the plain kernel sees p rounded to 0 (or 1).
    expect(one('unknown e\nterm ld_bernoulli(y, 1 * logistic(e))', { y: integer([1]) }, [-800]).v).toBe(-Infinity);
    expect(one('unknown e\nterm ld_bernoulli(y, 1 * logistic(e))', { y: integer([0]) }, [800]).v).toBe(-Infinity);
  });

  it('ld_binomial(k, n, logistic(±800)) is finite; the written-out composition is −∞', () => {
    const cols = { k: integer([3]), n: integer([10]) };
    const lc = Math.log(120); // log C(10, 3)
    const lo = one('unknown e\nterm ld_binomial(k, n, logistic(e))', cols, [-800]);
    expect(Number.isFinite(lo.v) && Number.isFinite(lo.g[0])).toBe(true);
    expect(rel(lo.v, lc - 3 * 800)).toBeLessThanOrEqual(1e-12);
    expect(lo.g[0]).toBe(3); // k − n·logistic(η)
    const hi = one('unknown e\nterm ld_binomial(k, n, logistic(e))', cols, [800]);
    expect(rel(hi.v, lc - 7 * 800)).toBeLessThanOrEqual(1e-12);
    expect(hi.g[0]).toBe(-7);
    expect(one('unknown e\nterm ld_binomial(k, n, 1 * logistic(e))', cols, [-800]).v).toBe(-Infinity);
    expect(one('unknown e\nterm ld_binomial(k, n, 1 * logistic(e))', cols, [800]).v).toBe(-Infinity);
  });

  it('ld_poisson(k, exp(−800)) is finite; the written-out composition is −∞', () => {
    // k·η − e^η − log k! with e^−800 = 0 in double precision; log 2! = log 2.
    const fused = one('unknown e\nterm ld_poisson(k, exp(e))', { k: integer([2]) }, [-800]);
    expect(rel(fused.v, -1600 - Math.log(2))).toBeLessThanOrEqual(1e-12);
    expect(fused.g[0]).toBe(2);
    expect(one('unknown e\nterm ld_poisson(k, 1 * exp(e))', { k: integer([2]) }, [-800]).v).toBe(-Infinity);
    // η = +800: the true value −e^800 is below the smallest double, so both forms give −∞ (the
    // written-out one through an infinite rate, the fused one through e^η itself).
  });
});

describe('earlier spellings are refused with the new form', () => {
  it.each([
    ['term ld_binomial_logodds(k, n, a + b * x)', 'ld_binomial(k, n, logistic(a + b * x))'],
    ['term ld_bernoulli_logodds(y, a * x)', 'ld_bernoulli(y, logistic(a * x))'],
    ['term ld_poisson_lograte(k, a + b)', 'ld_poisson(k, exp(a + b))'],
  ])('%s', (line, spelled) => {
    const check = checkProgram(`table obs\nunknown a, b\n${line}`, { obs: { rows: 6, columns: { x: { type: 'numeric' }, k: { type: 'integer' }, n: { type: 'integer' }, y: { type: 'integer' } } } });
    expect(check.ok).toBe(false);
    const m = check.messages[0];
    expect(m.line).toBe(3);
    expect(m.column).toBe(6); // the call starts after "term "
    expect(m.endColumn).toBe(line.length + 1);
    expect(m.message).toContain(`\`${spelled}\``);
    expect(m.suggestion).toBe(`did you mean \`${spelled}\`?`);
    // The compiler reports the same, with line and column.
    let err: unknown;
    try {
      compile(`table obs\nunknown a, b\n${line}`, data);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(CompileError);
    expect((err as Error).message).toContain(`line 3, column 6: \`${line.slice(5, line.indexOf('('))}\``);
    expect((err as Error).message).toContain(spelled);
  });

  it('with the wrong number of arguments, the new form is shown with parameter names', () => {
    const m = checkProgram('unknown a\nterm ld_poisson_lograte(a)', {}).messages[0];
    expect(m.message).toContain('`ld_poisson(k, exp(eta))`');
  });
});
