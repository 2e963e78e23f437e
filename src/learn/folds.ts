import { UserError } from '../core/errors.js';
import { Random } from '../core/random.js';

/**
 * Stratified k-fold splits, repeatable from a seed. Each class's samples are shuffled and dealt to the folds
 * in turn (continuing the turn across classes, so fold sizes differ by at most one), so every fold holds each
 * class in about its overall proportion.
 */
export interface FoldOptions {
  /** Number of folds k. Default 5. */
  folds?: number;
  /** Independent repetitions of the k-fold split, each with its own shuffle. Default 1. */
  repeats?: number;
  /** Seed of the shuffles. Default 1. */
  seed?: number;
}

export const DEFAULT_FOLD_OPTIONS: Required<FoldOptions> = { folds: 5, repeats: 1, seed: 1 };

export interface Fold {
  /** Which repetition (0-based). */
  repeat: number;
  /** Which fold of that repetition (0-based). */
  fold: number;
  /** Indices of the training samples, ascending. */
  train: Int32Array;
  /** Indices of the held-out samples, ascending. */
  test: Int32Array;
}

/** Class index of each label, with classes in the given order. */
export function encodeLabels(labels: readonly string[], classes: readonly string[]): Int32Array {
  const index = new Map(classes.map((c, i) => [c, i]));
  const y = new Int32Array(labels.length);
  for (let i = 0; i < labels.length; i++) {
    const k = index.get(labels[i]);
    if (k === undefined) throw new Error(`encodeLabels: label '${labels[i]}' is not one of the classes`);
    y[i] = k;
  }
  return y;
}

export function classCounts(y: ArrayLike<number>, classCount: number): Int32Array {
  const counts = new Int32Array(classCount);
  for (let i = 0; i < y.length; i++) counts[y[i]]++;
  return counts;
}

/**
 * Throws the user's error when the labels cannot be split into `folds` stratified folds: fewer than two
 * classes, or a class with fewer samples than folds. `what` names the option in the message.
 */
export function checkFoldable(
  y: ArrayLike<number>,
  classes: readonly string[],
  folds: number,
  what = '--folds',
): void {
  if (classes.length < 2) {
    throw new UserError(
      `found ${classes.length === 0 ? 'no labelled samples' : `only one class ('${classes[0]}')`}; ` +
        'classification needs samples of at least two classes: check the label column or add samples of another class',
    );
  }
  const counts = classCounts(y, classes.length);
  let smallest = 0;
  for (let k = 1; k < counts.length; k++) if (counts[k] < counts[smallest]) smallest = k;
  if (counts[smallest] < folds) {
    const n = counts[smallest];
    throw new UserError(
      `class '${classes[smallest]}' has ${n} sample${n === 1 ? '' : 's'}, fewer than the ${folds} folds asked for; ` +
        (n >= 2
          ? `use ${what} ${n} or fewer, or add samples of '${classes[smallest]}'`
          : `add samples of '${classes[smallest]}'`),
    );
  }
}

/** Stratified folds of `y` (class indices in [0, classCount)), `repeats` × `folds` of them in order. */
export function stratifiedFolds(y: ArrayLike<number>, classCount: number, options: FoldOptions = {}): Fold[] {
  const { folds, repeats, seed } = { ...DEFAULT_FOLD_OPTIONS, ...options };
  if (!Number.isInteger(folds) || folds < 2)
    throw new Error(`stratifiedFolds: folds must be an integer ≥ 2, got ${folds}`);
  const n = y.length;
  const byClass: number[][] = Array.from({ length: classCount }, () => []);
  for (let i = 0; i < n; i++) byClass[y[i]].push(i);
  const root = new Random(seed);
  const out: Fold[] = [];
  const assignment = new Int32Array(n);
  for (let r = 0; r < repeats; r++) {
    const random = root.fork();
    // Invariant: `turn` is the fold that receives the next dealt sample; it runs on across classes.
    let turn = 0;
    for (let k = 0; k < classCount; k++) {
      const members = random.shuffle(byClass[k].slice());
      for (let m = 0; m < members.length; m++) {
        assignment[members[m]] = turn;
        turn = (turn + 1) % folds;
      }
    }
    for (let f = 0; f < folds; f++) {
      let testCount = 0;
      for (let i = 0; i < n; i++) if (assignment[i] === f) testCount++;
      const test = new Int32Array(testCount);
      const train = new Int32Array(n - testCount);
      for (let i = 0, a = 0, b = 0; i < n; i++) {
        if (assignment[i] === f) test[a++] = i;
        else train[b++] = i;
      }
      out.push({ repeat: r, fold: f, train, test });
    }
  }
  return out;
}
