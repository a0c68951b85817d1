/**
 * Gradients of every function and distribution THROUGH THE COMPILER, against central finite
 * differences (Richardson-extrapolated, common practice) at random points from a seeded generator.
 * Tolerance: relative error < 1e-6 (the requirement) where the function is smooth.
 */
import { describe, expect, it } from 'vitest';
import { Rng } from '../../../server/engine/rng';
import type { DataTables } from '../../../server/engine/types';
import { category, compile, gradError, integer, numeric, table } from './helpers';

const rng = new Rng(4242);
const u = (a: number, b: number) => a + (b - a) * rng.uniform();

const plots: DataTables = {
  plots: table({
    x: numeric([0.3, -1.2, 2.1, 0.8, -0.4, 1.5, 0.05]),
    pos: numeric([0.7, 1.9, 0.2, 3.1, 0.45, 1.05, 2.6]),
    frac: numeric([0.15, 0.62, 0.33, 0.91, 0.48, 0.07, 0.55]),
    k: integer([0, 3, 1, 7, 2, 0, 5]),
    n: integer([4, 9, 3, 10, 6, 2, 8]),
    wet: integer([0, 1, 1, 0, 1, 0, 0]),
    zone: category([1, 3, 2, 2, 1, 3, 1], ['north', 'ridge', 'valley']),
  }),
};

interface Case {
  name: string;
  src: string;
  theta: () => number[];
}

const cases: Case[] = [
  // Distributions, data rows and unknown parameters (vectorised over 7 rows, scalars broadcast).
  { name: 'ld_normal gather', src: 'unknown mu[3], sigma\nterm ld_normal(x, mu[zone], sigma)', theta: () => [u(-1, 1), u(-1, 1), u(-1, 1), u(0.5, 2)] },
  { name: 'ld_normal vector scale', src: 'unknown m, s[7]\nterm ld_normal(x, m, s)', theta: () => [u(-1, 1), ...Array.from({ length: 7 }, () => u(0.5, 2))] },
  { name: 'ld_normal unknown x', src: 'unknown z[3], sigma\nterm ld_normal(z, 1, sigma)', theta: () => [u(-1, 1), u(-1, 1), u(-1, 1), u(0.5, 2)] },
  { name: 'ld_student_t', src: 'unknown nu, mu, sigma\nterm ld_student_t(x, nu, mu, sigma)', theta: () => [u(1.5, 8), u(-1, 1), u(0.5, 2)] },
  { name: 'ld_cauchy', src: 'unknown loc, scale\nterm ld_cauchy(x, loc, scale)', theta: () => [u(-1, 1), u(0.5, 2)] },
  { name: 'ld_laplace', src: 'unknown loc, scale\nterm ld_laplace(x, loc, scale)', theta: () => [u(-2.5, -1.5), u(0.5, 2)] },
  { name: 'ld_logistic', src: 'unknown loc, scale\nterm ld_logistic(x, loc, scale)', theta: () => [u(-1, 1), u(0.5, 2)] },
  { name: 'ld_lognormal', src: 'unknown mu, sigma\nterm ld_lognormal(pos, mu, sigma)', theta: () => [u(-1, 1), u(0.5, 2)] },
  { name: 'ld_gamma', src: 'unknown shape, rate\nterm ld_gamma(pos, shape, rate)', theta: () => [u(0.8, 4), u(0.5, 2)] },
  { name: 'ld_gamma unknown x', src: 'unknown w[2]\nterm ld_gamma(w, 2.5, 1.5)', theta: () => [u(0.5, 2), u(0.5, 2)] },
  { name: 'ld_exponential', src: 'unknown rate\nterm ld_exponential(pos, rate)', theta: () => [u(0.5, 2)] },
  { name: 'ld_beta', src: 'unknown a, b\nterm ld_beta(frac, a, b)', theta: () => [u(0.8, 4), u(0.8, 4)] },
  { name: 'ld_beta unknown x', src: 'unknown p\nterm ld_beta(p, 2, 3)', theta: () => [u(0.2, 0.8)] },
  { name: 'ld_halfnormal', src: 'unknown sigma\nterm ld_halfnormal(pos, sigma)', theta: () => [u(0.5, 2)] },
  { name: 'ld_poisson', src: 'unknown rate\nterm ld_poisson(k, rate)', theta: () => [u(0.5, 4)] },
  { name: 'ld_poisson(k, exp(…)) fused', src: 'unknown a, b\nterm ld_poisson(k, exp(a + b * x))', theta: () => [u(-0.5, 1), u(-0.5, 0.5)] },
  { name: 'ld_binomial', src: 'unknown p\nterm ld_binomial(k, n, p)', theta: () => [u(0.2, 0.8)] },
  { name: 'ld_binomial(k, n, logistic(…)) fused', src: 'unknown a, b\nterm ld_binomial(k, n, logistic(a + b * x))', theta: () => [u(-1, 1), u(-1, 1)] },
  { name: 'ld_bernoulli', src: 'unknown p[3]\nterm ld_bernoulli(wet, p[zone])', theta: () => [u(0.2, 0.8), u(0.2, 0.8), u(0.2, 0.8)] },
  { name: 'ld_bernoulli(y, logistic(…)) fused', src: 'unknown e[3]\nterm ld_bernoulli(wet, logistic(e[zone] * x))', theta: () => [u(-1, 1), u(-1, 1), u(-1, 1)] },
  {
    name: 'ld_dirichlet (w on the simplex through a bracket list, alpha = exp(v))',
    src: 'unknown a, b, v[3]\nterm ld_dirichlet([a, b, 1 - a - b], exp(v))',
    theta: () => [u(0.2, 0.35), u(0.2, 0.35), u(-0.5, 1), u(-0.5, 1), u(-0.5, 1)],
  },
  { name: 'ld_dirichlet scalar alpha', src: 'unknown a, c\nterm ld_dirichlet([a, 1 - a], c)', theta: () => [u(0.2, 0.8), u(0.5, 3)] },
  {
    name: 'ld_multinomial',
    src: 'const tally = [3, 0, 5]\nunknown a, b\nterm ld_multinomial(tally, [a, b, 1 - a - b])',
    theta: () => [u(0.2, 0.35), u(0.2, 0.35)],
  },
  // Math functions: outer (scalar) path, row path (with data), and vector path.
  ...['exp', 'log', 'log1p', 'expm1', 'sqrt', 'square', 'abs', 'logistic', 'log_logistic', 'softplus', 'lgamma'].flatMap((f) => [
    { name: `${f} scalar`, src: `unknown s\nterm ${f}(s)`, theta: () => [u(0.4, 2)] },
    { name: `${f} rows`, src: `unknown s[3]\nterm sum(${f}(s[zone] * pos))`, theta: () => [u(0.3, 1.5), u(0.3, 1.5), u(0.3, 1.5)] },
    { name: `${f} in a data-free vector`, src: `unknown s[4]\nterm sum(${f}(s)) + ld_normal(cumsum(${f}(s)), 0, 3)`, theta: () => [u(0.3, 1.5), u(0.3, 1.5), u(0.3, 1.5), u(0.3, 1.5)] },
  ]),
  { name: 'abs negative side', src: 'unknown s[2]\nterm sum(abs(s))', theta: () => [u(-2, -0.5), u(0.5, 2)] },
  { name: 'pow scalar', src: 'unknown a, b\nterm pow(a, b)', theta: () => [u(0.5, 2), u(0.5, 2)] },
  { name: 'pow rows', src: 'unknown a, b\nterm sum(pow(pos * a, b))', theta: () => [u(0.5, 2), u(0.5, 2)] },
  { name: '^ operator', src: 'unknown a, b\nterm a ^ b + sum((pos + a) ^ 2)', theta: () => [u(0.5, 2), u(0.5, 2)] },
  { name: 'arithmetic', src: 'unknown a, b\nterm -a * b / (1 + a * a) - b / a + sum(x / (a + 3) - b * x)', theta: () => [u(0.5, 2), u(-1, 1)] },
  { name: 'sum and mean', src: 'unknown w[4]\nterm square(sum(w)) + exp(mean(w))', theta: () => [u(-1, 1), u(-1, 1), u(-1, 1), u(-1, 1)] },
  { name: 'mean over rows (fused)', src: 'unknown a\nterm 3 * mean(square(x - a))', theta: () => [u(-1, 1)] },
  { name: 'log_sum_exp vector', src: 'unknown w[3]\nterm log_sum_exp(w * 2)', theta: () => [u(-1, 1), u(-1, 1), u(-1, 1)] },
  { name: 'log_sum_exp bracket list', src: 'unknown a, b\nterm log_sum_exp([a, 2 * b]) * 3', theta: () => [u(-1, 1), u(-1, 1)] },
  { name: 'dot', src: 'unknown w[3], v[3]\nterm dot(w, v) + dot(w, [1, 2, 3])', theta: () => Array.from({ length: 6 }, () => u(-1, 1)) },
  { name: 'dot over rows', src: 'unknown a\nterm dot(x, exp(a * pos))', theta: () => [u(-1, 1)] },
  { name: 'cumsum', src: 'unknown w[4]\nterm ld_normal(cumsum(w), [1, 2, 3, 4], 1.5)', theta: () => Array.from({ length: 4 }, () => u(-1, 1)) },
  { name: 'diff', src: 'unknown w[4]\nterm sum(square(diff(w))) + ld_normal(diff(w), 0.5, 2)', theta: () => Array.from({ length: 4 }, () => u(-1, 1)) },
  {
    name: 'data matrix × vector',
    src: 'unknown beta[3], alpha, sigma\nlet X = [x, pos, frac]\nterm ld_normal(k, X * beta + alpha, sigma)',
    theta: () => [u(-1, 1), u(-1, 1), u(-1, 1), u(-1, 1), u(0.8, 2)],
  },
  {
    name: 'matrix product inside a non-linear term',
    src: 'unknown beta[2]\nlet X = [x, frac]\nterm exp(sum(X * beta) / 10) + log_sum_exp(X * beta)',
    theta: () => [u(-1, 1), u(-1, 1)],
  },
  {
    name: 'shared let used twice, scale by transform',
    src: 'unknown log_s, m\nlet s = exp(log_s)\nterm ld_normal(x, m, s) + ld_halfnormal(s, 2) + log_s',
    theta: () => [u(-0.5, 0.5), u(-1, 1)],
  },
  {
    name: 'reduction feeding a non-linear outer expression',
    src: 'unknown a, b\nterm log(1 + square(sum(ld_normal(x, a, 1 + b * b)) / 10))',
    theta: () => [u(-1, 1), u(-1, 1)],
  },
  {
    name: 'gather of a materialised vector',
    src: 'unknown step[3], s\nlet level = cumsum(step)\nterm ld_normal(x, level[zone], s)',
    theta: () => [u(-1, 1), u(-1, 1), u(-1, 1), u(0.5, 2)],
  },
];

describe('compiled gradients match central finite differences', () => {
  for (const c of cases) {
    it(c.name, () => {
      const m = compile(`table plots\n${c.src}`, plots);
      for (let rep = 0; rep < 4; rep++) {
        const theta = c.theta();
        const { err, v, g } = gradError(m, theta);
        expect(Number.isFinite(v), `value at ${theta}`).toBe(true);
        for (const gk of g) expect(Number.isFinite(gk)).toBe(true);
        expect(err, `${c.name} at ${theta}`).toBeLessThan(1e-6);
      }
    });
  }
});
