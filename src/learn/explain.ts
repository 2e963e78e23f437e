import type { DiagramSet } from '../core/diagram.js';
import type { Matrix } from '../core/matrix.js';
import type { Dataset } from '../core/sample.js';
import { FeatureExtractor } from '../features/combined.js';
import {
  type FeatureLocation,
  type LandscapeVectorizerOptions,
  parseLandscapeFeatureName,
} from '../features/landscape-vectorizer.js';
import type { Hyperparameters, ModelName } from './classifier.js';
import type { EvaluationResult, StudyResult } from './evaluate.js';
import {
  combinePairWeights,
  groupsByDegreeLayer,
  permutationImportance,
  type WeightCurve,
  weightCurves,
} from './importance.js';

/**
 * Explanation of a finished evaluation: where along the landscape its models look. Refits on the evaluation's
 * own outer folds give a linear model's weights on the landscape axis and the permutation importance of each
 * (degree, layer); the report draws them.
 */
export interface DiscriminativeMaps {
  /** Linear weights on the landscape axis (degree, layer, t), when a linear model was fitted. */
  weights?: { curves: readonly WeightCurve[]; note: string };
  importance?: { rows: ReadonlyArray<{ group: string; mean: number; std: number }>; note: string };
}

/** The result with the best mean accuracy among those of one feature set. */
export function bestResult(results: readonly StudyResult[], features: string): StudyResult | undefined {
  let out: StudyResult | undefined;
  for (const r of results)
    if (r.features === features && (!out || r.accuracy.mean > out.accuracy.mean)) out = r;
  return out;
}

function complement(n: number, test: ArrayLike<number>): Int32Array {
  const held = new Uint8Array(n);
  for (let i = 0; i < test.length; i++) held[test[i]] = 1;
  const out: number[] = [];
  for (let i = 0; i < n; i++) if (!held[i]) out.push(i);
  return Int32Array.from(out);
}

function take(m: Matrix, rows: ArrayLike<number>): Matrix {
  const data = new Float64Array(rows.length * m.cols);
  for (let k = 0; k < rows.length; k++)
    data.set(m.data.subarray(rows[k] * m.cols, (rows[k] + 1) * m.cols), k * m.cols);
  return { rows: rows.length, cols: m.cols, data };
}

/** Sample standard deviation of each column (0 for a constant column). */
function columnSd(m: Matrix): Float64Array {
  const mean = new Float64Array(m.cols);
  const sd = new Float64Array(m.cols);
  for (let i = 0; i < m.rows; i++)
    for (let j = 0; j < m.cols; j++) mean[j] += m.data[i * m.cols + j] / m.rows;
  for (let i = 0; i < m.rows; i++)
    for (let j = 0; j < m.cols; j++) sd[j] += (m.data[i * m.cols + j] - mean[j]) ** 2;
  for (let j = 0; j < m.cols; j++) sd[j] = m.rows > 1 ? Math.sqrt(sd[j] / (m.rows - 1)) : 0;
  return sd;
}

/** Linear interpolation of (t, v) at x; 0 outside [t0, tlast]. */
function interpolate(t: ArrayLike<number>, v: ArrayLike<number>, x: number): number {
  const n = t.length;
  if (n === 0 || x < t[0] || x > t[n - 1]) return 0;
  if (n === 1) return v[0];
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (t[mid] <= x) lo = mid;
    else hi = mid;
  }
  const w = t[hi] === t[lo] ? 0 : (x - t[lo]) / (t[hi] - t[lo]);
  return v[lo] * (1 - w) + v[hi] * w;
}

function modelPart(chosen: Hyperparameters): Hyperparameters {
  const out: Hyperparameters = {};
  for (const [k, v] of Object.entries(chosen)) if (k !== 'depth' && k !== 'gridSize') out[k] = v;
  return out;
}

/**
 * Discriminative maps from refits on the evaluation's own outer folds (training part only):
 * - weights: a linear pca-svm (C as chosen in that fold when the chosen kernel was linear, else 1) on the
 *   landscape features; its weights carried back onto (degree, layer, t), interpolated onto `axes` and
 *   averaged over folds;
 * - importance: the best landscape model with the fold's chosen hyperparameters, permutation importance
 *   per (degree, layer) on the held-out part, mean ± sd over folds.
 */
export async function discriminativeMaps(
  sets: readonly DiagramSet[],
  samples: Dataset['samples'],
  evaluation: EvaluationResult,
  landscape: LandscapeVectorizerOptions,
  axes: ReadonlyArray<{ degree: number; filtration?: string; t: Float64Array }>,
  options: { repeats: number; seed: number },
): Promise<DiscriminativeMaps | undefined> {
  const chosenResult = bestResult(evaluation.results, 'landscape');
  if (!chosenResult) return undefined;
  const { createClassifier } = await import('./models.js');
  const y = evaluation.labels;
  const classCount = evaluation.classes.length;
  const data = { samples, diagrams: sets };
  const sums = new Map<
    string,
    { degree: number; filtration?: string; layer: number; t: Float64Array; sum: Float64Array }
  >();
  let weightFolds = 0;
  let signed = true;
  const importanceByGroup = new Map<string, number[]>();
  for (const fold of chosenResult.folds) {
    const train = complement(y.length, fold.test);
    const depth = Number(fold.chosen.depth ?? landscape.depth ?? 5);
    const gridSize = Number(fold.chosen.gridSize ?? landscape.gridSize ?? 50);
    const extractor = new FeatureExtractor('landscape', { landscape: { ...landscape, depth, gridSize } });
    extractor.fit(data, train);
    const x = extractor.transform(data);
    const locations: Array<FeatureLocation | undefined> = extractor
      .featureNames()
      .map((n) => parseLandscapeFeatureName(n));
    const xTrain = take(x, train);
    const xTest = take(x, fold.test);
    const yTrain = Int32Array.from(train, (i) => y[i]);
    const yTest = Int32Array.from(fold.test, (i) => y[i]);
    const seed = (options.seed * 1009 + fold.fold * 31 + fold.repeat) >>> 0;

    // Linear weights on the landscape axis.
    const chosenModel = modelPart(fold.chosen);
    const C = chosenModel.kernel === 'linear' && typeof chosenModel.C === 'number' ? chosenModel.C : 1;
    const linear = createClassifier('pca-svm', { kernel: 'linear', C }, seed);
    try {
      await linear.fit(xTrain, yTrain, classCount);
      const lw = (
        linear as unknown as { linearWeights?: () => { weights: Matrix } | undefined }
      ).linearWeights?.();
      if (lw) {
        // Standardised weights: w_j × sd_j of the training features, so a feature that is nearly constant
        // (tiny sd, huge raw weight) does not dominate the map (common practice, no source).
        const sd = columnSd(xTrain);
        const scaled: Matrix = {
          rows: lw.weights.rows,
          cols: lw.weights.cols,
          data: lw.weights.data.slice(),
        };
        for (let r = 0; r < scaled.rows; r++)
          for (let j = 0; j < scaled.cols; j++) scaled.data[r * scaled.cols + j] *= sd[j];
        const combined = combinePairWeights(scaled);
        signed = combined.signed;
        for (const curve of weightCurves(combined.values, locations)) {
          const axis = axes.find((a) => a.degree === curve.degree && a.filtration === curve.filtration);
          if (!axis) continue;
          const key = `${curve.filtration ?? ''}/${curve.degree}/${curve.layer}`;
          const entry = sums.get(key) ?? {
            degree: curve.degree,
            ...(curve.filtration !== undefined ? { filtration: curve.filtration } : {}),
            layer: curve.layer,
            t: axis.t,
            sum: new Float64Array(axis.t.length),
          };
          for (let j = 0; j < axis.t.length; j++)
            entry.sum[j] += interpolate(curve.t, curve.value, axis.t[j]);
          sums.set(key, entry);
        }
        weightFolds++;
      }
    } finally {
      linear.dispose();
    }

    // Permutation importance of the best landscape model.
    const model = createClassifier(chosenResult.model as ModelName, chosenModel, seed);
    try {
      await model.fit(xTrain, yTrain, classCount);
      const result = await permutationImportance(model, xTest, yTest, groupsByDegreeLayer(locations), {
        repeats: options.repeats,
        seed,
      });
      for (const g of result.groups)
        importanceByGroup.set(g.group, [...(importanceByGroup.get(g.group) ?? []), g.mean]);
    } finally {
      model.dispose();
    }
  }
  // Map order is the features' channel order (filtration-major), so only degree and layer are sorted within.
  const channelRank = new Map<string, number>();
  for (const c of sums.values())
    if (!channelRank.has(c.filtration ?? '')) channelRank.set(c.filtration ?? '', channelRank.size);
  const rankOf = (c: { filtration?: string }) => channelRank.get(c.filtration ?? '') ?? 0;
  const curves: WeightCurve[] = [...sums.values()]
    .sort((a, b) => rankOf(a) - rankOf(b) || a.degree - b.degree || a.layer - b.layer)
    .filter((c) => c.layer <= 4)
    .map((c) => ({
      degree: c.degree,
      ...(c.filtration !== undefined ? { filtration: c.filtration } : {}),
      layer: c.layer,
      t: c.t,
      value: c.sum.map((v) => v / Math.max(1, weightFolds)),
    }));
  const rows = [...importanceByGroup.entries()].map(([group, drops]) => {
    const mean = drops.reduce((s, v) => s + v, 0) / drops.length;
    const sd =
      drops.length > 1 ? Math.sqrt(drops.reduce((s, v) => s + (v - mean) ** 2, 0) / (drops.length - 1)) : 0;
    return { group, mean, std: sd };
  });
  const folds = chosenResult.folds.length;
  return {
    ...(curves.length > 0
      ? {
          weights: {
            curves,
            note: `${signed ? 'Signed weight (positive favours the first class)' : 'Weight magnitude (root mean square over the one-vs-one class pairs)'} of a linear pca-svm on the landscape features, carried back through the PCA loadings and the scaler onto (degree, layer, t) and multiplied by each feature's standard deviation; mean of ${weightFolds} refits, one per outer training fold.`,
          },
        }
      : {}),
    ...(rows.length > 0
      ? {
          importance: {
            rows,
            note: `Drop in held-out accuracy of the best landscape model (${chosenResult.model}) when one degree and layer is shuffled across samples; mean ± sd over ${folds} outer folds, ${options.repeats} shuffles each.`,
          },
        }
      : {}),
  };
}
