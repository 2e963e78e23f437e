import type { Matrix } from '../core/matrix.js';
import type { Pca } from './pca.js';
import type { StandardScaler } from './scaler.js';

/**
 * Fitted scaler + PCA shared by the classifiers of one hyperparameter search. In an inner cross-validation
 * every SVM candidate of a fold is trained on the same training matrix, and the scaler and PCA fitted on it
 * do not depend on the SVM's C, γ or kernel: fitting them once per (training matrix, PCA setting) and
 * projecting each test matrix once per fitted PCA gives the same numbers as refitting them per candidate.
 *
 * Keys are the matrix objects themselves (held weakly), so a cache never mixes two folds, and it is dropped
 * with the search that made it. Cached parts are never changed after `fit`.
 */
export interface Projection {
  scaler: StandardScaler;
  pca: Pca;
  /** The training rows' PCA scores. */
  scores: Matrix;
}

export class ProjectionCache {
  /** Scaler + PCA fits done (misses). */
  fits = 0;
  /** Fits served from the cache. */
  reused = 0;
  private readonly fitted = new WeakMap<Matrix, Map<string, Projection>>();
  private readonly projected = new WeakMap<Matrix, Map<Pca, Matrix>>();

  /** The scaler + PCA fitted on `x` for the PCA setting `key`; `make` fits them on a miss. */
  fit(x: Matrix, key: string, make: () => Projection): Projection {
    let byKey = this.fitted.get(x);
    if (!byKey) {
      byKey = new Map();
      this.fitted.set(x, byKey);
    }
    const hit = byKey.get(key);
    if (hit) {
      this.reused++;
      return hit;
    }
    this.fits++;
    const made = make();
    byKey.set(key, made);
    return made;
  }

  /** `x` through a cached scaler and PCA (computed once per (x, pca)). */
  project(x: Matrix, parts: { scaler: StandardScaler; pca: Pca }): Matrix {
    let byPca = this.projected.get(x);
    if (!byPca) {
      byPca = new Map();
      this.projected.set(x, byPca);
    }
    let out = byPca.get(parts.pca);
    if (!out) {
      out = parts.pca.transform(parts.scaler.transform(x));
      byPca.set(parts.pca, out);
    }
    return out;
  }
}
