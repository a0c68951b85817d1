/**
 * Autocovariance of one chain through the fast Fourier transform.
 *
 * acov[t] = (1/N) Σ_{i=0}^{N-1-t} (x_i − x̄)(x_{i+t} − x̄),  t = 0 … N−1
 *
 * This is the "biased" estimator (divisor N at every lag), the one "Practical Markov chain Monte Carlo"
 * (Statistical Science 1992) recommends for the initial-sequence estimators and the one "Rank-
 * normalization, folding, and localization: an improved R̂" (Bayesian Analysis 2021) uses. The series is zero-padded to at least 2N so the circular
 * convolution of the FFT equals the linear one (Wiener–Khinchin: autocorrelation = inverse
 * transform of the power spectrum).
 */
import FFT from 'fft.js';

const fftCache = new Map<number, FFT>();

function fftOfSize(size: number): FFT {
  let f = fftCache.get(size);
  if (!f) {
    f = new FFT(size);
    fftCache.set(size, f);
  }
  return f;
}

export function autocovariance(x: ArrayLike<number>): Float64Array {
  const n = x.length;
  const out = new Float64Array(n);
  if (n === 0) return out;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += x[i];
  mean /= n;
  if (n < 8) {
    // Direct sum: the FFT needs a size of at least 4 and gains nothing on tiny series.
    for (let t = 0; t < n; t++) {
      let s = 0;
      for (let i = 0; i + t < n; i++) s += (x[i] - mean) * (x[i + t] - mean);
      out[t] = s / n;
    }
    return out;
  }
  let size = 4;
  while (size < 2 * n) size *= 2;
  const f = fftOfSize(size);
  const input = new Array<number>(size).fill(0);
  for (let i = 0; i < n; i++) input[i] = x[i] - mean;
  const spectrum = f.createComplexArray() as number[];
  f.realTransform(spectrum, input);
  f.completeSpectrum(spectrum);
  // Power spectrum |X_k|², stored as a complex array with zero imaginary parts.
  for (let k = 0; k < size; k++) {
    const re = spectrum[2 * k];
    const im = spectrum[2 * k + 1];
    spectrum[2 * k] = re * re + im * im;
    spectrum[2 * k + 1] = 0;
  }
  const back = f.createComplexArray() as number[];
  // fft.js's inverseTransform divides by the size, so back[2t] = Σ_i y_i y_{i+t}.
  f.inverseTransform(back, spectrum);
  for (let t = 0; t < n; t++) out[t] = back[2 * t] / n;
  return out;
}
