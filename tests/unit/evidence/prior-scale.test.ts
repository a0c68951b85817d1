/**
 * The prior-scale transform (shared/lang/prior-scale.ts): which calls are scaled, which are reported
 * as not scalable, and that the compiled log-density of the scaled program is the reference
 * library's log-density with the scale multiplied (rates divided) — @stdlib normal, half-normal
 * (as twice the normal on x ≥ 0, a standard identity) and exponential log-densities.
 */
import { describe, expect, it } from 'vitest';
import normalLogpdf from '@stdlib/stats-base-dists-normal-logpdf';
import exponentialLogpdf from '@stdlib/stats-base-dists-exponential-logpdf';
import { scalePriors } from '../../../shared/lang/prior-scale';
import { compileProgram } from '../../../server/engine/compile';
import { dataSchemaOf as schemaOf } from '../../../shared/lang/index';
import type { DataTables } from '../../../server/engine/types';

const tables: DataTables = { d: { rows: 3, columns: { y: { type: 'numeric', values: Float64Array.from([0.3, 1.1, -0.2]) } } } };

const SRC = [
  'table d',
  'unknown mu, s, p, tau, z',
  'term ld_normal(y, mu, s)',
  'term ld_normal(mu, 1, 2) + ld_exponential(s, 0.5)',
  'term ld_beta(p, 2, 3)',
  'term ld_halfnormal(tau, 1.5) + ld_normal(z, 0, tau)',
  'constrain s >= 0.01',
  'constrain p >= 0.001',
  'constrain p <= 0.999',
  'constrain tau >= 0.01',
].join('\n');

describe('prior scales', () => {
  it('scales constant scales of prior lines only, and says what it left alone', () => {
    const r = scalePriors(SRC, schemaOf(tables), 2);
    const lines = r.source.split('\n');
    expect(lines[2]).toBe('term ld_normal(y, mu, s)'); // likelihood: untouched
    expect(lines[3]).toBe('term ld_normal(mu, 1, 2 * 2) + ld_exponential(s, 0.5 / 2)');
    expect(lines[4]).toBe('term ld_beta(p, 2, 3)');
    expect(lines[5]).toBe('term ld_halfnormal(tau, 1.5 * 2) + ld_normal(z, 0, tau)');
    expect(lines.length).toBe(SRC.split('\n').length); // line numbers kept
    const byLine = new Map(r.lines.map((l) => [l.line, l]));
    expect(byLine.get(4)!.scaled).toHaveLength(2);
    expect(byLine.get(5)!.unscaled[0]).toMatch(/ld_beta: no scale parameter/);
    expect(byLine.get(6)!.unscaled[0]).toMatch(/depends on unknowns/);
    expect(byLine.has(3)).toBe(false);
    expect(r.flatUnknowns).toEqual([]);
    expect(scalePriors('unknown a, b\nterm ld_normal(a, 0, 1)\nconstrain b >= 0\nconstrain b <= 1', {}, 2).flatUnknowns).toEqual(['b']);
    // Factor 1 changes nothing.
    expect(scalePriors(SRC, schemaOf(tables), 1).source).toBe(SRC);
  });

  it('the scaled program is the reference densities with scale × f and rate ÷ f', () => {
    const f = 0.5;
    const prior = 'unknown mu, s, tau\nterm ld_normal(mu, 1, 2) + ld_exponential(s, 0.5) + ld_halfnormal(tau, 1.5)\nconstrain s >= 0\nconstrain tau >= 0';
    const scaled = scalePriors(prior, {}, f).source;
    const t = compileProgram(scaled, {});
    const theta = Float64Array.from([0.4, 0.7, 0.9]);
    const got = t.logDensity(theta, new Float64Array(3));
    // Reference: @stdlib log-densities; half-normal(σ) = 2·normal(0, σ) on x ≥ 0 (standard identity).
    const want =
      normalLogpdf(0.4, 1, 2 * f) + exponentialLogpdf(0.7, 0.5 / f) + Math.log(2) + normalLogpdf(0.9, 0, 1.5 * f);
    // Up to a constant the language may drop: compare differences between two points.
    const theta2 = Float64Array.from([-0.3, 1.9, 0.2]);
    const got2 = t.logDensity(theta2, new Float64Array(3));
    const want2 = normalLogpdf(-0.3, 1, 2 * f) + exponentialLogpdf(1.9, 0.5 / f) + Math.log(2) + normalLogpdf(0.2, 0, 1.5 * f);
    expect(got - got2).toBeCloseTo(want - want2, 10);
  });

  it('wraps an expression scale in parentheses and refuses a non-positive factor', () => {
    const r = scalePriors('unknown a\nterm ld_cauchy(a, 0, 2 + 0.5)', {}, 3);
    expect(r.source.split('\n')[1]).toBe('term ld_cauchy(a, 0, (2 + 0.5) * 3)');
    expect(() => scalePriors('unknown a\nterm ld_normal(a, 0, 1)', {}, 0)).toThrow(/positive/);
  });
});
