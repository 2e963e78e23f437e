import { UserError } from '../core/errors.js';
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
import { type DiagramSet, describeInfinitePolicy } from '../homology/diagram.js';
import { classesOf, type Dataset } from '../io/dataset.js';
import type { Grid } from '../landscape/grid.js';
import { DEFAULT_MODEL_NAMES, type Hyperparameters, type ModelName } from './classifier.js';
import { checkFoldable, encodeLabels, stratifiedFolds } from './folds.js';
import type { Matrix } from './matrix.js';
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
import {
  DEFAULT_LANDSCAPE_CANDIDATES,
  derivedSeed,
  fitAndPredict,
  type LandscapeCandidate,
  type ModelFactory,
  pick,
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
  /** Worker threads for the diagrams. Default: every core. */
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
  /** Progress over diagram computation and (feature set × model × outer fold) units. */
  onProgress?: (done: number, total: number) => void;
}

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
  const factory = withCandidates(
    options.modelFactory ?? (await defaultModelFactory()),
    options.modelCandidates,
  );
  const classCount = classes.length;
  const outer = stratifiedFolds(y, classCount, { folds, repeats, seed });

  const units = featureSets.length * models.length * outer.length;
  const needDiagrams = featureSets.some((s) => s !== 'raw');
  const diagramUnits =
    needDiagrams && !options.diagrams && dataset.kind !== 'diagrams' ? dataset.samples.length : 0;
  const total = units + diagramUnits;
  let done = 0;
  options.onProgress?.(0, total);

  let diagrams: readonly DiagramSet[] | undefined;
  if (needDiagrams) {
    diagrams = await diagramsOf(dataset, options, (d) => options.onProgress?.(d, total));
    done = diagramUnits;
  }
  const data: FeatureData = {
    samples: dataset.samples,
    ...(diagrams ? { diagrams } : {}),
    ...(dataset.columns ? { columns: dataset.columns } : {}),
  };

  const results: StudyResult[] = [];
  for (let si = 0; si < featureSets.length; si++) {
    const set = featureSets[si];
    const base = new FeatureExtractor(set, {
      ...(options.landscape ? { landscape: options.landscape } : {}),
      ...(options.raw ? { raw: options.raw } : {}),
      ...options.diagramFeatures,
    });
    for (let mi = 0; mi < models.length; mi++) {
      const model = models[mi];
      const outcomes: FoldOutcome[] = [];
      const pooled: Confusion = confusionMatrix([], [], classCount);
      for (const f of outer) {
        const unitSeed = derivedSeed(seed, f.repeat, f.fold, si, mi);
        const selection = await selectHyperparameters(base, data, y, classCount, f.train, model, factory, {
          innerFolds,
          landscapeCandidates,
          seed: unitSeed,
        });
        const extractor = base.withLandscape(selection.landscape ?? {});
        const classifier = factory.create(model, selection.model, unitSeed);
        try {
          const { predicted, scores } = await fitAndPredict(
            extractor,
            data,
            y,
            classCount,
            f.train,
            f.test,
            classifier,
          );
          const confusion = confusionMatrix(pick(y, f.test), predicted, classCount);
          addConfusion(pooled, confusion);
          const weights = hasLinearWeights(classifier) ? classifier.linearWeights() : undefined;
          outcomes.push({
            repeat: f.repeat,
            fold: f.fold,
            test: f.test,
            predicted,
            scores,
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
          });
        } finally {
          classifier.dispose();
        }
        options.onProgress?.(++done, total);
      }
      const perFold = outcomes.map((o) => o.chosen);
      results.push({
        features: set,
        model,
        accuracy: summarize(outcomes.map((o) => o.accuracy)),
        balancedAccuracy: summarize(outcomes.map((o) => o.balancedAccuracy)),
        macroF1: summarize(outcomes.map((o) => o.macroF1)),
        confusion: pooled,
        chosen: { mostFrequent: mostFrequent(perFold), perFold },
        folds: outcomes,
      });
    }
  }

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
    sampleIds: dataset.samples.map((s) => s.id),
    labels: y,
    ...(diagrams ? { diagrams } : {}),
  };
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
    })),
  };
  return JSON.stringify(doc, null, 2) + '\n';
}
