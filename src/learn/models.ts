import { UserError } from '../core/errors.js';
import { type Classifier, type Hyperparameters, MODEL_NAMES, type ModelName } from './classifier.js';
import { DenseClassifier } from './dense.js';
import { ForestClassifier } from './forest.js';
import { PcaSvmClassifier } from './pca-svm.js';
import type { ProjectionCache } from './projection-cache.js';

/**
 * The registry of models: a name → a factory, a default inner-CV grid and a loader.
 * To add a model, see DEVELOPERS.md ("How to add a model").
 */
export function createClassifier(
  name: ModelName,
  hyper: Hyperparameters,
  seed: number,
  shared?: ProjectionCache,
): Classifier {
  switch (name) {
    case 'pca-svm':
      return new PcaSvmClassifier(hyper, seed, shared);
    case 'dense':
      return new DenseClassifier(hyper, seed);
    case 'forest':
      return new ForestClassifier(hyper, seed);
    default:
      throw new UserError(`unknown model '${String(name)}': choose one of ${MODEL_NAMES.join(', ')}`);
  }
}

/**
 * A small default grid for the inner cross-validation, simplest candidates first (so that a tie keeps
 * the simpler model).
 * pca-svm: linear kernel with C ∈ {0.1, 1, 10}; RBF with C ∈ {1, 10, 100} × γ ∈ {0.1, 1, 10} / features
 * (the usual spread of a coarse grid, common practice, no source: Hsu, Chang & Lin, "A practical guide to
 * support vector classification", 2003, search powers of two more finely).
 * dense: hidden units ∈ {16, 32} (other settings at their defaults, see DenseOptions).
 * forest: 100 trees, √features per split, leaves of ≥ 5 rows then of ≥ 1 (fully grown, Breiman 2001); a
 * forest is known to need little tuning, so two candidates (common practice, no source).
 */
export function candidateHyperparameters(
  name: ModelName,
  shape: { samples: number; features: number },
): Hyperparameters[] {
  const features = Math.max(1, shape.features);
  switch (name) {
    case 'pca-svm': {
      const out: Hyperparameters[] = [];
      for (const C of [0.1, 1, 10]) out.push({ kernel: 'linear', C });
      for (const C of [1, 10, 100])
        for (const g of [0.1, 1, 10]) out.push({ kernel: 'rbf', C, gamma: g / features });
      return out;
    }
    case 'dense':
      return [{ hidden: 16 }, { hidden: 32 }];
    case 'forest':
      return [
        { trees: 100, minLeaf: 5 },
        { trees: 100, minLeaf: 1 },
      ];
    default:
      throw new UserError(`unknown model '${String(name)}': choose one of ${MODEL_NAMES.join(', ')}`);
  }
}

/** Rebuilds a classifier saved with `toJSON()`; checks its kind tag and format version. */
export async function classifierFromJSON(json: unknown): Promise<Classifier> {
  const j = json as { kind?: unknown; model?: unknown } | null;
  if (j?.kind !== 'landform.classifier')
    throw new UserError(
      'not a saved landform classifier (kind tag missing or different): train and save the model again',
    );
  switch (j.model) {
    case 'pca-svm':
      return PcaSvmClassifier.fromJSON(json);
    case 'dense':
      return DenseClassifier.fromJSON(json);
    case 'forest':
      return ForestClassifier.fromJSON(json);
    default:
      throw new UserError(
        `saved classifier names an unknown model '${String(j.model)}': this version knows ${MODEL_NAMES.join(', ')}; use the landform version that saved it`,
      );
  }
}
