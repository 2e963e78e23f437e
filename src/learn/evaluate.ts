import { type DiagramSet, describeInfinitePolicy } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import { classesOf, type Dataset } from '../core/sample.js';
import { version } from '../core/version.js';
import {
  checkFeatureSet,
  type FeatureData,
  FeatureExtractor,
  type FeatureExtractorOptions,
  type FeatureSetName,
  featureSetsFor,
  usesLandscape,
} from '../features/combined.js';
import { LandscapeVectorizer, type LandscapeVectorizerOptions } from '../features/landscape-vectorizer.js';
import { RawFeatures, type RawFeaturesOptions } from '../features/raw-features.js';
import type { DiagramOptions } from '../homology/compute.js';
import type { Grid } from '../landscape/grid.js';
import { DEFAULT_MODEL_NAMES, type Hyperparameters, type ModelName } from './classifier.js';
import { checkFoldable, encodeLabels, type Fold, stratifiedFolds } from './folds.js';
import {
  accuracy,
  addConfusion,
  balancedAccuracy,
  type Confusion,
  confusionMatrix,
  macroF1,
  type Summary,
  summarize,
} from './metrics.js';
import { correctedResampledInterval, PAIRED_LEVEL, PAIRED_METHOD, type PairedComparison } from './paired.js';
import {
  DEFAULT_LANDSCAPE_CANDIDATES,
  derivedSeed,
  fitAndPredict,
  type LandscapeCandidate,
  type ModelFactory,
  pick,
  type Selection,
  selectHyperparameters,
} from './select.js';

/**
 * The study: for every feature set × model, stratified outer folds (repeated), hyperparameters chosen by an
 * inner cross-validation inside each training fold, then accuracy, balanced accuracy and macro-F1 per outer
 * fold (mean ± sample standard deviation over all folds of all repeats) and the confusion matrix pooled over
 * every outer test fold (with repeats, each sample counts once per repeat).
 *
 * Diagrams are computed once per sample before the loop (they depend on the sample alone); everything learned
 * — grid range, raw histogram range, scaler, PCA, SVM or network, K and G — is fitted inside the training fold.
 */
export interface EvaluationOptions {
  /** Feature sets to compare. Default: every set the sample kind allows (`featureSetsFor`). */
  featureSets?: FeatureSetName[];
  /** Models to compare. Default DEFAULT_MODEL_NAMES (pca-svm, dense, forest). */
  models?: ModelName[];
  /** Outer folds. Default 5. */
  folds?: number;
  /** Repeats of the outer split. Default 1. */
  repeats?: number;
  /** Seed of every split and model. Default 1. */
  seed?: number;
  /** Inner folds of the hyperparameter search. Default 3. */
  innerFolds?: number;
  /** Options of the landscape vectoriser not searched by the inner CV (degrees, infinite policy, range…). */
  landscape?: LandscapeVectorizerOptions;
  /** (K, G) candidates of the inner CV. Default DEFAULT_LANDSCAPE_CANDIDATES. */
  landscapeCandidates?: readonly LandscapeCandidate[];
  /** Options of the raw-feature baseline. */
  raw?: RawFeaturesOptions;
  /** Options of the `betti`, `stats` and `pimage` vectorisers (degrees and essential classes: `landscape`'s). */
  diagramFeatures?: Pick<FeatureExtractorOptions, 'betti' | 'stats' | 'pimage'>;
  /**
   * One diagram set per sample, in the dataset's order. Required unless the dataset is itself a diagrams
   * dataset or `computeDiagrams` is given.
   */
  diagrams?: readonly DiagramSet[];
  /**
   * How to compute each sample's diagrams when neither `diagrams` nor `computeDiagrams` is given (through
   * the homology stage's worker threads). Default: degrees of the landscape options (0, 1), Rips, euclidean.
   */
  diagramOptions?: DiagramOptions;
  /**
   * Threads for the diagrams and the learning (the calling thread counts as one). Default: every core; the
   * learning stays on the calling thread below MIN_SAMPLES_FOR_LEARNING_WORKERS samples.
   */
  workers?: number;
  /** Computes the diagrams of the samples (called once) when `diagrams` is not given. */
  computeDiagrams?: (
    dataset: Dataset,
    onProgress?: (done: number, total: number) => void,
  ) => Promise<DiagramSet[]>;
  /**
   * Model hyperparameter candidates for the inner CV, per model, replacing the models stage's default grid
   * (e.g. a smaller grid for a quick study). Default: `candidateHyperparameters` of the models stage.
   */
  modelCandidates?: Partial<Record<ModelName, Hyperparameters[]>>;
  /** Creates the classifiers. Default: the models stage (`createClassifier`, `candidateHyperparameters`). */
  modelFactory?: ModelFactory;
  /** Anything else to record under `options` in metrics.json (e.g. the diagram options). */
  record?: Record<string, unknown>;
  /**
   * Model hyperparameters fixed by the user, per model (e.g. {'pca-svm': {kernel: 'rbf', C: 10,
   * varianceKept: 1}}): the inner search keeps only candidates with these values (see `withFixed`).
   */
  fixed?: Partial<Record<ModelName, Hyperparameters>>;
  /** Share each inner fold's scaler + PCA among the SVM candidates. Default true (same results). */
  reuse?: boolean;
  /** Runs the units (serially by default; `learningWorkers` runs them on worker threads). */
  unitRunner?: UnitRunner;
  /**
   * Progress over diagram computation and the units of both learning phases: total = samples whose
   * diagrams are computed + 2 × (feature sets × models × outer folds).
   */
  onProgress?: (done: number, total: number) => void;
  /** Progress per phase: 'diagrams' (samples), then 'inner CV' and 'outer folds' (units each). */
  onPhase?: (phase: StudyPhase, done: number, total: number) => void;
}

/** The phases of a study, in order ('report' belongs to the command that writes one). */
export type StudyPhase = 'diagrams' | 'inner CV' | 'outer folds' | 'report';

/** What every unit of one study shares (built once; a worker thread builds its own copy). */
export interface StudyContext {
  data: FeatureData;
  y: Int32Array;
  classCount: number;
  featureSets: FeatureSetName[];
  models: ModelName[];
  outer: Fold[];
  seed: number;
  innerFolds: number;
  landscapeCandidates: readonly LandscapeCandidate[];
  factory: ModelFactory;
  reuse: boolean;
  landscape?: LandscapeVectorizerOptions;
  raw?: RawFeaturesOptions;
  /** Options of the betti, stats and pimage vectorisers (plain data). */
  diagramFeatures?: EvaluationOptions['diagramFeatures'];
  /**
   * How `factory` was made from the models stage's default one, so a worker thread can make the same; absent
   * when the caller gave its own factory (its units then run on the calling thread).
   */
  plan?: {
    modelCandidates?: Partial<Record<ModelName, Hyperparameters[]>>;
    fixed?: Partial<Record<ModelName, Hyperparameters>>;
  };
}

/** A study context as plain data (what a worker thread is sent): the factory replaced by its plan. */
export interface StudySpec extends Omit<StudyContext, 'data' | 'factory' | 'plan'> {
  samples: FeatureData['samples'];
  diagrams?: FeatureData['diagrams'];
  columns?: FeatureData['columns'];
  modelCandidates?: Partial<Record<ModelName, Hyperparameters[]>>;
  fixed?: Partial<Record<ModelName, Hyperparameters>>;
}

/** The context as plain data, or undefined when its factory cannot be rebuilt elsewhere. */
export function studySpec(context: StudyContext): StudySpec | undefined {
  if (!context.plan) return undefined;
  const { data, factory: _f, plan, ...rest } = context;
  return {
    ...rest,
    samples: data.samples,
    ...(data.diagrams ? { diagrams: data.diagrams } : {}),
    ...(data.columns ? { columns: data.columns } : {}),
    ...(plan.modelCandidates ? { modelCandidates: plan.modelCandidates } : {}),
    ...(plan.fixed ? { fixed: plan.fixed } : {}),
  };
}

/** One unit: feature set `si`, model `mi`, outer fold `fi` (indices into the context's lists). */
export interface StudyUnit {
  si: number;
  mi: number;
  fi: number;
}

/** Runs the units of both phases; results in the order of `units`. `tick` after each unit. */
export interface UnitRunner {
  select(context: StudyContext, units: StudyUnit[], tick: () => void): Promise<Selection[]>;
  fit(
    context: StudyContext,
    units: StudyUnit[],
    selections: Selection[],
    tick: () => void,
  ): Promise<FoldOutcome[]>;
}

function baseExtractor(context: StudyContext, si: number): FeatureExtractor {
  return new FeatureExtractor(context.featureSets[si], {
    ...(context.landscape ? { landscape: context.landscape } : {}),
    ...(context.raw ? { raw: context.raw } : {}),
    ...context.diagramFeatures,
  });
}

function unitSeed(context: StudyContext, u: StudyUnit): number {
  const f = context.outer[u.fi];
  return derivedSeed(context.seed, f.repeat, f.fold, u.si, u.mi);
}

/** Phase 1 of one unit: the inner cross-validation inside the outer fold's training rows. */
export async function selectUnit(context: StudyContext, u: StudyUnit): Promise<Selection> {
  const f = context.outer[u.fi];
  return selectHyperparameters(
    baseExtractor(context, u.si),
    context.data,
    context.y,
    context.classCount,
    f.train,
    context.models[u.mi],
    context.factory,
    {
      innerFolds: context.innerFolds,
      landscapeCandidates: context.landscapeCandidates,
      seed: unitSeed(context, u),
      reuse: context.reuse,
    },
  );
}

/** Phase 2 of one unit: fit on the outer training rows with the chosen values, score the test rows. */
export async function fitUnit(
  context: StudyContext,
  u: StudyUnit,
  selection: Selection,
): Promise<FoldOutcome> {
  const f = context.outer[u.fi];
  const { y, classCount } = context;
  const extractor = baseExtractor(context, u.si).withLandscape(selection.landscape ?? {});
  const classifier = context.factory.create(context.models[u.mi], selection.model, unitSeed(context, u));
  try {
    const { predicted, scores } = await fitAndPredict(
      extractor,
      context.data,
      y,
      classCount,
      f.train,
      f.test,
      classifier,
    );
    const confusion = confusionMatrix(pick(y, f.test), predicted, classCount);
    const weights = hasLinearWeights(classifier) ? classifier.linearWeights() : undefined;
    return {
      repeat: f.repeat,
      fold: f.fold,
      test: f.test,
      predicted,
      scores,
      correct: confusion.reduce((sum, row, k) => sum + row[k], 0),
      accuracy: accuracy(confusion),
      balancedAccuracy: balancedAccuracy(confusion),
      macroF1: macroF1(confusion),
      chosen: chosenOf(selection.landscape, selection.model),
      innerScore: selection.score,
      ...(extractor.landscape?.state
        ? {
            grids: extractor.landscape.state.grids.map((g) => ({
              degree: g.degree,
              ...(g.filtration !== undefined ? { filtration: g.filtration } : {}),
              grid: { ...g.grid },
            })),
          }
        : {}),
      featureNames: extractor.featureNames(),
      ...(weights ? { linearWeights: weights } : {}),
    };
  } finally {
    classifier.dispose();
  }
}

/**
 * Below this many samples a study takes seconds and the start of a worker thread (about a second with
 * TensorFlow.js and libsvm loaded) would eat the gain, so units run on the calling thread (common practice,
 * no source: a threshold measured on this project's bench, see DEVELOPERS.md).
 */
export const MIN_SAMPLES_FOR_LEARNING_WORKERS = 200;

async function defaultRunner(
  options: EvaluationOptions,
  samples: number,
  units: number,
): Promise<UnitRunner> {
  const { availableParallelism } = await import('node:os');
  const workers = Math.min(options.workers ?? availableParallelism(), units);
  if (workers <= 1 || samples < MIN_SAMPLES_FOR_LEARNING_WORKERS || options.modelFactory)
    return serialUnitRunner;
  const { learningWorkers } = await import('./parallel.js');
  return learningWorkers({ workers });
}

/** Every unit on the calling thread, one after another. */
export const serialUnitRunner: UnitRunner = {
  async select(context, units, tick) {
    const out: Selection[] = [];
    for (const u of units) {
      out.push(await selectUnit(context, u));
      tick();
    }
    return out;
  },
  async fit(context, units, selections, tick) {
    const out: FoldOutcome[] = [];
    for (let i = 0; i < units.length; i++) {
      out.push(await fitUnit(context, units[i], selections[i]));
      tick();
    }
    return out;
  },
};

export const DEFAULT_EVALUATION_OPTIONS = { folds: 5, repeats: 1, seed: 1, innerFolds: 3 } as const;

/** What one outer fold of one (feature set, model) produced. */
export interface FoldOutcome {
  repeat: number;
  fold: number;
  /** Indices (into the dataset) of the held-out samples. */
  test: Int32Array;
  /** Predicted class index of each held-out sample. */
  predicted: Int32Array;
  /** Class probabilities of each held-out sample (rows follow `test`). */
  scores: Matrix;
  /** Held-out samples predicted as their own class (the fold's confusion diagonal). */
  correct: number;
  accuracy: number;
  balancedAccuracy: number;
  macroF1: number;
  /** Hyperparameters chosen by the inner CV in this fold (depth and gridSize included for landscape sets). */
  chosen: Hyperparameters;
  /** Inner-CV score of the chosen combination. */
  innerScore: number;
  /** The vectoriser's grids learned from this fold's training samples (landscape and combined). */
  grids?: Array<{ degree: number; filtration?: string; grid: Grid }>;
  /** Names of the features in this fold, in column order. */
  featureNames: string[];
  /**
   * For a linear model, each one-vs-one class pair's decision written on the input features,
   * f(x) = weights·x + bias (positive favours the pair's first class); absent for non-linear models.
   */
  linearWeights?: LinearWeights;
}

export interface StudyResult {
  features: FeatureSetName;
  model: ModelName;
  accuracy: Summary;
  balancedAccuracy: Summary;
  macroF1: Summary;
  /** Pooled over every outer test fold; rows are true classes, columns predicted. */
  confusion: Confusion;
  chosen: { mostFrequent: Hyperparameters; perFold: Hyperparameters[] };
  folds: FoldOutcome[];
}

export interface EvaluationResult {
  classes: string[];
  folds: number;
  repeats: number;
  seed: number;
  /** The effective options, as recorded in metrics.json. */
  options: Record<string, unknown>;
  version: string;
  results: StudyResult[];
  /**
   * Per model, every other feature set against the raw baseline on the same outer folds (empty when the
   * study has no `raw` set): see paired.ts.
   */
  paired: PairedComparison[];
  /** Sample ids and class indices, in dataset order. */
  sampleIds: string[];
  labels: Int32Array;
  /** The diagrams used (one set per sample), when any feature set needed them. */
  diagrams?: readonly DiagramSet[];
}

export interface LinearWeights {
  pairs: Array<[number, number]>;
  /** One row per pair, one column per input feature. */
  weights: Matrix;
  bias: Float64Array;
}

/** Classifiers that can write their decision on the input features (e.g. a linear SVM through PCA). */
interface ExposesLinearWeights {
  linearWeights(): LinearWeights | undefined;
}

function hasLinearWeights(c: unknown): c is ExposesLinearWeights {
  return typeof (c as Partial<ExposesLinearWeights>).linearWeights === 'function';
}

/** The default model factory: the models stage, loaded only when a study runs. */
export async function defaultModelFactory(): Promise<ModelFactory> {
  const models = await import('./models.js');
  return { create: models.createClassifier, candidates: models.candidateHyperparameters };
}

/** The factory with some models' candidate grids replaced. */
export function withCandidates(
  factory: ModelFactory,
  candidates?: Partial<Record<ModelName, Hyperparameters[]>>,
): ModelFactory {
  if (!candidates) return factory;
  return {
    create: factory.create,
    candidates: (name, shape) => {
      const given = candidates[name];
      return given && given.length > 0 ? given.map((h) => ({ ...h })) : factory.candidates(name, shape);
    },
  };
}

/**
 * The factory with some models' hyperparameters fixed: a fixed `kernel` keeps only the candidates with that
 * kernel (or that kernel alone when none has it); every other fixed value replaces the candidates' value —
 * `gamma` only where the kernel is not linear — and repeated candidates are dropped (the first stays), so a
 * model whose every value is fixed is fitted without an inner search for it.
 */
export function withFixed(
  factory: ModelFactory,
  fixed?: Partial<Record<ModelName, Hyperparameters>>,
): ModelFactory {
  if (!fixed) return factory;
  return {
    create: factory.create,
    candidates: (name, shape) => applyFixed(factory.candidates(name, shape), fixed[name]),
  };
}

export function applyFixed(list: Hyperparameters[], fixed: Hyperparameters | undefined): Hyperparameters[] {
  if (!fixed || Object.keys(fixed).length === 0) return list;
  let kept = list;
  if (fixed.kernel !== undefined) {
    kept = list.filter((h) => (h.kernel ?? 'rbf') === fixed.kernel);
    if (kept.length === 0) kept = [{ kernel: fixed.kernel }];
  }
  const out: Hyperparameters[] = [];
  const seen = new Set<string>();
  for (const h of kept) {
    const c: Hyperparameters = { ...h };
    for (const [key, value] of Object.entries(fixed)) {
      if (key === 'gamma' && c.kernel === 'linear') continue;
      c[key] = value;
    }
    const key = JSON.stringify(
      Object.keys(c)
        .sort()
        .map((k) => [k, c[k]]),
    );
    if (seen.has(key)) continue;
    seen.add(key);
    out.push(c);
  }
  return out;
}

/** What metrics.json records of the fixed values: one entry per model of the study (empty = all searched). */
function fixedRecord(
  models: readonly ModelName[],
  fixed: Partial<Record<ModelName, Hyperparameters>> | undefined,
): Record<string, Hyperparameters> {
  const out: Record<string, Hyperparameters> = {};
  for (const m of models) {
    const f = fixed?.[m] ?? {};
    const sorted: Hyperparameters = {};
    for (const key of Object.keys(f).sort()) sorted[key] = f[key];
    out[m] = sorted;
  }
  return out;
}

/** Checks what a study needs before any work: two classes, enough samples per class, usable feature sets. */
export function checkStudy(
  dataset: Dataset,
  options: EvaluationOptions = {},
): { classes: string[]; y: Int32Array; featureSets: FeatureSetName[] } {
  const unlabelled = dataset.samples.filter((s) => s.label === '');
  if (unlabelled.length > 0) {
    throw new UserError(
      `sample '${unlabelled[0].id}' has no label; every sample of a study needs its class label`,
      { file: dataset.source },
    );
  }
  const classes = classesOf(dataset.samples);
  const y = encodeLabels(
    dataset.samples.map((s) => s.label),
    classes,
  );
  const folds = options.folds ?? DEFAULT_EVALUATION_OPTIONS.folds;
  if (!Number.isInteger(folds) || folds < 2)
    throw new UserError(`--folds ${folds} must be a whole number ≥ 2`);
  checkFoldable(y, classes, folds);
  const featureSets = options.featureSets ?? featureSetsFor(dataset.kind);
  for (const set of featureSets) checkFeatureSet(set, dataset.kind);
  return { classes, y, featureSets };
}

export async function runEvaluation(
  dataset: Dataset,
  options: EvaluationOptions = {},
): Promise<EvaluationResult> {
  const { classes, y, featureSets } = checkStudy(dataset, options);
  const folds = options.folds ?? DEFAULT_EVALUATION_OPTIONS.folds;
  const repeats = options.repeats ?? DEFAULT_EVALUATION_OPTIONS.repeats;
  const seed = options.seed ?? DEFAULT_EVALUATION_OPTIONS.seed;
  const innerFolds = options.innerFolds ?? DEFAULT_EVALUATION_OPTIONS.innerFolds;
  const models = options.models ?? [...DEFAULT_MODEL_NAMES];
  const landscapeCandidates = options.landscapeCandidates ?? DEFAULT_LANDSCAPE_CANDIDATES;
  const factory = withFixed(
    withCandidates(options.modelFactory ?? (await defaultModelFactory()), options.modelCandidates),
    options.fixed,
  );
  const classCount = classes.length;
  const outer = stratifiedFolds(y, classCount, { folds, repeats, seed });

  const units = featureSets.length * models.length * outer.length;
  const needDiagrams = featureSets.some((s) => s !== 'raw');
  const diagramUnits =
    needDiagrams && !options.diagrams && dataset.kind !== 'diagrams' ? dataset.samples.length : 0;
  const total = 2 * units + diagramUnits;
  let done = 0;
  options.onProgress?.(0, total);

  let diagrams: readonly DiagramSet[] | undefined;
  if (needDiagrams) {
    if (diagramUnits > 0) options.onPhase?.('diagrams', 0, diagramUnits);
    diagrams = await diagramsOf(dataset, options, (d) => {
      options.onProgress?.(d, total);
      options.onPhase?.('diagrams', d, diagramUnits);
    });
    done = diagramUnits;
  }
  const data: FeatureData = {
    samples: dataset.samples,
    ...(diagrams ? { diagrams } : {}),
    ...(dataset.columns ? { columns: dataset.columns } : {}),
  };

  const context: StudyContext = {
    data,
    y,
    classCount,
    featureSets,
    models,
    outer,
    seed,
    innerFolds,
    landscapeCandidates,
    factory,
    reuse: options.reuse !== false,
    ...(options.landscape ? { landscape: options.landscape } : {}),
    ...(options.raw ? { raw: options.raw } : {}),
    ...(options.diagramFeatures ? { diagramFeatures: options.diagramFeatures } : {}),
    ...(options.modelFactory
      ? {}
      : {
          plan: {
            ...(options.modelCandidates ? { modelCandidates: options.modelCandidates } : {}),
            ...(options.fixed ? { fixed: options.fixed } : {}),
          },
        }),
  };
  // Units in (feature set, model, outer fold) order; each has its own derived seed, so the order in which
  // units run (one after another, or on worker threads) does not change any result.
  const unitList: StudyUnit[] = [];
  for (let si = 0; si < featureSets.length; si++)
    for (let mi = 0; mi < models.length; mi++)
      for (let fi = 0; fi < outer.length; fi++) unitList.push({ si, mi, fi });

  // Phase 1, inner CV: every unit's hyperparameters; phase 2, outer folds: every unit's fit and test.
  const runner = options.unitRunner ?? (await defaultRunner(options, dataset.samples.length, units));
  let selectionsDone = 0;
  options.onPhase?.('inner CV', 0, units);
  const selections = await runner.select(context, unitList, () => {
    options.onProgress?.(++done, total);
    options.onPhase?.('inner CV', ++selectionsDone, units);
  });
  let fitsDone = 0;
  options.onPhase?.('outer folds', 0, units);
  const outcomes = await runner.fit(context, unitList, selections, () => {
    options.onProgress?.(++done, total);
    options.onPhase?.('outer folds', ++fitsDone, units);
  });

  const results: StudyResult[] = [];
  for (let si = 0; si < featureSets.length; si++) {
    for (let mi = 0; mi < models.length; mi++) {
      const mine: FoldOutcome[] = [];
      const pooled: Confusion = confusionMatrix([], [], classCount);
      unitList.forEach((u, i) => {
        if (u.si !== si || u.mi !== mi) return;
        mine.push(outcomes[i]);
        addConfusion(pooled, confusionMatrix(pick(y, outcomes[i].test), outcomes[i].predicted, classCount));
      });
      const perFold = mine.map((o) => o.chosen);
      results.push({
        features: featureSets[si],
        model: models[mi],
        accuracy: summarize(mine.map((o) => o.accuracy)),
        balancedAccuracy: summarize(mine.map((o) => o.balancedAccuracy)),
        macroF1: summarize(mine.map((o) => o.macroF1)),
        confusion: pooled,
        chosen: { mostFrequent: mostFrequent(perFold), perFold },
        folds: mine,
      });
    }
  }

  const paired = pairedComparisons(results, outer);

  const recorded: Record<string, unknown> = {
    features: featureSets,
    models,
    innerFolds,
    landscapeCandidates: featureSets.some(usesLandscape)
      ? landscapeCandidates.map((c) => ({ depth: c.depth, gridSize: c.gridSize }))
      : [],
    landscape: usesAnyLandscape(featureSets) ? landscapeRecord(options.landscape) : null,
    raw: featureSets.includes('raw') || featureSets.includes('combined') ? rawRecord(options.raw) : null,
    ...diagramFeatureRecords(featureSets, options),
    fixed: fixedRecord(models, options.fixed),
    ...(options.record ?? {}),
  };
  return {
    classes,
    folds,
    repeats,
    seed,
    options: recorded,
    version: version(),
    results,
    paired,
    sampleIds: dataset.samples.map((s) => s.id),
    labels: y,
    ...(diagrams ? { diagrams } : {}),
  };
}

/** The feature set every other one is compared with, fold by fold. */
export const PAIRED_BASELINE: FeatureSetName = 'raw';

/**
 * For each model, each feature set other than the raw baseline against the baseline on the same outer folds:
 * differences of the fold accuracies (fold order of the study), their mean and the corrected resampled t
 * interval with n_test/n_train = Σ test rows / Σ training rows over the folds (1/(k − 1) for k-fold CV).
 */
export function pairedComparisons(
  results: readonly StudyResult[],
  outer: readonly Fold[],
  level = PAIRED_LEVEL,
): PairedComparison[] {
  let test = 0;
  let train = 0;
  for (const f of outer) {
    test += f.test.length;
    train += f.train.length;
  }
  const ratio = test / train;
  const out: PairedComparison[] = [];
  for (const base of results) {
    if (base.features !== PAIRED_BASELINE) continue;
    for (const r of results) {
      if (r.model !== base.model || r.features === PAIRED_BASELINE) continue;
      if (r.folds.length !== base.folds.length || r.folds.length < 2) continue;
      const differences = r.folds.map((f, j) => {
        const b = base.folds[j];
        if (b.repeat !== f.repeat || b.fold !== f.fold)
          throw new Error('pairedComparisons: the two results list their folds in different orders');
        return f.accuracy - b.accuracy;
      });
      const interval = correctedResampledInterval(differences, ratio, level);
      out.push({
        features: r.features,
        baseline: base.features,
        model: r.model,
        pairs: differences.length,
        differences,
        mean: interval.mean,
        std: interval.std,
        testTrainRatio: ratio,
        lower: interval.lower,
        upper: interval.upper,
        level,
        method: PAIRED_METHOD,
      });
    }
  }
  return out;
}

/** The options of the `betti`, `stats` and `pimage` vectorisers in the study, by set name. */
function diagramFeatureRecords(
  sets: readonly FeatureSetName[],
  options: EvaluationOptions,
): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const set of sets) {
    Object.assign(
      out,
      new FeatureExtractor(set, {
        ...(options.landscape ? { landscape: options.landscape } : {}),
        ...options.diagramFeatures,
      }).describeOptions(),
    );
  }
  return out;
}

function usesAnyLandscape(sets: readonly FeatureSetName[]): boolean {
  return sets.some((s) => s !== 'raw');
}

/** The vectoriser options metrics.json records (what the inner CV does not choose). */
function landscapeRecord(options: LandscapeVectorizerOptions | undefined): Record<string, unknown> {
  const v = new LandscapeVectorizer(options);
  return {
    degrees: v.degrees,
    infinite: describeInfinitePolicy(v.infinite),
    range: v.range ? { start: v.range.start, stop: v.range.stop } : 'learned',
    upperQuantile: v.upperQuantile,
    standardize: v.standardize,
  };
}

function rawRecord(raw: RawFeaturesOptions | undefined): Record<string, unknown> {
  const e = new RawFeatures(raw);
  return {
    bins: e.bins,
    upperQuantile: e.upperQuantile,
    signalLength: e.signalLength,
    ...(e.imageSize !== undefined ? { imageSize: e.imageSize } : {}),
  };
}

async function diagramsOf(
  dataset: Dataset,
  options: EvaluationOptions,
  onProgress: (done: number) => void,
): Promise<readonly DiagramSet[]> {
  if (options.diagrams) {
    if (options.diagrams.length !== dataset.samples.length) {
      throw new Error(
        `runEvaluation: ${options.diagrams.length} diagram sets for ${dataset.samples.length} samples`,
      );
    }
    return options.diagrams;
  }
  if (dataset.kind === 'diagrams') {
    return dataset.samples.map((s) => ({
      sample: s.id,
      label: s.label,
      diagrams: s.kind === 'diagrams' ? s.diagrams : [],
    }));
  }
  const compute = options.computeDiagrams ?? (await defaultDiagramComputer(options));
  const sets = await compute(dataset, (d) => onProgress(d));
  if (sets.length !== dataset.samples.length)
    throw new Error(`computeDiagrams returned ${sets.length} sets for ${dataset.samples.length} samples`);
  return sets;
}

/** Computes diagrams through the homology stage's worker threads (loaded only when needed). */
async function defaultDiagramComputer(
  options: EvaluationOptions,
): Promise<NonNullable<EvaluationOptions['computeDiagrams']>> {
  const { computeDiagramsParallel } = await import('../homology/parallel.js');
  const diagramOptions: DiagramOptions = options.diagramOptions ?? {
    degrees: options.landscape?.degrees ?? [0, 1],
  };
  return (dataset, onProgress) =>
    computeDiagramsParallel(dataset.samples, diagramOptions, {
      ...(options.workers ? { workers: options.workers } : {}),
      ...(onProgress ? { onProgress } : {}),
    });
}

/** The chosen values of one fold: depth and gridSize first (for landscape sets), then the model's, by key. */
function chosenOf(landscape: LandscapeCandidate | undefined, model: Hyperparameters): Hyperparameters {
  const out: Hyperparameters = {};
  if (landscape) {
    out.depth = landscape.depth;
    out.gridSize = landscape.gridSize;
  }
  for (const key of Object.keys(model).sort()) out[key] = model[key];
  return out;
}

/** The most frequent of equal-keyed records; ties go to the one seen first. */
export function mostFrequent(list: readonly Hyperparameters[]): Hyperparameters {
  const counts = new Map<string, { count: number; first: number }>();
  list.forEach((h, i) => {
    const key = JSON.stringify(h);
    const c = counts.get(key);
    if (c) c.count++;
    else counts.set(key, { count: 1, first: i });
  });
  let best: { count: number; first: number } | undefined;
  for (const c of counts.values())
    if (!best || c.count > best.count || (c.count === best.count && c.first < best.first)) best = c;
  return best ? { ...list[best.first] } : {};
}

/** Fixed formatting of metric values in metrics.json: rounded to 6 decimals. */
export function roundMetric(x: number): number | null {
  if (!Number.isFinite(x)) return null;
  const r = Math.round(x * 1e6) / 1e6;
  return Object.is(r, -0) ? 0 : r;
}

function roundSummary(s: Summary): { mean: number | null; std: number | null } {
  return { mean: roundMetric(s.mean), std: roundMetric(s.std) };
}

/** One outer fold's scores as metrics.json and folds.csv give them (repeat and fold numbered from 1). */
export function foldScore(o: FoldOutcome): {
  repeat: number;
  fold: number;
  samples: number;
  correct: number;
  accuracy: number | null;
  balancedAccuracy: number | null;
  macroF1: number | null;
} {
  return {
    repeat: o.repeat + 1,
    fold: o.fold + 1,
    samples: o.test.length,
    correct: o.correct,
    accuracy: roundMetric(o.accuracy),
    balancedAccuracy: roundMetric(o.balancedAccuracy),
    macroF1: roundMetric(o.macroF1),
  };
}

/**
 * The metrics.json text (a contract other tools read): fixed key order, metrics rounded to 6 decimals, no
 * timestamps, so the same seed gives the same bytes.
 */
export function formatMetricsJson(result: EvaluationResult): string {
  const doc = {
    classes: result.classes,
    folds: result.folds,
    repeats: result.repeats,
    seed: result.seed,
    options: result.options,
    version: result.version,
    results: result.results.map((r) => ({
      features: r.features,
      model: r.model,
      accuracy: roundSummary(r.accuracy),
      balancedAccuracy: roundSummary(r.balancedAccuracy),
      macroF1: roundSummary(r.macroF1),
      confusion: r.confusion,
      chosen: r.chosen,
      foldScores: r.folds.map(foldScore),
    })),
    paired: result.paired.map((p) => ({
      features: p.features,
      baseline: p.baseline,
      model: p.model,
      pairs: p.pairs,
      differences: p.differences.map(roundMetric),
      mean: roundMetric(p.mean),
      std: roundMetric(p.std),
      interval: { lower: roundMetric(p.lower), upper: roundMetric(p.upper), level: p.level },
      testTrainRatio: roundMetric(p.testTrainRatio),
      method: p.method,
    })),
  };
  return JSON.stringify(doc, null, 2) + '\n';
}
