import type { Matrix } from '../core/matrix.js';

/**
 * The contract between the models (pca-svm, dense, forest) and the evaluation loop.
 * Hyperparameters go to the factory; `fit` learns; `predictScores` uses only what `fit` learned.
 */
export type ModelName = 'pca-svm' | 'dense' | 'forest';

export const MODEL_NAMES: readonly ModelName[] = ['pca-svm', 'dense', 'forest'];

/**
 * The models a study compares when none are named: all three. The forest joined them because it is cheap
 * beside pca-svm (`npm run bench forest`: its fit took under a third of pca-svm's at every size measured).
 */
export const DEFAULT_MODEL_NAMES: readonly ModelName[] = ['pca-svm', 'dense', 'forest'];

/** Hyperparameter values of one candidate, e.g. {kernel:'rbf', C: 10, gamma: 0.01} or {hidden: 32}. */
export type Hyperparameters = Record<string, number | string>;

export interface Classifier {
  readonly name: ModelName;
  readonly hyperparameters: Hyperparameters;
  /** Learns from `x` (samples × features) and class indices `y` in [0, classCount). */
  fit(x: Matrix, y: Int32Array, classCount: number): Promise<void>;
  /** One row per sample, one column per class: probabilities (rows sum to 1). */
  predictScores(x: Matrix): Promise<Matrix>;
  /** Serialisable learned state (with kind tag and format version) for saved models. */
  toJSON(): Promise<unknown>;
  /** Releases WebAssembly or tensor memory. Safe to call twice. */
  dispose(): void;
}
