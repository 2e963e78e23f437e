import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import { version } from '../core/version.js';
import {
  type FeatureData,
  FeatureExtractor,
  type FeatureExtractorOptions,
  type FeatureSetName,
} from '../features/combined.js';
import type { Classifier, Hyperparameters, ModelName } from './classifier.js';
import { withCandidates } from './evaluate.js';
import { checkFoldable, encodeLabels } from './folds.js';
import { argmaxRows } from './metrics.js';
import {
  type LandscapeCandidate,
  type ModelFactory,
  type Selection,
  selectHyperparameters,
} from './select.js';

/**
 * Features and a classifier fitted together, for `train` and `predict`: the hyperparameters (and the
 * landscape depth K and grid G) are chosen by an inner cross-validation on all the training data, then the
 * vectoriser and the classifier are fitted on all of it. What it learned is saved as a model folder (see
 * model-folder.ts): a manifest with the options, the learned grid and the classes, and the classifier.
 */
export interface PipelineOptions {
  /** Feature set. Default 'landscape'. */
  features?: FeatureSetName;
  /** Model. Default 'pca-svm'. */
  model?: ModelName;
  /** Fixed options of the vectoriser and raw features. */
  featureOptions?: FeatureExtractorOptions;
  /** (K, G) candidates of the inner CV. Default DEFAULT_LANDSCAPE_CANDIDATES. */
  landscapeCandidates?: readonly LandscapeCandidate[];
  /** Inner folds. Default 3. */
  innerFolds?: number;
  /** Seed of the inner splits and the classifier. Default 1. */
  seed?: number;
  /** Model hyperparameter candidates replacing the models stage's default grid. */
  modelCandidates?: Hyperparameters[];
}

export interface PipelineState {
  classes: string[];
  extractor: FeatureExtractor;
  classifier: Classifier;
  selection: Selection;
}

/** The part of a saved model's manifest the pipeline writes (the folder adds kind, format, checksum). */
export interface PipelineManifest {
  pipeline: { kind: 'landform.pipeline'; format: 1 };
  version: string;
  seed: number;
  features: FeatureSetName;
  model: ModelName;
  classes: string[];
  chosen: Hyperparameters;
  innerScore: number | null;
  /** The fitted feature extractor: its options and learned state (the grid per degree). */
  extractor: unknown;
  /** Anything the command records (e.g. the diagram options needed to treat new samples alike). */
  record: Record<string, unknown>;
}

export const CLASSIFIER_FILE = 'classifier.json';

export class Pipeline {
  readonly features: FeatureSetName;
  readonly model: ModelName;
  readonly featureOptions: FeatureExtractorOptions;
  readonly landscapeCandidates?: readonly LandscapeCandidate[];
  readonly innerFolds: number;
  readonly seed: number;
  readonly modelCandidates?: Hyperparameters[];
  state?: PipelineState;

  constructor(options: PipelineOptions = {}) {
    this.features = options.features ?? 'landscape';
    this.model = options.model ?? 'pca-svm';
    this.featureOptions = options.featureOptions ?? {};
    if (options.landscapeCandidates) this.landscapeCandidates = options.landscapeCandidates;
    this.innerFolds = options.innerFolds ?? 3;
    this.seed = options.seed ?? 1;
    if (options.modelCandidates) this.modelCandidates = options.modelCandidates;
  }

  /** Chooses hyperparameters by inner CV on all of `data`, then fits features and classifier on all of it. */
  async fit(
    data: FeatureData,
    labels: readonly string[],
    factory?: ModelFactory,
    onProgress?: (phase: string, done: number, total: number) => void,
  ): Promise<this> {
    const models = withCandidates(
      factory ?? (await loadFactory()),
      this.modelCandidates ? { [this.model]: this.modelCandidates } : undefined,
    );
    const classes = [...new Set(labels)].sort();
    const y = encodeLabels(labels, classes);
    checkFoldable(y, classes, Math.min(this.innerFolds, 2), '--inner-folds');
    const all = Int32Array.from({ length: labels.length }, (_, i) => i);
    const base = new FeatureExtractor(this.features, this.featureOptions);
    const selection = await selectHyperparameters(base, data, y, classes.length, all, this.model, models, {
      innerFolds: this.innerFolds,
      seed: this.seed,
      ...(this.landscapeCandidates ? { landscapeCandidates: this.landscapeCandidates } : {}),
      ...(onProgress
        ? { onProgress: (done: number, total: number) => onProgress('inner CV', done, total) }
        : {}),
    });
    onProgress?.('final fit', 0, 1);
    const extractor = base.withLandscape(selection.landscape ?? {}).fit(data, all);
    const classifier = models.create(this.model, selection.model, this.seed);
    await classifier.fit(extractor.transform(data, all), y, classes.length);
    this.state?.classifier.dispose();
    this.state = { classes, extractor, classifier, selection };
    onProgress?.('final fit', 1, 1);
    return this;
  }

  /** Predicted labels and class probabilities (columns in `classes` order) of every sample of `data`. */
  async predict(data: FeatureData): Promise<{ predicted: string[]; scores: Matrix; classes: string[] }> {
    const s = this.fitted();
    const scores = await s.classifier.predictScores(s.extractor.transform(data));
    const best = argmaxRows(scores);
    return { predicted: Array.from(best, (k) => s.classes[k]), scores, classes: s.classes };
  }

  /** The chosen hyperparameters: depth and gridSize (landscape sets) first, then the model's by key. */
  chosen(): Hyperparameters {
    const sel = this.fitted().selection;
    const out: Hyperparameters = {};
    if (sel.landscape) {
      out.depth = sel.landscape.depth;
      out.gridSize = sel.landscape.gridSize;
    }
    for (const key of Object.keys(sel.model).sort()) out[key] = sel.model[key];
    return out;
  }

  /** The manifest fields and files of a model folder. */
  async toFolder(
    record: Record<string, unknown> = {},
  ): Promise<{ manifest: PipelineManifest; files: Record<string, string> }> {
    const s = this.fitted();
    const manifest: PipelineManifest = {
      pipeline: { kind: 'landform.pipeline', format: 1 },
      version: version(),
      seed: this.seed,
      features: this.features,
      model: this.model,
      classes: s.classes,
      chosen: this.chosen(),
      innerScore: Number.isFinite(s.selection.score) ? s.selection.score : null,
      extractor: s.extractor.toJSON(),
      record,
    };
    return { manifest, files: { [CLASSIFIER_FILE]: JSON.stringify(await s.classifier.toJSON()) } };
  }

  /** Rebuilds a fitted pipeline from a verified model folder (`loadModelFolder`). */
  static async fromFolder(
    manifest: Record<string, unknown>,
    files: Record<string, Uint8Array>,
    where?: string,
  ): Promise<Pipeline> {
    const m = manifest as Partial<PipelineManifest>;
    const again = "train the model again with 'landform train … --save'";
    if (m.pipeline?.kind !== 'landform.pipeline') {
      throw new UserError(
        `the model folder holds no landform pipeline; ${again}`,
        where ? { file: where } : {},
      );
    }
    if (m.pipeline.format !== 1) {
      throw new UserError(
        `the pipeline has format ${String(m.pipeline.format)}; this landform reads format 1: ${again}`,
        where ? { file: where } : {},
      );
    }
    if (!m.features || !m.model || !Array.isArray(m.classes) || !m.extractor || !m.chosen) {
      throw new UserError(
        `the pipeline manifest lacks features, model, classes or the extractor; ${again}`,
        where ? { file: where } : {},
      );
    }
    const bytes = files[CLASSIFIER_FILE];
    if (!bytes)
      throw new UserError(
        `the model folder has no ${CLASSIFIER_FILE}; ${again}`,
        where ? { file: where } : {},
      );
    let classifierJson: unknown;
    try {
      classifierJson = JSON.parse(Buffer.from(bytes).toString('utf8'));
    } catch {
      throw new UserError(`${CLASSIFIER_FILE} is not valid JSON; ${again}`, where ? { file: where } : {});
    }
    const { classifierFromJSON } = await import('./models.js');
    const p = new Pipeline({ features: m.features, model: m.model, seed: m.seed ?? 1 });
    const extractor = FeatureExtractor.fromJSON(m.extractor);
    const chosen = m.chosen;
    p.state = {
      classes: [...m.classes],
      extractor,
      classifier: await classifierFromJSON(classifierJson),
      selection: {
        ...(chosen.depth !== undefined
          ? { landscape: { depth: Number(chosen.depth), gridSize: Number(chosen.gridSize) } }
          : {}),
        model: Object.fromEntries(Object.entries(chosen).filter(([k]) => k !== 'depth' && k !== 'gridSize')),
        score: m.innerScore ?? Number.NaN,
        tried: [],
      },
    };
    return p;
  }

  dispose(): void {
    this.state?.classifier.dispose();
  }

  private fitted(): PipelineState {
    if (!this.state) throw new Error('Pipeline: call fit() first');
    return this.state;
  }
}

async function loadFactory(): Promise<ModelFactory> {
  const models = await import('./models.js');
  return { create: models.createClassifier, candidates: models.candidateHyperparameters };
}
