/**
 * Log-density VALUES of compiled terms against a general-purpose reference library from the npm
 * registry: jStat 1.9.6 (`jstat`), named beside each check. Where jStat has no such distribution a
 * handbook formula is used and named. jStat's gammaln is good to about 1e-8 relative, so the
 * densities built on it (Student t, beta) are checked against @stdlib (0.3.1) instead.
 */
import betaLogpdf from '@stdlib/stats-base-dists-beta-logpdf';
import tLogpdf from '@stdlib/stats-base-dists-t-logpdf';
import gammaln from '@stdlib/math-base-special-gammaln';
import { jStat } from './jstat';
import { describe, expect, it } from 'vitest';
import type { DataTables } from '../../../server/engine/types';
import { CompileError } from '../../../server/engine/compile/index';
import { compile, integer, numeric, table, value } from './helpers';

const xs = [-2.3, -0.7, 0, 0.4, 1.9, 3.5];
const pos = [0.05, 0.4, 1, 2.2, 5.5, 9];
const fr = [0.02, 0.25, 0.5, 0.81, 0.97];
const ks = [0, 1, 3, 7, 12];
const ns = [0, 4, 5, 9, 20];
const ys = [0, 1, 1, 0, 1];

const sum = (a: number[]) => a.reduce((s, v) => s + v, 0);
const close = (got: number, want: number) => expect(Math.abs(got - want)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(want)));

function run(src: string, cols: DataTables[string]['columns'], theta: number[]) {
  const m = compile(`table obs\n${src}`, { obs: table(cols) });
  return value(m, theta);
}

describe('compiled log-densities agree with jStat', () => {
  it.each([
    [0.3, 1.2],
    [-1, 0.4],
    [2, 3],
  ])('ld_normal mu=%f sigma=%f — jStat.normal.pdf', (mu, s) => {
    close(run('unknown mu, s\nterm ld_normal(x, mu, s)', { x: numeric(xs) }, [mu, s]), sum(xs.map((x) => Math.log(jStat.normal.pdf(x, mu, s)))));
  });
  it('ld_normal with a vector scale (library kernel path) — jStat.normal.pdf', () => {
    const sc = [0.5, 1, 1.5, 2, 2.5, 3];
    const got = run('unknown mu, s[6]\nterm ld_normal(x, mu, s)', { x: numeric(xs) }, [0.2, ...sc]);
    close(got, sum(xs.map((x, i) => Math.log(jStat.normal.pdf(x, 0.2, sc[i])))));
  });
  it.each([
    [1.5, 0.2, 0.8],
    [5, -1, 2],
    [30, 0, 1],
  ])('ld_student_t nu=%f mu=%f sigma=%f — @stdlib/stats-base-dists-t-logpdf (location-scale: f((x−μ)/σ)/σ)', (nu, mu, s) => {
    const want = sum(xs.map((x) => tLogpdf((x - mu) / s, nu) - Math.log(s)));
    close(run('unknown nu, mu, s\nterm ld_student_t(x, nu, mu, s)', { x: numeric(xs) }, [nu, mu, s]), want);
  });
  it.each([
    [0, 1],
    [1.5, 0.3],
  ])('ld_cauchy loc=%f scale=%f — jStat.cauchy.pdf', (l, s) => {
    close(run('unknown l, s\nterm ld_cauchy(x, l, s)', { x: numeric(xs) }, [l, s]), sum(xs.map((x) => Math.log(jStat.cauchy.pdf(x, l, s)))));
  });
  it.each([
    [0, 1],
    [-0.5, 2.5],
  ])('ld_laplace loc=%f scale=%f — jStat.laplace.pdf', (l, s) => {
    close(run('unknown l, s\nterm ld_laplace(x, l, s)', { x: numeric(xs) }, [l, s]), sum(xs.map((x) => Math.log(jStat.laplace.pdf(x, l, s)))));
  });
  it.each([
    [0, 1],
    [1, 0.6],
  ])('ld_logistic loc=%f scale=%f — handbook density e^(−z)/(s(1+e^(−z))²), z=(x−μ)/s (from memory)', (l, s) => {
    const want = sum(
      xs.map((x) => {
        const z = (x - l) / s;
        return -z - Math.log(s) - 2 * Math.log1p(Math.exp(-z));
      }),
    );
    close(run('unknown l, s\nterm ld_logistic(x, l, s)', { x: numeric(xs) }, [l, s]), want);
  });
  it.each([
    [0, 1],
    [0.7, 0.3],
  ])('ld_lognormal mu=%f sigma=%f — jStat.lognormal.pdf', (mu, s) => {
    close(run('unknown mu, s\nterm ld_lognormal(x, mu, s)', { x: numeric(pos) }, [mu, s]), sum(pos.map((x) => Math.log(jStat.lognormal.pdf(x, mu, s)))));
  });
  it.each([
    [2, 1.5],
    [0.7, 0.2],
    [9, 4],
  ])('ld_gamma shape=%f rate=%f — jStat.gamma.pdf(x, shape, scale = 1/rate)', (a, r) => {
    close(run('unknown a, r\nterm ld_gamma(x, a, r)', { x: numeric(pos) }, [a, r]), sum(pos.map((x) => Math.log(jStat.gamma.pdf(x, a, 1 / r)))));
  });
  it.each([[0.3], [2.5]])('ld_exponential rate=%f — jStat.exponential.pdf', (r) => {
    close(run('unknown r\nterm ld_exponential(x, r)', { x: numeric(pos) }, [r]), sum(pos.map((x) => Math.log(jStat.exponential.pdf(x, r)))));
  });
  it.each([
    [2, 3],
    [0.5, 0.5],
    [7, 1.2],
  ])('ld_beta a=%f b=%f — @stdlib/stats-base-dists-beta-logpdf', (a, b) => {
    close(run('unknown a, b\nterm ld_beta(x, a, b)', { x: numeric(fr) }, [a, b]), sum(fr.map((x) => betaLogpdf(x, a, b))));
  });
  it.each([[0.4], [3]])('ld_halfnormal sigma=%f — 2·jStat.normal.pdf(x, 0, σ) on x ≥ 0 (handbook)', (s) => {
    close(run('unknown s\nterm ld_halfnormal(x, s)', { x: numeric(pos) }, [s]), sum(pos.map((x) => Math.log(2 * jStat.normal.pdf(x, 0, s)))));
  });
  it.each([[0.6], [4.2]])('ld_poisson rate=%f — jStat.poisson.pdf', (r) => {
    close(run('unknown r\nterm ld_poisson(k, r)', { k: integer(ks) }, [r]), sum(ks.map((k) => Math.log(jStat.poisson.pdf(k, r)))));
  });
  it.each([[-0.4], [1.3]])('ld_poisson(k, exp(eta)) eta=%f — jStat.poisson.pdf(k, exp(eta))', (e) => {
    close(run('unknown e\nterm ld_poisson(k, exp(e))', { k: integer(ks) }, [e]), sum(ks.map((k) => Math.log(jStat.poisson.pdf(k, Math.exp(e))))));
  });
  const kn = { k: integer([0, 3, 2, 9, 20]), n: integer([0, 4, 5, 9, 20]) };
  const kk = [0, 3, 2, 9, 20];
  it.each([[0.3], [0.85]])('ld_binomial p=%f — jStat.binomial.pdf', (p) => {
    close(run('unknown p\nterm ld_binomial(k, n, p)', kn, [p]), sum(kk.map((k, i) => Math.log(jStat.binomial.pdf(k, ns[i], p)))));
  });
  it.each([[-1.2], [0.9]])('ld_binomial(k, n, logistic(eta)) eta=%f — jStat.binomial.pdf(k, n, 1/(1+e^−eta))', (e) => {
    const p = 1 / (1 + Math.exp(-e));
    close(run('unknown e\nterm ld_binomial(k, n, logistic(e))', kn, [e]), sum(kk.map((k, i) => Math.log(jStat.binomial.pdf(k, ns[i], p)))));
  });
  it.each([[0.2], [0.7]])('ld_bernoulli p=%f — jStat.binomial.pdf(y, 1, p)', (p) => {
    close(run('unknown p\nterm ld_bernoulli(y, p)', { y: integer(ys) }, [p]), sum(ys.map((y) => Math.log(jStat.binomial.pdf(y, 1, p)))));
  });
  it.each([[-2], [0.4]])('ld_bernoulli(y, logistic(eta)) eta=%f — jStat.binomial.pdf(y, 1, logistic(eta))', (e) => {
    const p = 1 / (1 + Math.exp(-e));
    close(run('unknown e\nterm ld_bernoulli(y, logistic(e))', { y: integer(ys) }, [e]), sum(ys.map((y) => Math.log(jStat.binomial.pdf(y, 1, p)))));
  });
  it('ld_dirichlet with K = 2 equals the Beta density — @stdlib/stats-base-dists-beta-logpdf', () => {
    const m = compile('unknown w[2], a[2]\nterm ld_dirichlet(w, a)');
    close(value(m, [0.3, 0.7, 2.5, 1.5]), betaLogpdf(0.3, 2.5, 1.5));
  });
  it('ld_dirichlet K = 3 — handbook formula lgamma(Σα) − Σ lgamma(αᵢ) + Σ(αᵢ−1) log wᵢ with @stdlib/math-base-special-gammaln', () => {
    const w = [0.2, 0.5, 0.3];
    const a = [1.5, 3, 0.8];
    const want = gammaln(sum(a)) - sum(a.map((x) => gammaln(x))) + sum(a.map((x, i) => (x - 1) * Math.log(w[i])));
    close(value(compile('unknown w[3], a[3]\nterm ld_dirichlet(w, a)'), [...w, ...a]), want);
  });
  it('ld_dirichlet with alpha = 1 is log 2! on the 2-simplex (volume 1/2!, handbook)', () => {
    close(value(compile('unknown w[3]\nterm ld_dirichlet(w, 1)'), [0.2, 0.3, 0.5]), Math.log(2));
  });
  it('ld_multinomial K = 2 equals the binomial — jStat.binomial.pdf', () => {
    const m = compile('const c = [3, 7]\nunknown p[2]\nterm ld_multinomial(c, p)');
    close(value(m, [0.35, 0.65]), Math.log(jStat.binomial.pdf(3, 10, 0.35)));
  });
  it('ld_multinomial K = 3 — handbook formula log n! − Σ log kᵢ! + Σ kᵢ log pᵢ with jStat.factorialln', () => {
    const c = [2, 0, 5];
    const p = [0.3, 0.2, 0.5];
    const want = jStat.factorialln(7) - sum(c.map((k) => jStat.factorialln(k))) + sum(c.map((k, i) => k * Math.log(p[i])));
    close(value(compile('const c = [2, 0, 5]\nunknown p[3]\nterm ld_multinomial(c, p)'), p), want);
  });
  it('terms add up, with constant weights and constant-only terms', () => {
    const m = compile('table obs\nunknown mu\nterm 2 * ld_normal(x, mu, 1) - ld_normal(0.5, 0, 1) / 4 + ld_exponential(3, 2)', {
      obs: table({ x: numeric(xs) }),
    });
    const want =
      2 * sum(xs.map((x) => Math.log(jStat.normal.pdf(x, 0.1, 1)))) -
      Math.log(jStat.normal.pdf(0.5, 0, 1)) / 4 +
      Math.log(jStat.exponential.pdf(3, 2));
    close(value(m, [0.1]), want);
  });
  it('outside the support or with invalid parameters the log-density is −Infinity', () => {
    expect(run('unknown s\nterm ld_normal(x, 0, s)', { x: numeric(xs) }, [-1])).toBe(-Infinity);
    expect(run('unknown s\nterm ld_normal(x, 0, s)', { x: numeric(xs) }, [0])).toBe(-Infinity);
    expect(run('unknown r\nterm ld_gamma(x, 2, r)', { x: numeric(xs) }, [1])).toBe(-Infinity);
    expect(run('unknown p\nterm ld_bernoulli(y, p)', { y: integer(ys) }, [1.5])).toBe(-Infinity);
  });
});

describe('math functions in compiled terms', () => {
  it('each function evaluates as the textbook formula (JavaScript Math; lgamma via @stdlib gammaln)', () => {
    const s = 0.7;
    const cases: [string, number][] = [
      ['exp', Math.exp(s)],
      ['log', Math.log(s)],
      ['log1p', Math.log1p(s)],
      ['expm1', Math.expm1(s)],
      ['sqrt', Math.sqrt(s)],
      ['square', s * s],
      ['abs', s],
      ['logistic', 1 / (1 + Math.exp(-s))],
      ['log_logistic', -Math.log1p(Math.exp(-s))],
      ['softplus', Math.log1p(Math.exp(s))],
      ['lgamma', gammaln(s)],
    ];
    for (const [f, want] of cases) close(value(compile(`unknown s\nterm ${f}(s)`), [s]), want);
    close(value(compile('unknown a, b\nterm pow(a, b) + a ^ 2'), [1.3, 0.4]), Math.pow(1.3, 0.4) + 1.69);
    close(value(compile('unknown w[3]\nterm log_sum_exp(w)'), [0.1, -2, 1.5]), Math.log(Math.exp(0.1) + Math.exp(-2) + Math.exp(1.5)));
    close(value(compile('unknown w[3]\nterm mean(w) + dot(w, [1, 2, 3])'), [0.1, -2, 1.5]), (0.1 - 2 + 1.5) / 3 + 0.1 - 4 + 4.5);
    close(value(compile('unknown w[3]\nterm sum(cumsum(w) * [1, 10, 100])'), [1, 2, 3]), 1 + 30 + 600);
    close(value(compile('unknown w[3]\nterm sum(diff(w) * [1, 10])'), [1, 2, 4]), 1 + 20);
  });
  it('data matrix × vector equals the row-by-row sum', () => {
    const t = { obs: table({ a: numeric([1, 2, 3]), b: numeric([0.5, -1, 4]) }) };
    const m = compile('table obs\nunknown beta[2]\nlet X = [a, b]\nterm sum(X * beta)', t);
    close(value(m, [2, -3]), 1 * 2 + 0.5 * -3 + 2 * 2 + -1 * -3 + 3 * 2 + 4 * -3);
  });
});

describe('derived quantities', () => {
  it('are evaluated per draw by their own compiled function', () => {
    const t = { obs: table({ a: numeric([1, 2, 3]), b: numeric([0.5, -1, 4]) }) };
    const m = compile(
      'table obs\nunknown mu[3], s\nlet X = [a, b]\nterm ld_normal(mu, 0, 1)\nderive gain = mu[3] - mu[1]\nderive fitted = X * [s, 2 * s]\nderive total = sum(exp(mu)) + ld_normal(1, 0, s)',
      t,
    );
    expect(m.derived!.names).toEqual(['gain', 'fitted[1]', 'fitted[2]', 'fitted[3]', 'total']);
    const out = new Float64Array(5);
    m.derived!.evaluate(Float64Array.from([0.5, 1, 2, 1.5]), out);
    close(out[0], 1.5);
    close(out[1], 1 * 1.5 + 0.5 * 3);
    close(out[2], 2 * 1.5 - 3);
    close(out[3], 3 * 1.5 + 12);
    close(out[4], Math.exp(0.5) + Math.exp(1) + Math.exp(2) + Math.log(jStat.normal.pdf(1, 0, 1.5)));
  });
});

describe('constant pieces and data errors', () => {
  it('constant log-densities inside other functions are folded at compile time (jStat.normal.pdf)', () => {
    const m = compile('unknown a\nterm exp(ld_normal(0.5, 0, 1)) + ld_normal(a, 0, 1)\nderive c = 2 * ld_normal(1, 0, 2)');
    close(value(m, [0.3]), jStat.normal.pdf(0.5, 0, 1) + Math.log(jStat.normal.pdf(0.3, 0, 1)));
    const out = new Float64Array(1);
    m.derived!.evaluate(Float64Array.from([0.3]), out);
    close(out[0], 2 * Math.log(jStat.normal.pdf(1, 0, 2)));
  });
  it('a gather index outside the vector in the data is a CompileError with line and column', () => {
    const t = { obs: table({ y: numeric([1, 2, 3]), block: integer([1, 5, 2]) }) };
    let err: unknown;
    try {
      compile('table obs\nunknown mu[3]\nterm ld_normal(y, mu[block], 1)', t);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(CompileError);
    const m = (err as CompileError).messages[0];
    expect(m).toMatchObject({ line: 3, column: 22 });
    expect(m.message).toContain('holds 5, outside 1…3');
    let err2: unknown;
    try {
      compile('table obs\nunknown mu[3]\nterm ld_normal(mu, 0, 1)\nconstrain mu[block] >= 0', t);
    } catch (e) {
      err2 = e;
    }
    expect((err2 as CompileError).messages[0]).toMatchObject({ line: 4 });
    expect((err2 as CompileError).messages[0].message).toContain('index 5 is outside 1…3');
  });
});
