import { channelName } from '../core/diagram.js';
import type { Matrix } from '../core/matrix.js';
import { Random } from '../core/random.js';
import type { FeatureLocation } from '../features/landscape-vectorizer.js';

/**
 * Discriminative maps: where along the landscape a model looks.
 *
 * - `weightCurves` carries a linear model's weight vector (already mapped onto the model's input features,
 *   e.g. through the PCA loadings and the scaler by the pca-svm model's `linearWeights()`) onto the
 *   landscape's own axis: one curve per (degree, layer) over t.
 * - `permutationImportance` works for any model: the drop in held-out accuracy when the columns of one group
 *   (one degree and layer) are shuffled together across samples (Breiman, "Random forests", 2001, section 10;
 *   model-agnostic form in Fisher, Rudin and Dominici, "All models are wrong, but many are useful", 2019).
 */
/** A linear model's weights along one (channel, layer) of the landscape axis. */
export interface WeightCurve {
  degree: number;
  /** The filtration of the curve's channel, when samples were filtered several ways. */
  filtration?: string;
  layer: number;
  t: ArrayLike<number>;
  value: ArrayLike<number>;
}

/**
 * Groups weights by (degree, layer) and sorts each group by t. Columns whose location is undefined (raw
 * features of a combined set) are skipped.
 */
export function weightCurves(
  weights: ArrayLike<number>,
  locations: ReadonlyArray<FeatureLocation | undefined>,
): WeightCurve[] {
  if (weights.length !== locations.length)
    throw new Error(`weightCurves: ${weights.length} weights for ${locations.length} features`);
  const groups = new Map<
    string,
    { degree: number; filtration?: string; layer: number; points: Array<[number, number]> }
  >();
  const order = filtrationOrder(locations);
  for (let j = 0; j < locations.length; j++) {
    const at = locations[j];
    if (!at) continue;
    const key = `${at.filtration ?? ''}/${at.degree}/${at.layer}`;
    let g = groups.get(key);
    if (!g) {
      g = { degree: at.degree, filtration: at.filtration, layer: at.layer, points: [] };
      groups.set(key, g);
    }
    g.points.push([at.t, weights[j]]);
  }
  return [...groups.values()]
    .sort((a, b) => order(a) - order(b) || a.degree - b.degree || a.layer - b.layer)
    .map((g) => {
      g.points.sort((p, q) => p[0] - q[0]);
      return {
        degree: g.degree,
        ...(g.filtration !== undefined ? { filtration: g.filtration } : {}),
        layer: g.layer,
        t: Float64Array.from(g.points, (p) => p[0]),
        value: Float64Array.from(g.points, (p) => p[1]),
      };
    });
}

/**
 * One weight per input feature from a one-vs-one linear model: with one pair (two classes) the pair's signed
 * weights; with several, the root mean square over pairs (a magnitude: how much the feature matters to any
 * pair). Rows of `weights` are pairs, columns features.
 */
export function combinePairWeights(weights: Matrix): { values: Float64Array; signed: boolean } {
  if (weights.rows === 1) return { values: weights.data.slice(0, weights.cols), signed: true };
  const values = new Float64Array(weights.cols);
  for (let r = 0; r < weights.rows; r++)
    for (let j = 0; j < weights.cols; j++) values[j] += weights.data[r * weights.cols + j] ** 2;
  for (let j = 0; j < weights.cols; j++) values[j] = Math.sqrt(values[j] / Math.max(1, weights.rows));
  return { values, signed: false };
}

export interface FeatureGroup {
  name: string;
  columns: number[];
}

/**
 * Groups the located columns by degree and layer ("H1 λ2"; "erosion/H1 λ2" when samples were filtered several
 * ways), in filtration (first met), degree, then layer order.
 */
export function groupsByDegreeLayer(
  locations: ReadonlyArray<FeatureLocation | undefined>,
  rawName = 'raw features',
): FeatureGroup[] {
  const groups = new Map<string, { degree: number; filtration?: string; layer: number; columns: number[] }>();
  const raw: number[] = [];
  const order = filtrationOrder(locations);
  locations.forEach((at, j) => {
    if (!at) {
      raw.push(j);
      return;
    }
    const key = `${channelName(at)} λ${at.layer}`;
    const g = groups.get(key) ?? {
      degree: at.degree,
      filtration: at.filtration,
      layer: at.layer,
      columns: [],
    };
    g.columns.push(j);
    groups.set(key, g);
  });
  const out = [...groups.entries()]
    .sort((a, b) => order(a[1]) - order(b[1]) || a[1].degree - b[1].degree || a[1].layer - b[1].layer)
    .map(([name, g]) => ({ name, columns: g.columns }));
  if (raw.length > 0) out.push({ name: rawName, columns: raw });
  return out;
}

/** Ranks filtrations in the order their first column appears (untagged first). */
function filtrationOrder(
  locations: ReadonlyArray<FeatureLocation | undefined>,
): (x: { filtration?: string }) => number {
  const rank = new Map<string, number>();
  for (const at of locations) {
    if (at?.filtration !== undefined && !rank.has(at.filtration)) rank.set(at.filtration, rank.size + 1);
  }
  return (x) => (x.filtration === undefined ? 0 : (rank.get(x.filtration) ?? rank.size + 1));
}

export interface ImportanceOptions {
  /** Shuffles per group. Default 5. */
  repeats?: number;
  /** Default 1. */
  seed?: number;
}

export interface GroupImportance {
  group: string;
  /** Mean drop in accuracy over the repeats (baseline accuracy − shuffled accuracy). */
  mean: number;
  std: number;
}

function accuracyOf(scores: Matrix, y: Int32Array): number {
  let correct = 0;
  for (let i = 0; i < scores.rows; i++) {
    let best = 0;
    for (let c = 1; c < scores.cols; c++)
      if (scores.data[i * scores.cols + c] > scores.data[i * scores.cols + best]) best = c;
    if (best === y[i]) correct++;
  }
  return scores.rows === 0 ? 0 : correct / scores.rows;
}

/**
 * Permutation importance of each group on held-out data `x`, `y`: the same row permutation is applied to all
 * columns of a group, keeping their joint structure (a layer is one curve), breaking only its link to the label.
 */
export async function permutationImportance(
  model: { predictScores(x: Matrix): Promise<Matrix> },
  x: Matrix,
  y: Int32Array,
  groups: readonly FeatureGroup[],
  options: ImportanceOptions = {},
): Promise<{ baseline: number; groups: GroupImportance[] }> {
  const repeats = options.repeats ?? 5;
  const random = new Random(options.seed ?? 1);
  const baseline = accuracyOf(await model.predictScores(x), y);
  const order = new Int32Array(x.rows);
  const out: GroupImportance[] = [];
  for (const group of groups) {
    const drops: number[] = [];
    for (let r = 0; r < repeats; r++) {
      for (let i = 0; i < x.rows; i++) order[i] = i;
      random.shuffle(order);
      const shuffled: Matrix = { rows: x.rows, cols: x.cols, data: x.data.slice() };
      // Invariant: every column of the group in row i holds row order[i]'s original value.
      for (let i = 0; i < x.rows; i++) {
        for (const j of group.columns) shuffled.data[i * x.cols + j] = x.data[order[i] * x.cols + j];
      }
      drops.push(baseline - accuracyOf(await model.predictScores(shuffled), y));
    }
    const mean = drops.reduce((s, v) => s + v, 0) / drops.length;
    const variance =
      drops.length > 1 ? drops.reduce((s, v) => s + (v - mean) ** 2, 0) / (drops.length - 1) : 0;
    out.push({ group: group.name, mean, std: Math.sqrt(variance) });
  }
  return { baseline, groups: out };
}
