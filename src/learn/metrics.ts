/**
 * Classification metrics from a confusion matrix whose rows are the true classes and columns the predicted
 * ones: accuracy, balanced accuracy (mean recall over the classes present) and macro-F1 (mean of the per-class
 * F1 scores), plus the mean and standard deviation of a metric over folds.
 */
export type Confusion = number[][];

/** Counts of (true class, predicted class); `counts[t][p]`. */
export function confusionMatrix(
  truth: ArrayLike<number>,
  predicted: ArrayLike<number>,
  classCount: number,
): Confusion {
  if (truth.length !== predicted.length)
    throw new Error(`confusionMatrix: ${truth.length} truths vs ${predicted.length} predictions`);
  const counts: Confusion = Array.from({ length: classCount }, () => new Array<number>(classCount).fill(0));
  for (let i = 0; i < truth.length; i++) counts[truth[i]][predicted[i]]++;
  return counts;
}

/** Adds `b` into `a` (same size) and returns `a`. */
export function addConfusion(a: Confusion, b: Confusion): Confusion {
  for (let i = 0; i < a.length; i++) for (let j = 0; j < a.length; j++) a[i][j] += b[i][j];
  return a;
}

function total(c: Confusion): number {
  let s = 0;
  for (const r of c) for (const v of r) s += v;
  return s;
}

/** Fraction of samples on the diagonal. */
export function accuracy(c: Confusion): number {
  const n = total(c);
  if (n === 0) return Number.NaN;
  let hit = 0;
  for (let i = 0; i < c.length; i++) hit += c[i][i];
  return hit / n;
}

/** Mean over the classes that occur in the truth of their recall (true positives / class size). */
export function balancedAccuracy(c: Confusion): number {
  let sum = 0;
  let present = 0;
  for (let i = 0; i < c.length; i++) {
    let support = 0;
    for (const v of c[i]) support += v;
    if (support === 0) continue;
    sum += c[i][i] / support;
    present++;
  }
  return present === 0 ? Number.NaN : sum / present;
}

/**
 * Mean of the per-class F1 = 2·TP / (2·TP + FP + FN), over the classes that occur in the truth or in the
 * predictions (a class absent from both has no defined F1 and is left out).
 */
export function macroF1(c: Confusion): number {
  let sum = 0;
  let counted = 0;
  for (let k = 0; k < c.length; k++) {
    const tp = c[k][k];
    let fn = 0;
    let fp = 0;
    for (let j = 0; j < c.length; j++) {
      if (j === k) continue;
      fn += c[k][j];
      fp += c[j][k];
    }
    const denominator = 2 * tp + fp + fn;
    if (denominator === 0) continue;
    sum += (2 * tp) / denominator;
    counted++;
  }
  return counted === 0 ? Number.NaN : sum / counted;
}

export interface Summary {
  mean: number;
  /** Sample standard deviation (divisor n − 1); 0 for a single value. */
  std: number;
}

export function summarize(values: ArrayLike<number>): Summary {
  const n = values.length;
  if (n === 0) return { mean: Number.NaN, std: Number.NaN };
  let mean = 0;
  for (let i = 0; i < n; i++) mean += values[i];
  mean /= n;
  if (n === 1) return { mean, std: 0 };
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (values[i] - mean) ** 2;
  return { mean, std: Math.sqrt(ss / (n - 1)) };
}

/** Index of the largest value of each row of a row-major scores matrix (ties → the lower class index). */
export function argmaxRows(scores: { rows: number; cols: number; data: Float64Array }): Int32Array {
  const out = new Int32Array(scores.rows);
  for (let i = 0; i < scores.rows; i++) {
    let best = 0;
    const base = i * scores.cols;
    for (let j = 1; j < scores.cols; j++) if (scores.data[base + j] > scores.data[base + best]) best = j;
    out[i] = best;
  }
  return out;
}
