/** jStat 1.9.6 (npm `jstat`) has no type declarations: the members these tests use, typed. */
import { createRequire } from 'node:module';

type Pdf1 = { pdf(x: number, a: number): number };
type Pdf2 = { pdf(x: number, a: number, b: number): number };
export interface JStatSubset {
  normal: Pdf2;
  cauchy: Pdf2;
  laplace: Pdf2;
  lognormal: Pdf2;
  gamma: Pdf2;
  exponential: Pdf1;
  beta: Pdf2;
  poisson: Pdf1;
  binomial: Pdf2;
  studentt: Pdf1;
  gammaln(x: number): number;
  factorialln(n: number): number;
}

export const jStat = (createRequire(import.meta.url)('jstat') as { jStat: JStatSubset }).jStat;
