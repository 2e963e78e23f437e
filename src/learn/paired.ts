/**
 * Paired comparison of two feature sets scored on the same outer folds: the per-fold differences in
 * accuracy, their mean, and an interval by the corrected resampled t statistic of Nadeau & Bengio
 * ("Inference for the Generalization Error", Machine Learning 52, 2003): the folds' training sets overlap, so
 * the fold differences are correlated and the plain t interval (variance s²/J) is too narrow; their
 * correction replaces 1/J by 1/J + n_test/n_train. Applied to (repeated) k-fold cross-validation, with J =
 * folds × repeats differences and n_test/n_train = 1/(k − 1), as Bouckaert & Frank did ("Evaluating the
 * replicability of significance tests for comparing learning algorithms", PAKDD 2004).
 *
 * The Student t quantile comes from the regularised incomplete beta function (continued fraction and
 * log-gamma of Press, Teukolsky, Vetterling & Flannery, "Numerical Recipes", 3rd ed., 2007, §6.1 and §6.4).
 */

/** What metrics.json records for one (feature set − baseline, model) comparison. */
export interface PairedComparison {
  /** The feature set compared (e.g. landscape). */
  features: string;
  /** The baseline it is compared with (raw). */
  baseline: string;
  model: string;
  /** Number of paired outer folds (folds × repeats). */
  pairs: number;
  /** Per fold (in the study's fold order): accuracy of `features` minus accuracy of `baseline`. */
  differences: number[];
  /** Mean of the differences. */
  mean: number;
  /** Sample standard deviation of the differences (divisor J − 1). */
  std: number;
  /** Share of test to training rows, n_test / n_train, as the correction uses it. */
  testTrainRatio: number;
  lower: number;
  upper: number;
  /** Two-sided confidence level of [lower, upper]. */
  level: number;
  method: typeof PAIRED_METHOD;
}

export const PAIRED_METHOD = 'corrected resampled t (Nadeau & Bengio 2003)';

/** The default two-sided level of the paired interval. */
export const PAIRED_LEVEL = 0.95;

export interface CorrectedInterval {
  mean: number;
  std: number;
  /** Standard error with the correction: sqrt((1/J + n_test/n_train) · s²). */
  se: number;
  /** Degrees of freedom, J − 1. */
  df: number;
  /** The t quantile used, t_{df}(1 − (1 − level)/2). */
  t: number;
  lower: number;
  upper: number;
}

/**
 * The corrected resampled t interval of the mean of `differences` (J ≥ 2 values from J resampled train/test
 * splits whose test share is `testTrainRatio` = n_test/n_train): mean ± t_{J−1} · sqrt((1/J + ratio) · s²).
 * With every difference equal (s = 0) the interval has zero width: the folds disagree nowhere, which says
 * nothing about data not sampled.
 */
export function correctedResampledInterval(
  differences: ArrayLike<number>,
  testTrainRatio: number,
  level = PAIRED_LEVEL,
): CorrectedInterval {
  const J = differences.length;
  if (J < 2) throw new Error(`correctedResampledInterval: needs 2 or more differences, got ${J}`);
  if (!(testTrainRatio >= 0)) throw new Error(`correctedResampledInterval: bad ratio ${testTrainRatio}`);
  if (!(level > 0 && level < 1)) throw new Error(`correctedResampledInterval: bad level ${level}`);
  let mean = 0;
  for (let i = 0; i < J; i++) mean += differences[i];
  mean /= J;
  let ss = 0;
  for (let i = 0; i < J; i++) ss += (differences[i] - mean) ** 2;
  const variance = ss / (J - 1);
  const se = Math.sqrt((1 / J + testTrainRatio) * variance);
  const df = J - 1;
  const t = studentTQuantile(1 - (1 - level) / 2, df);
  return { mean, std: Math.sqrt(variance), se, df, t, lower: mean - t * se, upper: mean + t * se };
}

/** ln Γ(x) for x > 0 (Lanczos approximation, Numerical Recipes 3rd ed. §6.1, `gammln`). */
export function logGamma(x: number): number {
  // The published coefficients, written as the doubles they round to.
  const cof = [
    57.15623566586292, -59.59796035547549, 14.136097974741746, -0.4919138160976202, 3.399464998481189e-5,
    4.652362892704858e-5, -9.837447530487956e-5, 1.580887032249125e-4, -2.1026444172410488e-4,
    2.1743961811521265e-4, -1.643181065367639e-4, 8.441822398385275e-5, -2.6190838401581408e-5,
    3.6899182659531625e-6,
  ];
  if (!(x > 0)) throw new Error(`logGamma: x must be > 0, got ${x}`);
  let y = x;
  const tmp0 = x + 5.2421875;
  const tmp = (x + 0.5) * Math.log(tmp0) - tmp0;
  let ser = 0.9999999999999971;
  for (let j = 0; j < 14; j++) ser += cof[j] / ++y;
  return tmp + Math.log((2.5066282746310007 * ser) / x);
}

/** Continued fraction of the incomplete beta function (modified Lentz; Numerical Recipes §6.4, `betacf`). */
function betaContinuedFraction(a: number, b: number, x: number): number {
  const FPMIN = 1e-300;
  const EPS = 1e-16;
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < FPMIN) d = FPMIN;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 10_000; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < FPMIN) d = FPMIN;
    c = 1 + aa / c;
    if (Math.abs(c) < FPMIN) c = FPMIN;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < FPMIN) d = FPMIN;
    c = 1 + aa / c;
    if (Math.abs(c) < FPMIN) c = FPMIN;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) <= EPS) break;
  }
  return h;
}

/** The regularised incomplete beta function I_x(a, b) (Numerical Recipes §6.4, `betai`). */
export function incompleteBeta(a: number, b: number, x: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const front = Math.exp(logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x));
  // The continued fraction converges fast for x < (a + 1)/(a + b + 2); otherwise use the symmetry.
  if (x < (a + 1) / (a + b + 2)) return (front * betaContinuedFraction(a, b, x)) / a;
  return 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/** P(T ≤ t) for Student's t with `df` degrees of freedom: 1 − I_{df/(df+t²)}(df/2, 1/2)/2 for t ≥ 0. */
export function studentTCdf(t: number, df: number): number {
  if (!(df > 0)) throw new Error(`studentTCdf: df must be > 0, got ${df}`);
  if (Number.isNaN(t)) return Number.NaN;
  if (t === Number.POSITIVE_INFINITY) return 1;
  if (t === Number.NEGATIVE_INFINITY) return 0;
  const tail = 0.5 * incompleteBeta(df / 2, 0.5, df / (df + t * t));
  return t >= 0 ? 1 - tail : tail;
}

/** The p-quantile of Student's t with `df` degrees of freedom (bisection on `studentTCdf` to full precision). */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1)) throw new Error(`studentTQuantile: p must be in (0, 1), got ${p}`);
  if (!(df > 0)) throw new Error(`studentTQuantile: df must be > 0, got ${df}`);
  if (p === 0.5) return 0;
  if (p < 0.5) return -studentTQuantile(1 - p, df);
  let lo = 0;
  let hi = 1;
  while (studentTCdf(hi, df) < p) {
    lo = hi;
    hi *= 2;
    if (hi > 1e300) return Number.POSITIVE_INFINITY;
  }
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi) break;
    if (studentTCdf(mid, df) < p) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
