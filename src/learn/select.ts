import type { Matrix } from '../core/matrix.js';
import { Random } from '../core/random.js';
import { type FeatureData, type FeatureExtractor, usesLandscape } from '../features/combined.js';
import type { Classifier, Hyperparameters, ModelName } from './classifier.js';
import { classCounts, stratifiedFolds } from './folds.js';
import { argmaxRows, balancedAccuracy, confusionMatrix } from './metrics.js';
import { ProjectionCache } from './projection-cache.js';

/**
 * Inner cross-validation: inside one training set only, choose the model's hyperparameters and — for feature
 * sets that use landscapes — the vectoriser's depth K and grid size G. The test fold of the outer loop is
 * never seen here.
 *
 * The search is coordinate-wise to keep it small: first every (K, G) candidate is scored with the model's
 * first (default) hyperparameters; then, with the best (K, G), every model candidate is scored. That costs
 * F + M − 1 inner cross-validations instead of F × M. The score is the mean balanced accuracy over
 * `innerFolds` stratified folds; ties keep the earlier candidate, so the defaults win ties.
 */
export interface LandscapeCandidate {
  depth: number;
  gridSize: number;
}

/** Default (K, G) candidates: depths {5, 3} × grid sizes {50, 25}, in the order the command lists them. */
export const DEFAULT_LANDSCAPE_CANDIDATES: readonly LandscapeCandidate[] = [
  { depth: 5, gridSize: 50 },
  { depth: 5, gridSize: 25 },
  { depth: 3, gridSize: 50 },
  { depth: 3, gridSize: 25 },
];

/** Creates classifiers and lists their inner-CV candidates (the models stage provides the default one). */
export interface ModelFactory {
  /** `shared`: fitted parts the candidates of one search may share (pca-svm: scaler + PCA per fold). */
  create(
    name: ModelName,
    hyperparameters: Hyperparameters,
    seed: number,
    shared?: ProjectionCache,
  ): Classifier;
  candidates(name: ModelName, shape: { samples: number; features: number }): Hyperparameters[];
}

export interface SelectionOptions {
  /** Inner folds. Default 3 (lowered to the smallest class size of the training set when that is smaller). */
  innerFolds?: number;
  /** (K, G) candidates for landscape features. Default DEFAULT_LANDSCAPE_CANDIDATES. */
  landscapeCandidates?: readonly LandscapeCandidate[];
  /** Seed of the inner splits and of the classifiers fitted inside. Default 1. */
  seed?: number;
  /**
   * Share each inner fold's fitted scaler + PCA among the SVM candidates (same results, fewer fits).
   * Default true; false refits them per candidate (the plain path, kept for tests and benchmarks).
   */
  reuse?: boolean;
  /** Called after each candidate is scored: (scored, candidates to score). The total can grow once (stage 2). */
  onProgress?: (done: number, total: number) => void;
}

export const DEFAULT_SELECTION_OPTIONS = { innerFolds: 3, seed: 1 } as const;

export interface Selection {
  /** Chosen (K, G), when the feature set uses landscapes. */
  landscape?: LandscapeCandidate;
  /** Chosen model hyperparameters. */
  model: Hyperparameters;
  /** Inner-CV mean balanced accuracy of the chosen combination (NaN when nothing had to be chosen). */
  score: number;
  /** Every candidate scored, in the order tried. */
  tried: Array<{ landscape?: LandscapeCandidate; model: Hyperparameters; score: number }>;
}

/** Fits `extractor` and a classifier on `train`, predicts `test`; returns predicted class indices and scores. */
export async function fitAndPredict(
  extractor: FeatureExtractor,
  data: FeatureData,
  y: Int32Array,
  classCount: number,
  train: ArrayLike<number>,
  test: ArrayLike<number>,
  classifier: Classifier,
): Promise<{ predicted: Int32Array; scores: Matrix }> {
  extractor.fit(data, train);
  const xTrain = extractor.transform(data, train);
  const xTest = extractor.transform(data, test);
  await classifier.fit(xTrain, pick(y, train), classCount);
  const scores = await classifier.predictScores(xTest);
  return { predicted: argmaxRows(scores), scores };
}

/** Classifiers that can label without their probability step (faster for scoring candidates). */
interface LabelsDirectly {
  predictLabels(x: Matrix): Int32Array | Promise<Int32Array>;
}

/** Predicted class indices, through `predictLabels` when the classifier has it. */
async function labelsOf(classifier: Classifier, x: Matrix): Promise<Int32Array> {
  const direct = classifier as Partial<LabelsDirectly>;
  if (typeof direct.predictLabels === 'function') return await direct.predictLabels(x);
  return argmaxRows(await classifier.predictScores(x));
}

export function pick(y: Int32Array, indices: ArrayLike<number>): Int32Array {
  const out = new Int32Array(indices.length);
  for (let i = 0; i < indices.length; i++) out[i] = y[indices[i]];
  return out;
}

/**
 * Chooses hyperparameters for `model` on `features` using only `data` at `train`. `base` carries the
 * feature options that are not searched (degrees, infinite policy, raw options).
 */
export async function selectHyperparameters(
  base: FeatureExtractor,
  data: FeatureData,
  y: Int32Array,
  classCount: number,
  train: ArrayLike<number>,
  model: ModelName,
  factory: ModelFactory,
  options: SelectionOptions = {},
): Promise<Selection> {
  const seed = options.seed ?? DEFAULT_SELECTION_OPTIONS.seed;
  const landscapeCandidates = usesLandscape(base.set)
    ? [...(options.landscapeCandidates ?? DEFAULT_LANDSCAPE_CANDIDATES)]
    : [];
  const yTrain = pick(y, train);
  let smallest = Number.POSITIVE_INFINITY;
  const counts = classCounts(yTrain, classCount);
  // Fewer inner folds when a class of the training rows is smaller than asked; below 2, no search.
  for (let k = 0; k < classCount; k++) if (counts[k] > 0 && counts[k] < smallest) smallest = counts[k];
  const innerFolds = Math.min(options.innerFolds ?? DEFAULT_SELECTION_OPTIONS.innerFolds, smallest);

  const firstFeatures = base.withLandscape(landscapeCandidates[0] ?? {});
  const shape = {
    samples: Math.floor((train.length * (innerFolds - 1)) / Math.max(1, innerFolds)),
    features: firstFeatures.fit(data, train).featureNames().length,
  };
  const modelCandidates = factory.candidates(model, shape);
  if (modelCandidates.length === 0) throw new Error(`no hyperparameter candidates for ${model}`);

  const tried: Selection['tried'] = [];
  const needSearch = landscapeCandidates.length > 1 || modelCandidates.length > 1;
  if (!needSearch || innerFolds < 2) {
    return {
      ...(landscapeCandidates[0] ? { landscape: landscapeCandidates[0] } : {}),
      model: modelCandidates[0],
      score: Number.NaN,
      tried,
    };
  }
  const inner = stratifiedFolds(yTrain, classCount, { folds: innerFolds, repeats: 1, seed });
  const innerRows = inner.map((f) => ({
    train: mapIndices(train, f.train),
    test: mapIndices(train, f.test),
  }));
  // Feature matrices of each inner fold per (K, G): the model candidates of stage 2 share them.
  const matrices = new Map<
    string,
    Array<{ xTrain: Matrix; xTest: Matrix; yTrain: Int32Array; yTest: Int32Array }>
  >();
  const featuresOf = (landscape: LandscapeCandidate | undefined) => {
    const key = landscape ? `${landscape.depth}/${landscape.gridSize}` : '-';
    let cached = matrices.get(key);
    if (!cached) {
      const extractor = base.withLandscape(landscape ?? {});
      cached = innerRows.map((rows) => {
        extractor.fit(data, rows.train);
        return {
          xTrain: extractor.transform(data, rows.train),
          xTest: extractor.transform(data, rows.test),
          yTrain: pick(y, rows.train),
          yTest: pick(y, rows.test),
        };
      });
      matrices.set(key, cached);
    }
    return cached;
  };
  const shared = options.reuse === false ? undefined : new ProjectionCache();
  const firstKey = JSON.stringify(modelCandidates[0]);
  const others = (list: readonly Hyperparameters[]) =>
    list.filter((h) => JSON.stringify(h) !== firstKey).length;
  let scored = 0;
  let toScore = Math.max(1, landscapeCandidates.length) + others(modelCandidates);
  const score = async (
    landscape: LandscapeCandidate | undefined,
    hyper: Hyperparameters,
  ): Promise<number> => {
    const folds = featuresOf(landscape);
    let sum = 0;
    for (let f = 0; f < folds.length; f++) {
      const classifier = factory.create(model, hyper, (seed + 7919 * (f + 1)) >>> 0, shared);
      try {
        await classifier.fit(folds[f].xTrain, folds[f].yTrain, classCount);
        const predicted = await labelsOf(classifier, folds[f].xTest);
        sum += balancedAccuracy(confusionMatrix(folds[f].yTest, predicted, classCount));
      } finally {
        classifier.dispose();
      }
    }
    const s = sum / folds.length;
    tried.push({ ...(landscape ? { landscape } : {}), model: hyper, score: s });
    options.onProgress?.(++scored, toScore);
    return s;
  };

  let bestLandscape = landscapeCandidates[0];
  let bestScore = Number.NEGATIVE_INFINITY;
  if (landscapeCandidates.length > 0) {
    for (const c of landscapeCandidates) {
      const s = await score(c, modelCandidates[0]);
      if (s > bestScore) {
        bestScore = s;
        bestLandscape = c;
      }
    }
  } else {
    bestScore = await score(undefined, modelCandidates[0]);
  }
  // Stage 2: the model's candidates for the chosen (K, G)'s feature count (a grid may scale with it).
  let secondStage = modelCandidates;
  if (bestLandscape && bestLandscape !== landscapeCandidates[0]) {
    const features = base.withLandscape(bestLandscape).fit(data, train).featureNames().length;
    secondStage = factory.candidates(model, { samples: shape.samples, features });
    toScore = scored + others(secondStage);
  }
  let bestModel = modelCandidates[0];
  for (let m = 0; m < secondStage.length; m++) {
    if (JSON.stringify(secondStage[m]) === firstKey) continue;
    const s = await score(bestLandscape, secondStage[m]);
    if (s > bestScore) {
      bestScore = s;
      bestModel = secondStage[m];
    }
  }
  return {
    ...(bestLandscape ? { landscape: bestLandscape } : {}),
    model: bestModel,
    score: bestScore,
    tried,
  };
}

function mapIndices(outer: ArrayLike<number>, inner: Int32Array): Int32Array {
  const out = new Int32Array(inner.length);
  for (let i = 0; i < inner.length; i++) out[i] = outer[inner[i]];
  return out;
}

/** A seed for one unit of work, derived from the run's seed and the unit's coordinates. */
export function derivedSeed(seed: number, ...parts: number[]): number {
  let s = seed >>> 0;
  for (const p of parts) s = new Random((s ^ Math.imul(p + 1, 0x9e3779b1)) >>> 0).nextUint32();
  return s;
}
