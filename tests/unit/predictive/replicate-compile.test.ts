/**
 * The `replicate` statement (front end and compiled simulation), the likelihood-term rule, the
 * compiled pointwise log-likelihood and prior-only programs. Reference values come from stdlib's
 * log-densities (@stdlib/stats-base-dists-normal-logpdf, -poisson-logpmf) and the half-normal
 * identity log HN(x | s) = log 2 + log N(x | 0, s) (textbook).
 */
import { describe, expect, it } from 'vitest';
import stdNormalLogpdf from '@stdlib/stats-base-dists-normal-logpdf';
import stdPoissonLogpmf from '@stdlib/stats-base-dists-poisson-logpmf';
import { checkProgram, dataSchemaOf, isLikelihoodTerm, type DataSchema } from '../../../shared/lang/index';
import { compileProgram } from '../../../server/engine/compile/index';
import { compilePointwise, compilePriorOnly, compileReplicates } from '../../../server/engine/compile/predictive';
import { Rng } from '../../../server/engine/rng';
import type { DataTables } from '../../../server/engine/types';

type F = (...a: number[]) => number;
const lnorm = stdNormalLogpdf as F;
const lpois = stdPoissonLogpmf as F;

const kg = Float64Array.of(10.2, 11.5, 9.8, 14.1, 13.3, 12.7);
const field = Float64Array.of(1, 2, 1, 2, 3, 3);
const tables: DataTables = {
  harvest: {
    rows: 6,
    columns: { kg: { type: 'numeric', values: kg }, field: { type: 'category', values: field, levels: ['north', 'mid', 'south'] } },
  },
  visits: { rows: 3, columns: { n: { type: 'integer', values: Float64Array.of(0, 4, 2) } } },
};
const schema: DataSchema = dataSchemaOf(tables);

const MODEL = `table harvest
unknown mu[3], sigma
term ld_normal(kg, mu[field], sigma)
term ld_normal(mu, 12, 5) + ld_halfnormal(sigma, 3)
constrain mu[1] <= mu[2]
replicate kg_new = ld_normal(kg, mu[field], sigma)`;

describe('replicate: front end', () => {
  it('checks a replicate line and reports its shape and density', () => {
    const r = checkProgram(MODEL, schema);
    expect(r.messages).toEqual([]);
    expect(r.replicates).toEqual([{ name: 'kg_new', shape: [6], density: 'ld_normal', line: 6 }]);
    expect(r.derivedNames).toEqual([]);
    expect(r.symbols.find((s) => s.name === 'kg_new')?.kind).toBe('replicate');
  });

  it.each([
    ['replicate kg_new = ld_normal(mu[field], kg, sigma)', 6, 30, 'cannot depend on the unknowns'],
    ['replicate kg_new = mean(kg)', 6, 20, 'is not a density'],
    ['replicate w = ld_dirichlet(mu, 1)', 6, 15, 'takes whole vectors'],
    ['replicate kg_new = kg + 1', 6, 20, 'names the density to simulate from'],
    ['replicate = ld_normal(kg, 1, 1)', 6, 11, 'the name of the replicate is missing'],
    ['replicate kg_new ld_normal(kg, 1, 1)', 6, 18, '`=` is missing'],
    ['replicate mu = ld_normal(kg, 1, 1)', 6, 11, 'already declared'],
  ])('%s → line %i, column %i: %s', (line, lineNo, col, msg) => {
    const src = MODEL.replace(/replicate.*$/, line);
    const r = checkProgram(src, schema);
    const err = r.messages.find((m) => m.severity === 'error');
    expect(err).toBeDefined();
    expect(err!.line).toBe(lineNo);
    expect(err!.column).toBe(col);
    expect(err!.message).toContain(msg);
  });

  it('keeps replicated data out of other lines', () => {
    const r = checkProgram(MODEL + '\nderive d = mean(kg_new)', schema);
    expect(r.messages[0]).toMatchObject({ line: 7, column: 17, message: expect.stringContaining('replicated data') });
  });

  it('classifies term lines: reading a column (directly or through let) makes a likelihood term', () => {
    const src = `table harvest
unknown mu[3], sigma
let centred = kg - 12
term ld_normal(centred, mu[field] - 12, sigma)
term ld_normal(mu, 12, 5)
term ld_halfnormal(sigma, 3)`;
    const r = checkProgram(src, schema);
    expect(r.ok).toBe(true);
    expect(r.program.statements.filter((s) => s.kind === 'term').map(isLikelihoodTerm)).toEqual([true, false, false]);
  });

  it('classifies a qualified column as data and a declared name that hides a column as not data', () => {
    const src = `table harvest
unknown mu, kg
term ld_normal(harvest.kg, mu, 1)
term ld_normal(kg, mu, 1)`;
    const r = checkProgram(src, schema);
    expect(r.ok).toBe(true);
    expect(r.program.statements.filter((s) => s.kind === 'term').map(isLikelihoodTerm)).toEqual([true, false]);
  });
});

describe('replicate: compiled simulation', () => {
  it('simulates each row from its own density, reproducibly from the seed', () => {
    const m = compileProgram(MODEL, tables);
    const rep = compileReplicates(m.check, tables)!;
    expect(rep.specs[0]).toMatchObject({ name: 'kg_new', length: 6, table: 'harvest', density: 'ld_normal' });
    expect(Array.from(rep.specs[0].observed)).toEqual(Array.from(kg));
    expect(rep.specs[0].groups.map((g) => g.column)).toEqual(['field']);
    const theta = Float64Array.of(10, 12, 13, 0.5);
    expect(rep.simulate(theta, new Rng(3, 9))).toEqual(rep.simulate(theta, new Rng(3, 9)));
    // Row means against mu[field[i]] (the model), within 4 standard errors σ/√n.
    const rng = new Rng(42);
    const n = 4000;
    const sums = new Float64Array(6);
    for (let k = 0; k < n; k++) {
      const [y] = rep.simulate(theta, rng);
      for (let i = 0; i < 6; i++) sums[i] += y[i];
    }
    for (let i = 0; i < 6; i++) expect(Math.abs(sums[i] / n - theta[field[i] - 1])).toBeLessThan((4 * 0.5) / Math.sqrt(n));
  });

  it('simulates counts with a data-dependent rate', () => {
    const src = `table visits
unknown lam
term ld_poisson(n, lam) + ld_exponential(lam, 1)
constrain lam >= 0
replicate n_new = ld_poisson(n, lam)`;
    const m = compileProgram(src, tables);
    const rep = compileReplicates(m.check, tables)!;
    const rng = new Rng(1);
    let s = 0;
    for (let k = 0; k < 2000; k++) for (const v of rep.simulate(Float64Array.of(2.5), rng)[0]) s += v;
    // Poisson(2.5): mean 2.5, sd √2.5 per value (textbook); 6000 values
    expect(Math.abs(s / 6000 - 2.5)).toBeLessThan((4 * Math.sqrt(2.5)) / Math.sqrt(6000));
  });
});

describe('pointwise log-likelihood and prior-only programs', () => {
  const theta = Float64Array.of(10.5, 12.5, 13, 1.3);
  it('gives one value per row equal to the row log-density', () => {
    const m = compileProgram(MODEL, tables);
    const p = compilePointwise(m.check, tables);
    expect(p.ok).toBe(true);
    if (!p.ok) return;
    expect(p.pointwise.tables).toEqual([{ table: 'harvest', offset: 0, rows: 6 }]);
    const ll = p.pointwise.evaluate(theta);
    for (let i = 0; i < 6; i++) expect(ll[i]).toBeCloseTo(lnorm(kg[i], theta[field[i] - 1], theta[3]), 12); // stdlib normal logpdf
  });

  it('indexes the rows of several likelihood tables one table after another', () => {
    const src = `table harvest
table visits
unknown mu, sigma, lam
term ld_normal(kg, mu, sigma)
term ld_poisson(n, lam)
term ld_normal(mu, 12, 5) + ld_halfnormal(sigma, 3) + ld_exponential(lam, 1)
constrain sigma >= 0
constrain lam >= 0`;
    const m = compileProgram(src, tables);
    const p = compilePointwise(m.check, tables);
    expect(p.ok).toBe(true);
    if (!p.ok) return;
    expect(p.pointwise.tables).toEqual([
      { table: 'harvest', offset: 0, rows: 6 },
      { table: 'visits', offset: 6, rows: 3 },
    ]);
    const ll = p.pointwise.evaluate(Float64Array.of(12, 2, 1.7));
    expect(ll[7]).toBeCloseTo(lpois(4, 1.7), 12); // stdlib Poisson logpmf
    expect(ll[0]).toBeCloseTo(lnorm(kg[0], 12, 2), 12);
  });

  it('says why a likelihood has no per-row form', () => {
    const src = `table harvest
unknown mu
term ld_normal(mean(kg), mu, 1)`;
    const m = compileProgram(src, tables);
    const p = compilePointwise(m.check, tables);
    expect(p.ok).toBe(false);
    if (!p.ok) expect(p.reason).toContain('line 3');
  });

  it('a prior-only program keeps the prior terms and drops the likelihood', () => {
    const prior = compilePriorOnly(MODEL, tables);
    const g = new Float64Array(4);
    let want = Math.log(2) + lnorm(theta[3], 0, 3); // half-normal identity with stdlib normal logpdf
    for (let k = 0; k < 3; k++) want += lnorm(theta[k], 12, 5);
    expect(prior.logDensity(theta, g)).toBeCloseTo(want, 10);
    expect(prior.inequalities.rows).toBe(1);
  });
});
