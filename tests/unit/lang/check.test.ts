/** The checker: summary, name resolution, shapes, messages and suggestions. */
import { describe, expect, it } from 'vitest';
import { checkProgram, FUNCTION_SIGNATURES, LANGUAGE_KEYWORDS, type DataSchema } from '../../../shared/lang/index';

const trial: DataSchema = {
  trial: { rows: 24, columns: { yield: { type: 'numeric' }, level: { type: 'category', levels: 6 }, block: { type: 'integer' } } },
};

const sketch = `table trial                       # bind the data table named "trial"
unknown mu[6]                     # one mean yield per nitrogen level
unknown sigma
term ld_normal(yield, mu[level], sigma)        # vectorised over rows; mu[level] gathers
term ld_normal(mu, 40, 20) + ld_halfnormal(sigma, 10)
constrain mu[1] <= mu[2] <= mu[3] <= mu[4] <= mu[5] <= mu[6]
constrain sigma >= 0.01
derive gain = mu[6] - mu[1]`;

function errors(src: string, schema: DataSchema = trial) {
  return checkProgram(src, schema).messages.filter((m) => m.severity === 'error');
}

describe('checkProgram summary', () => {
  it('accepts the design sketch and reports unknowns, derived quantities and counts', () => {
    const r = checkProgram(sketch, trial);
    expect(r.messages).toEqual([]);
    expect(r.ok).toBe(true);
    expect(r.unknowns).toEqual([
      { name: 'mu', shape: [6], size: 6, offset: 0 },
      { name: 'sigma', shape: [], size: 1, offset: 6 },
    ]);
    expect(r.dim).toBe(7);
    expect(r.names[0]).toBe('mu[1]');
    expect(r.derived).toEqual([{ name: 'gain', shape: [] }]);
    expect(r.constraintCounts).toEqual({ inequalities: 6, equalities: 0 });
    expect(r.tables).toEqual(['trial']);
    expect(r.program.statements.map((s) => s.kind)).toEqual(['table', 'unknown', 'unknown', 'term', 'term', 'constrain', 'constrain', 'derive']);
    const term = r.program.statements[3];
    expect(term.kind === 'term' && term.expr.type).toEqual({ shape: [], dep: 2, integer: false });
  });

  it('qualified and bare column names, and ambiguity across tables', () => {
    const two: DataSchema = { ...trial, sites: { rows: 24, columns: { yield: { type: 'numeric' }, slope: { type: 'numeric' } } } };
    expect(errors('table trial\nunknown m\nterm ld_normal(trial.yield, m, 1)', two)).toEqual([]);
    const amb = errors('table trial\ntable sites\nunknown m\nterm ld_normal(yield, m, 1)', two);
    expect(amb[0].message).toContain('several tables');
    expect(amb[0].suggestion).toBe('trial.yield');
    expect(amb[0].column).toBe(16);
    const unbound = errors('unknown m\nterm ld_normal(yield, m, 1)');
    expect(unbound[0].suggestion).toBe('add the line: table trial');
  });
});

describe('messages with line, column and suggestion', () => {
  it('did-you-mean for a misspelt unknown', () => {
    const [m] = errors(`${sketch}\nterm ld_halfnormal(sigam, 1)`);
    expect(m).toMatchObject({ line: 9, column: 20, endColumn: 25, message: 'unknown name `sigam`', suggestion: 'did you mean `sigma`?' });
  });
  it('did-you-mean for functions, columns, tables and keywords', () => {
    expect(errors('table trial\nunknown m\nterm ld_normel(yield, m, 1)')[0].suggestion).toBe('did you mean `ld_normal`?');
    expect(errors('table trial\nunknown m\nterm ld_normal(trial.yeild, m, 1)')[0].suggestion).toBe('did you mean `yield`?');
    expect(errors('table trail')[0].suggestion).toBe('did you mean `trial`?');
    expect(errors('unknwn m')[0].suggestion).toBe('did you mean `unknown`?');
  });
  it.each(['constructor', '__proto__', 'process', 'this', 'prototype', 'toString', 'hasOwnProperty', 'valueOf', 'globalThis', 'eval', 'Function'])(
    '`%s` is just an unknown name',
    (name) => {
      const [m] = errors(`unknown sigma\nterm ld_normal(1, ${name}, sigma)`);
      expect(m.message).toBe(`unknown name \`${name}\``);
      expect(m.line).toBe(2);
      expect(m.column).toBe(19);
      expect(m.endColumn).toBe(19 + name.length);
    },
  );
  it('hostile names work as ordinary declared names', () => {
    const r = checkProgram('unknown constructor, __proto__[2], prototype\nterm ld_normal(__proto__, constructor, exp(prototype))', {});
    expect(r.ok).toBe(true);
    expect(r.names).toEqual(['constructor', '__proto__[1]', '__proto__[2]', 'prototype']);
  });
  it('wrong arity names the signature', () => {
    const [m] = errors('unknown a\nterm ld_normal(a, 1)');
    expect(m.message).toContain('takes 3 arguments');
    expect(m.suggestion).toBe('write ld_normal(x, mu, sigma)');
  });
  it('wrong shapes', () => {
    expect(errors('table trial\nunknown b[3]\nterm ld_normal(yield, b, 1)')[0].message).toContain('lengths do not match');
    expect(errors('unknown b[3]\nterm b')[0].suggestion).toContain('sum(');
    expect(errors('table trial\nunknown b[3]\nterm ld_normal(yield, b[level], 1)')[0].message).toContain('6 levels but the vector has only 3');
    expect(errors('unknown b[3]\nterm b[4]')[0].message).toContain('outside 1…3');
    expect(errors('unknown b[3]\nterm b[0]')[0].message).toContain('indices start at 1');
    expect(errors('unknown b[3], s\nterm b[s]')[0].message).toContain('cannot depend on the unknowns');
    expect(errors('table trial\nunknown b[3]\nterm sum(b[yield])')[0].message).toContain('whole number');
    expect(errors('table trial\nunknown b[2]\nlet X = [yield, block]\nterm sum(X * [1, 2, 3])')[0].message).toContain('vector of 2');
  });
  it('statement-level mistakes', () => {
    expect(errors('unknown m\nunknown m')[0].message).toContain('already declared on line 1');
    expect(errors('term m\nunknown m')[0].message).toContain('before it is declared on line 2');
    expect(errors('unknown exp')[0].message).toContain('function name');
    expect(errors('unknown a\nconstrain a = 1')[0].message).toContain('use `==`');
    expect(errors('unknown a\nterm a <= 1')[0].message).toContain('only belongs in a constrain line');
    expect(errors('unknown a\nconstrain a != 1')[0].message).toContain('`!=` is not available');
    expect(errors('unknown a\nterm "a"')[0].message).toContain('quotes');
    expect(errors('unknown a\nterm a b')[0].message).toContain('operator is missing');
    expect(errors('unknown a\nterm (a + 1')[0].message).toContain('never closed');
    expect(errors('unknown a\nderive a2 a')[0].message).toContain('`=` is missing');
    expect(errors('unknown a\nconst c = a')[0].message).toContain('numbers only');
  });
  it('warnings do not block', () => {
    const r = checkProgram('unknown a\nterm ld_normal(1, 0, 1)\nterm ld_normal(a, 0, 1)', {});
    expect(r.ok).toBe(true);
    expect(r.messages[0].severity).toBe('warning');
  });
});

describe('editor lists', () => {
  it('cover every required keyword and function with doc and example', () => {
    const kw = LANGUAGE_KEYWORDS.map((k) => k.name);
    for (const k of ['table', 'unknown', 'term', 'constrain', 'derive', 'const', 'let']) expect(kw).toContain(k);
    const fns = FUNCTION_SIGNATURES.map((f) => f.name);
    const required = [
      'ld_normal', 'ld_student_t', 'ld_cauchy', 'ld_laplace', 'ld_logistic', 'ld_lognormal', 'ld_gamma', 'ld_exponential', 'ld_beta',
      'ld_halfnormal', 'ld_poisson', 'ld_binomial', 'ld_bernoulli',
      'ld_dirichlet', 'ld_multinomial', 'exp', 'log', 'log1p', 'expm1', 'sqrt', 'square', 'pow', 'abs', 'logistic', 'log_logistic',
      'softplus', 'lgamma', 'log_sum_exp', 'sum', 'mean', 'dot', 'cumsum', 'diff',
    ];
    for (const f of required) expect(fns).toContain(f);
    for (const f of FUNCTION_SIGNATURES) {
      expect(f.doc.length).toBeGreaterThan(5);
      expect(f.example).toContain(f.name === 'pow' ? 'pow' : f.name);
      expect(f.signature).toContain('→');
    }
  });
  it('every function example checks without a syntax error', () => {
    for (const f of FUNCTION_SIGNATURES) {
      const r = checkProgram(f.example, {});
      for (const m of r.messages) {
        expect(m.message).not.toContain('could not read');
        expect(m.message).not.toContain('a line starts with');
      }
    }
  });
});

describe('named lengths and the symbol list', () => {
  it('unknown vectors may take their length from a named constant', () => {
    const r = checkProgram('const K = 4\nunknown w[K], s\nconstrain sum(w) == 1', {});
    expect(r.ok).toBe(true);
    expect(r.unknowns[0]).toEqual({ name: 'w', shape: [4], size: 4, offset: 0 });
    expect(r.dim).toBe(5);
    const bad = errors('const K = 2.5\nunknown w[K]', {});
    expect(bad[0]).toMatchObject({ line: 2, column: 11, endColumn: 12 });
    expect(errors('const K = 3\nunknown w[k]', {})[0].suggestion).toBe('did you mean `K`?');
  });
  it('lists unknowns, constants, lets, derived names, tables and their columns', () => {
    const r = checkProgram(`${sketch}\nconst prior = 2\nlet spread = sigma * prior`, trial);
    const byName = new Map(r.symbols.map((s) => [s.name, s]));
    expect(byName.get('mu')).toMatchObject({ kind: 'unknown', shape: [6], detail: 'unknown, vector of 6', line: 2 });
    expect(byName.get('level')).toMatchObject({ kind: 'column', table: 'trial', detail: 'category column of trial, 6 levels' });
    expect(byName.get('trial')).toMatchObject({ kind: 'table', detail: 'table, 24 rows' });
    expect(byName.get('prior')).toMatchObject({ kind: 'const', shape: [] });
    expect(byName.get('spread')).toMatchObject({ kind: 'let', shape: [] });
    expect(byName.get('gain')).toMatchObject({ kind: 'derive' });
  });
});

describe('every independent problem on a line is reported', () => {
  it('two unknown names on one line both get a message, each at its own place', () => {
    const src = 'table trial\nunknown mu[6]\nunknown sigma\nterm ld_normal(yeild, mu[levle], sigma)';
    const es = errors(src);
    expect(es.map((m) => [m.line, m.message])).toEqual([
      [4, 'unknown name `yeild`'],
      [4, 'unknown name `levle`'],
    ]);
    expect(es.map((m) => m.suggestion)).toEqual(['did you mean `yield`?', 'did you mean `level`?']);
    expect(es[0].column).toBe('term ld_normal('.length + 1);
  });

  it('a name problem after a different first error on the same line is still reported', () => {
    // ld_normal takes 3 arguments: the count error is thrown before the arguments are typed.
    const es = errors('unknown mu\nterm ld_normal(mu, 0) + sgma');
    expect(es.map((m) => m.message)).toEqual([expect.stringMatching(/takes 3 arguments/), 'unknown name `sgma`']);
  });

  it('an unknown function and an unknown name on one line are both reported', () => {
    const es = errors('unknown mu\nterm ld_nrmal(mu, 0, sd)');
    expect(es.map((m) => m.message)).toEqual(['unknown function `ld_nrmal`', 'unknown name `sd`']);
  });

  it('every line is checked, and a name whose line failed is not called unknown later', () => {
    const es = errors('unknown mu\nlet y = mu + zz\nterm ld_normal(y, 0, 1)\nterm ld_normal(mu, 0, qq)');
    expect(es.map((m) => [m.line, m.message])).toEqual([
      [2, 'unknown name `zz`'],
      [3, '`y` is not declared: its line 2 has an error; fix that line first'],
      [4, 'unknown name `qq`'],
    ]);
  });

  it('the same problem is not reported twice', () => {
    const es = errors('unknown mu\nterm ld_normal(mu, 0, zz)');
    expect(es).toHaveLength(1);
  });
});
