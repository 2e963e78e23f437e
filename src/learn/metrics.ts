import { shown } from '../core/text.js';

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

/** A label met among the samples that is none of the model's classes, with what those samples got. */
export interface UnknownLabel {
  label: string;
  count: number;
  /** How many of them were predicted as each class (columns in `classes` order). */
  predicted: number[];
}

/** Predictions scored against the samples' own labels (`landform predict` on labelled samples). */
export interface LabelledScores {
  classes: string[];
  /** Samples whose label is one of `classes`: the ones scored. */
  scored: number;
  /** Scored samples whose prediction equals their label (the confusion matrix's diagonal). */
  correct: number;
  /** correct / scored; NaN when nothing was scored. */
  accuracy: number;
  balancedAccuracy: number;
  macroF1: number;
  /** Rows true class, columns predicted class, both in `classes` order; sums to `scored`. */
  confusion: Confusion;
  /** Labels that are none of the classes (sorted), not scored. */
  unknown: UnknownLabel[];
  /** Samples with an empty label (samples to predict), not scored. */
  unlabelled: number;
}

/**
 * Scores predicted labels against the samples' labels: a sample counts when its label is one of `classes`;
 * an empty label is a sample to predict (counted in `unlabelled`); any other label is counted under
 * `unknown`. `predicted[i]` must be one of `classes`.
 */
export function scoreLabels(
  labels: readonly string[],
  predicted: readonly string[],
  classes: readonly string[],
): LabelledScores {
  if (labels.length !== predicted.length)
    throw new Error(`scoreLabels: ${labels.length} labels vs ${predicted.length} predictions`);
  const index = new Map(classes.map((c, i) => [c, i]));
  const k = classes.length;
  const confusion: Confusion = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  const unknown = new Map<string, UnknownLabel>();
  let unlabelled = 0;
  let scored = 0;
  for (let i = 0; i < labels.length; i++) {
    const p = index.get(predicted[i]);
    if (p === undefined) throw new Error(`scoreLabels: '${predicted[i]}' is not a class`);
    if (labels[i] === '') {
      unlabelled++;
      continue;
    }
    const t = index.get(labels[i]);
    if (t === undefined) {
      let u = unknown.get(labels[i]);
      if (!u) {
        u = { label: labels[i], count: 0, predicted: new Array<number>(k).fill(0) };
        unknown.set(labels[i], u);
      }
      u.count++;
      u.predicted[p]++;
      continue;
    }
    confusion[t][p]++;
    scored++;
  }
  let correct = 0;
  for (let i = 0; i < k; i++) correct += confusion[i][i];
  return {
    classes: [...classes],
    scored,
    correct,
    accuracy: accuracy(confusion),
    balancedAccuracy: balancedAccuracy(confusion),
    macroF1: macroF1(confusion),
    confusion,
    unknown: [...unknown.values()].sort((a, b) => (a.label < b.label ? -1 : a.label > b.label ? 1 : 0)),
    unlabelled,
  };
}

/**
 * A confusion matrix as aligned text lines (rows true, columns predicted, with the class names), for a
 * terminal: a header line `true \ predicted`, then one line per class.
 */
export function formatConfusionText(names: readonly string[], confusion: Confusion): string[] {
  const classes = names.map(shown);
  const corner = 'true \\ predicted';
  const first = Math.max(corner.length, ...classes.map((c) => c.length));
  const widths = classes.map((c, j) => Math.max(c.length, ...confusion.map((r) => String(r[j]).length)));
  const lines = [[corner.padEnd(first), ...classes.map((c, j) => c.padStart(widths[j]))].join('  ')];
  for (let i = 0; i < classes.length; i++) {
    const cells = confusion[i].map((v, j) => String(v).padStart(widths[j]));
    lines.push([classes[i].padEnd(first), ...cells].join('  '));
  }
  return lines.map((l) => l.trimEnd());
}
