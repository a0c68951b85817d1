/**
 * Keywords and built-in functions of the Slackline model language, with signatures, one-line docs
 * and examples. The checker reads the shape rules from here; the editor reads the rest for
 * completion and hover text.
 */

export interface KeywordInfo {
  name: string;
  doc: string;
  example: string;
}

export const LANGUAGE_KEYWORDS: readonly KeywordInfo[] = Object.freeze([
  { name: 'table', doc: 'Bind a data table so its columns can be used by name.', example: 'table plots' },
  {
    name: 'unknown',
    doc: 'Declare unknowns (parameters): scalars, or vectors with a fixed length.',
    example: 'unknown share[3], sigma',
  },
  { name: 'const', doc: 'Name a number or a fixed vector of numbers.', example: 'const prior_sd = 2.5' },
  {
    name: 'let',
    doc: 'Name an expression for reuse; a list of data columns in brackets builds a data matrix.',
    example: 'let X = [rain, shade, slope]',
  },
  {
    name: 'term',
    doc: 'Add a scalar to the log-density (all term lines are summed). A line that reads data is likelihood, otherwise prior; end it with :: prior or :: likelihood to say otherwise.',
    example: 'term ld_normal(yield, mu, sigma)',
  },
  {
    name: 'constrain',
    doc: 'An affine constraint on the unknowns: <=, <, >=, >, == (chains and vectors allowed).',
    example: 'constrain 0 <= share <= 1',
  },
  { name: 'derive', doc: 'A quantity computed from every draw and summarised like an unknown.', example: 'derive gain = mu[3] - mu[1]' },
  {
    name: 'replicate',
    doc: 'Simulate a new copy of observed data from every draw: the right side is the density call of the likelihood term, its first argument the data replicated.',
    example: 'replicate kg_new = ld_normal(kg, mu[field], sigma)',
  },
]);

export const KEYWORD_NAMES: ReadonlySet<string> = new Set(LANGUAGE_KEYWORDS.map((k) => k.name));

/** How the checker treats a function's arguments and result. */
export type FunctionKind =
  | 'elementwise' // f(x) applied to each element; scalars stay scalars
  | 'elementwise2' // f(x, y) elementwise with broadcasting
  | 'reduce' // vector → scalar
  | 'dot' // (vector, vector) → scalar
  | 'scan' // vector → vector (same length)
  | 'diff' // vector → vector (length − 1)
  | 'density' // vectorised log-density, summed over elements → scalar
  | 'density_vector'; // one multivariate log-density per call → scalar

export interface ParamInfo {
  name: string;
  /** Discrete arguments must not depend on unknowns (data or constants only). */
  discrete?: boolean;
}

export interface FunctionSignature {
  name: string;
  kind: FunctionKind;
  params: ParamInfo[];
  /** e.g. "ld_normal(x, mu, sigma) → scalar" */
  signature: string;
  doc: string;
  example: string;
}

function sig(
  name: string,
  kind: FunctionKind,
  params: (string | ParamInfo)[],
  result: string,
  doc: string,
  example: string,
): FunctionSignature {
  const ps = params.map((p) => (typeof p === 'string' ? { name: p } : p));
  return {
    name,
    kind,
    params: ps,
    signature: `${name}(${ps.map((p) => p.name).join(', ')}) → ${result}`,
    doc,
    example,
  };
}

const d = (n: string): ParamInfo => ({ name: n, discrete: true });

export const FUNCTION_SIGNATURES: readonly FunctionSignature[] = Object.freeze([
  // Log-densities: vectorised over rows/elements, return the summed log-density (full constants).
  sig('ld_normal', 'density', ['x', 'mu', 'sigma'], 'scalar', 'Normal log-density with mean mu and standard deviation sigma, summed over elements.', 'term ld_normal(yield, mu, sigma)'),
  sig('ld_student_t', 'density', ['x', 'nu', 'mu', 'sigma'], 'scalar', 'Student t log-density with nu degrees of freedom, location mu, scale sigma.', 'term ld_student_t(yield, 4, mu, sigma)'),
  sig('ld_cauchy', 'density', ['x', 'loc', 'scale'], 'scalar', 'Cauchy log-density.', 'term ld_cauchy(slope, 0, 2.5)'),
  sig('ld_laplace', 'density', ['x', 'loc', 'scale'], 'scalar', 'Laplace (double exponential) log-density.', 'term ld_laplace(resid, 0, b)'),
  sig('ld_logistic', 'density', ['x', 'loc', 'scale'], 'scalar', 'Logistic-distribution log-density.', 'term ld_logistic(x, m, s)'),
  sig('ld_lognormal', 'density', ['x', 'mu', 'sigma'], 'scalar', 'Log-normal log-density (mu, sigma on the log scale).', 'term ld_lognormal(flow, mu, sigma)'),
  sig('ld_gamma', 'density', ['x', 'shape', 'rate'], 'scalar', 'Gamma log-density with shape and rate.', 'term ld_gamma(tau, 2, 0.5)'),
  sig('ld_exponential', 'density', ['x', 'rate'], 'scalar', 'Exponential log-density with rate.', 'term ld_exponential(sigma, 1)'),
  sig('ld_beta', 'density', ['x', 'a', 'b'], 'scalar', 'Beta log-density on (0, 1).', 'term ld_beta(p, 2, 2)'),
  sig('ld_halfnormal', 'density', ['x', 'sigma'], 'scalar', 'Half-normal log-density on x ≥ 0 with scale sigma.', 'term ld_halfnormal(sigma, 10)'),
  sig('ld_poisson', 'density', [d('k'), 'rate'], 'scalar', 'Poisson log-mass of counts k with the given rate. Written as ld_poisson(k, exp(eta)), it is computed from the log-rate eta directly (stable for any eta).', 'term ld_poisson(visits, exp(a + b * shade))'),
  sig('ld_binomial', 'density', [d('k'), d('n'), 'p'], 'scalar', 'Binomial log-mass of k successes in n trials with probability p. Written as ld_binomial(k, n, logistic(eta)), it is computed from the log-odds eta directly (stable for any eta).', 'term ld_binomial(sprouted, sown, logistic(a + b * rain))'),
  sig('ld_bernoulli', 'density', [d('y'), 'p'], 'scalar', 'Bernoulli log-mass of 0/1 outcomes y. Written as ld_bernoulli(y, logistic(eta)), it is computed from the log-odds eta directly (stable for any eta).', 'term ld_bernoulli(wilted, logistic(X * beta))'),
  sig('ld_dirichlet', 'density_vector', ['w', 'alpha'], 'scalar', 'Dirichlet log-density of a probability vector w with concentrations alpha (vector or scalar).', 'term ld_dirichlet(share, 1)'),
  sig('ld_multinomial', 'density_vector', [d('counts'), 'p'], 'scalar', 'Multinomial log-mass of a count vector with probabilities p.', 'term ld_multinomial(tally, share)'),
  // Elementwise math.
  sig('exp', 'elementwise', ['x'], 'same shape', 'Exponential, elementwise. As the rate of ld_poisson it is fused into a stable log-rate kernel.', 'let rate = exp(log_rate)'),
  sig('log', 'elementwise', ['x'], 'same shape', 'Natural logarithm, elementwise.', 'derive log_gain = log(gain)'),
  sig('log1p', 'elementwise', ['x'], 'same shape', 'log(1 + x), accurate for small x.', 'term log1p(square(slope))'),
  sig('expm1', 'elementwise', ['x'], 'same shape', 'exp(x) − 1, accurate for small x.', 'derive rel = expm1(effect)'),
  sig('sqrt', 'elementwise', ['x'], 'same shape', 'Square root, elementwise.', 'let sd = sqrt(variance)'),
  sig('square', 'elementwise', ['x'], 'same shape', 'x², elementwise.', 'term -0.5 * sum(square(z))'),
  sig('abs', 'elementwise', ['x'], 'same shape', 'Absolute value (derivative 0 at 0).', 'derive size = abs(effect)'),
  sig('logistic', 'elementwise', ['x'], 'same shape', '1 / (1 + exp(−x)), elementwise. As the probability of ld_binomial or ld_bernoulli it is fused into a stable log-odds kernel.', 'let p = logistic(a + b * rain)'),
  sig('log_logistic', 'elementwise', ['x'], 'same shape', 'log(logistic(x)), computed stably.', 'term sum(log_logistic(eta))'),
  sig('softplus', 'elementwise', ['x'], 'same shape', 'log(1 + exp(x)), computed stably.', 'let scale = softplus(raw)'),
  sig('lgamma', 'elementwise', ['x'], 'same shape', 'Log of the gamma function, elementwise (x > 0).', 'term -lgamma(nu)'),
  sig('pow', 'elementwise2', ['x', 'y'], 'broadcast shape', 'x raised to the power y (same as x ^ y).', 'let v = pow(sigma, 2)'),
  // Reductions and vector functions.
  sig('sum', 'reduce', ['v'], 'scalar', 'Sum of the elements.', 'constrain sum(share) == 1'),
  sig('mean', 'reduce', ['v'], 'scalar', 'Mean of the elements.', 'derive avg = mean(mu)'),
  sig('log_sum_exp', 'reduce', ['v'], 'scalar', 'log(sum(exp(v))), computed stably.', 'term log_sum_exp([a, b])'),
  sig('dot', 'dot', ['a', 'b'], 'scalar', 'Sum of elementwise products of two vectors of equal length.', 'let total = dot(weights, share)'),
  sig('cumsum', 'scan', ['v'], 'vector (same length)', 'Running sums: element i is v[1] + … + v[i].', 'let level = cumsum(step)'),
  sig('diff', 'diff', ['v'], 'vector (one shorter)', 'Successive differences v[i+1] − v[i].', 'constrain diff(mu) >= 0'),
]);

export const FUNCTIONS: ReadonlyMap<string, FunctionSignature> = new Map(FUNCTION_SIGNATURES.map((f) => [f.name, f]));

/**
 * Spellings the language no longer accepts, each with the form that replaces it: the density with
 * its link written as an ordinary function, which the compiler fuses into the same stable kernel.
 */
export interface RetiredFunction {
  name: string;
  /** The density that replaces it. */
  density: string;
  /** The link function wrapped around one argument. */
  link: 'logistic' | 'exp';
  /** Position of that argument (0-based). */
  linkArg: number;
  /** Parameter names of the replacement, for a call with the wrong number of arguments. */
  params: string[];
}

export const RETIRED_FUNCTIONS: ReadonlyMap<string, RetiredFunction> = new Map(
  (
    [
      { name: 'ld_binomial_logodds', density: 'ld_binomial', link: 'logistic', linkArg: 2, params: ['k', 'n', 'eta'] },
      { name: 'ld_bernoulli_logodds', density: 'ld_bernoulli', link: 'logistic', linkArg: 1, params: ['y', 'eta'] },
      { name: 'ld_poisson_lograte', density: 'ld_poisson', link: 'exp', linkArg: 1, params: ['k', 'eta'] },
    ] satisfies RetiredFunction[]
  ).map((r) => [r.name, r]),
);

/** The replacement spelling of a retired call, given the text of its arguments. */
export function replacementCall(r: RetiredFunction, argTexts: readonly string[]): string {
  const args = argTexts.length === r.params.length ? argTexts.slice() : r.params.slice();
  args[r.linkArg] = `${r.link}(${args[r.linkArg]})`;
  return `${r.density}(${args.join(', ')})`;
}
