import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import { Random } from '../core/random.js';
import type { Classifier, Hyperparameters } from './classifier.js';

/**
 * The `forest` classifier: a random forest (Breiman, "Random forests", Machine Learning 45, 2001) of CART
 * trees (Breiman, Friedman, Olshen, Stone, "Classification and regression trees", 1984) on typed arrays.
 * Each tree is grown on a bootstrap sample of the training rows; at each node a fresh random subset of
 * `splitFeatures` features is searched for the split of least Gini impurity (features constant in the node do
 * not count, so a node is split whenever some feature can split it, as most implementations do: common
 * practice, no source); nodes are split until pure, smaller than 2·minLeaf, or at maxDepth. A tree's score for
 * a sample is its leaf's class frequencies; the forest's probability is their mean over the trees.
 *
 * Hyperparameters: trees (default 100), splitFeatures ('sqrt' (default), 'log2', a whole number, or a fraction
 * in (0, 1) of the features), minLeaf (rows per leaf, default 1), maxDepth (default 0 = unlimited).
 * √features per split is the usual default for classification (common practice, no source; Breiman 2001 tried
 * 1 and ⌊log2 M + 1⌋).
 *
 * Speed: features are replaced once per fit by their ranks among the training values (feature-major
 * Uint32Array), and a node sorts `rank · classCount + class` keys natively, so the Gini sweep reads classes
 * in value order without comparators or objects.
 */
export const FOREST_HYPERPARAMETERS = ['trees', 'splitFeatures', 'minLeaf', 'maxDepth'] as const;

export interface ForestTrees {
  /** First node of each tree. */
  roots: Int32Array;
  /** Feature tested at each node; −1 at a leaf. */
  feature: Int32Array;
  /** x[feature] ≤ threshold goes left. */
  threshold: Float64Array;
  /** Child nodes; at a leaf, `left` is the offset of its class frequencies in `leafValues`. */
  left: Int32Array;
  right: Int32Array;
  /** Class frequencies of each leaf, classCount values each (they sum to 1). */
  leafValues: Float64Array;
}

export interface ForestJSON {
  kind: 'landform.classifier';
  model: 'forest';
  format: 1;
  hyperparameters: Hyperparameters;
  seed: number;
  features: number;
  classCount: number;
  trees: {
    roots: number[];
    feature: number[];
    threshold: number[];
    left: number[];
    right: number[];
    leafValues: number[];
  };
}

interface ForestSettings {
  trees: number;
  splitFeatures: string | number;
  minLeaf: number;
  maxDepth: number;
}

export class ForestClassifier implements Classifier {
  readonly name = 'forest' as const;
  readonly hyperparameters: Hyperparameters;
  readonly seed: number;
  state: { trees: ForestTrees; features: number; classCount: number } | undefined;
  private readonly settings: ForestSettings;

  constructor(hyperparameters: Hyperparameters, seed: number) {
    for (const key of Object.keys(hyperparameters)) {
      if (!(FOREST_HYPERPARAMETERS as readonly string[]).includes(key)) {
        throw new UserError(
          `forest has no hyperparameter '${key}': use ${FOREST_HYPERPARAMETERS.join(', ')}`,
        );
      }
    }
    this.hyperparameters = { ...hyperparameters };
    this.seed = seed;
    this.settings = settingsOf(hyperparameters);
  }

  async fit(x: Matrix, y: Int32Array, classCount: number): Promise<void> {
    if (x.rows !== y.length) throw new Error(`forest: ${x.rows} rows but ${y.length} labels`);
    if (x.rows === 0) throw new Error('forest: no training rows');
    const trees = growForest(x, y, classCount, this.settings, this.seed);
    this.state = { trees, features: x.cols, classCount };
  }

  async predictScores(x: Matrix): Promise<Matrix> {
    const s = this.fitted();
    if (x.cols !== s.features)
      throw new UserError(`the forest was trained on ${s.features} features; these samples have ${x.cols}`);
    return forestScores(s.trees, x, s.classCount);
  }

  async toJSON(): Promise<ForestJSON> {
    const s = this.fitted();
    const t = s.trees;
    return {
      kind: 'landform.classifier',
      model: 'forest',
      format: 1,
      hyperparameters: { ...this.hyperparameters },
      seed: this.seed,
      features: s.features,
      classCount: s.classCount,
      trees: {
        roots: Array.from(t.roots),
        feature: Array.from(t.feature),
        threshold: Array.from(t.threshold),
        left: Array.from(t.left),
        right: Array.from(t.right),
        leafValues: Array.from(t.leafValues),
      },
    };
  }

  static fromJSON(json: unknown): ForestClassifier {
    const j = json as Partial<ForestJSON> | null;
    if (j?.kind !== 'landform.classifier' || j.model !== 'forest')
      throw new UserError('not a saved forest classifier: save the model again with this version');
    if (j.format !== 1)
      throw new UserError(
        `saved forest classifier has format ${String(j.format)}, this version reads format 1: train and save the model again`,
      );
    const t = j.trees;
    if (!t || !j.hyperparameters || typeof j.features !== 'number' || typeof j.classCount !== 'number')
      throw new UserError('saved forest classifier lacks its trees: train and save the model again');
    const nodes = t.feature.length;
    if (t.threshold.length !== nodes || t.left.length !== nodes || t.right.length !== nodes)
      throw new UserError('saved forest classifier has node arrays of different lengths');
    const c = new ForestClassifier(j.hyperparameters, j.seed ?? 1);
    c.state = {
      features: j.features,
      classCount: j.classCount,
      trees: {
        roots: Int32Array.from(t.roots),
        feature: Int32Array.from(t.feature),
        threshold: Float64Array.from(t.threshold),
        left: Int32Array.from(t.left),
        right: Int32Array.from(t.right),
        leafValues: Float64Array.from(t.leafValues),
      },
    };
    checkTrees(c.state.trees, j.features, j.classCount);
    return c;
  }

  /** Number of nodes over all trees (for inspection and the benchmark). */
  nodeCount(): number {
    return this.fitted().trees.feature.length;
  }

  dispose(): void {
    this.state = undefined;
  }

  private fitted(): NonNullable<ForestClassifier['state']> {
    if (!this.state) throw new Error('forest: call fit before predicting');
    return this.state;
  }
}

function settingsOf(h: Hyperparameters): ForestSettings {
  const whole = (key: string, fallback: number, least: number): number => {
    const v = h[key];
    if (v === undefined) return fallback;
    const n = typeof v === 'number' ? v : Number(v);
    if (!Number.isInteger(n) || n < least)
      throw new UserError(`forest ${key} must be a whole number ≥ ${least}, got '${String(v)}'`);
    return n;
  };
  const sf = h.splitFeatures ?? 'sqrt';
  let splitFeatures: string | number = sf;
  if (sf !== 'sqrt' && sf !== 'log2') {
    const n = typeof sf === 'number' ? sf : Number(sf);
    if (!(n > 0) || (n >= 1 && !Number.isInteger(n)))
      throw new UserError(
        `forest splitFeatures must be sqrt, log2, a whole number ≥ 1 or a fraction in (0, 1), got '${String(sf)}'`,
      );
    splitFeatures = n;
  }
  return {
    trees: whole('trees', 100, 1),
    splitFeatures,
    minLeaf: whole('minLeaf', 1, 1),
    maxDepth: whole('maxDepth', 0, 0),
  };
}

/** Features searched per split for `d` features. */
export function featuresPerSplit(setting: string | number, d: number): number {
  let m: number;
  if (setting === 'sqrt') m = Math.floor(Math.sqrt(d));
  else if (setting === 'log2') m = Math.floor(Math.log2(d) + 1);
  else if (typeof setting === 'number' && setting < 1) m = Math.floor(setting * d);
  else m = Number(setting);
  return Math.min(d, Math.max(1, m));
}

/** Ranks of each feature's training values (feature-major) and each feature's distinct sorted values. */
function rankFeatures(x: Matrix): { ranks: Uint32Array; values: Float64Array[] } {
  const n = x.rows;
  const d = x.cols;
  const ranks = new Uint32Array(n * d);
  const values: Float64Array[] = [];
  const column = new Float64Array(n);
  for (let f = 0; f < d; f++) {
    for (let i = 0; i < n; i++) column[i] = x.data[i * d + f];
    const sorted = Float64Array.from(column).sort();
    let distinct = 0;
    for (let i = 0; i < n; i++) if (i === 0 || sorted[i] !== sorted[i - 1]) sorted[distinct++] = sorted[i];
    const uniq = sorted.slice(0, distinct);
    values.push(uniq);
    for (let i = 0; i < n; i++) ranks[f * n + i] = lowerBound(uniq, column[i]);
  }
  return { ranks, values };
}

function lowerBound(sorted: Float64Array, v: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Growable node arrays shared by all trees of a forest. */
class NodeStore {
  feature = new Int32Array(1024);
  threshold = new Float64Array(1024);
  left = new Int32Array(1024);
  right = new Int32Array(1024);
  leafValues = new Float64Array(1024);
  nodes = 0;
  leafEnd = 0;

  add(): number {
    if (this.nodes === this.feature.length) {
      const size = this.feature.length * 2;
      this.feature = grow(this.feature, size);
      this.threshold = grow(this.threshold, size);
      this.left = grow(this.left, size);
      this.right = grow(this.right, size);
    }
    return this.nodes++;
  }

  leaf(node: number, counts: Float64Array, total: number): void {
    const k = counts.length;
    if (this.leafEnd + k > this.leafValues.length)
      this.leafValues = grow(this.leafValues, Math.max(this.leafValues.length * 2, this.leafEnd + k));
    for (let c = 0; c < k; c++) this.leafValues[this.leafEnd + c] = counts[c] / total;
    this.feature[node] = -1;
    this.threshold[node] = 0;
    this.left[node] = this.leafEnd;
    this.right[node] = -1;
    this.leafEnd += k;
  }
}

function grow<T extends Int32Array | Float64Array>(a: T, size: number): T {
  const b = new (a.constructor as { new (n: number): T })(size);
  b.set(a);
  return b;
}

function growForest(
  x: Matrix,
  y: Int32Array,
  classCount: number,
  settings: ForestSettings,
  seed: number,
): ForestTrees {
  const n = x.rows;
  const d = x.cols;
  const { ranks, values } = rankFeatures(x);
  const mtry = featuresPerSplit(settings.splitFeatures, d);
  const random = new Random(seed);
  const store = new NodeStore();
  const roots = new Int32Array(settings.trees);
  const work = {
    rows: new Int32Array(n),
    keys: new Uint32Array(n),
    order: Int32Array.from({ length: d }, (_, i) => i),
    counts: new Float64Array(classCount),
    leftCounts: new Float64Array(classCount),
    // Explicit stack of nodes to grow: (node, lo, hi, depth).
    stack: new Int32Array(4 * (2 * n + 2)),
  };
  // Keys rank·classCount + class must fit in 32 bits; else fall back to float keys (huge inputs only).
  if ((n + 1) * classCount > 0xffffffff) throw new UserError('forest: too many rows for one fit');
  for (let t = 0; t < settings.trees; t++) {
    // Invariant: trees 0..t−1 are complete in `store`; `random` has drawn only their bootstraps and features.
    for (let i = 0; i < n; i++) work.rows[i] = random.int(n);
    roots[t] = growTree(store, work, ranks, values, y, n, d, classCount, mtry, settings, random);
  }
  return {
    roots,
    feature: store.feature.slice(0, store.nodes),
    threshold: store.threshold.slice(0, store.nodes),
    left: store.left.slice(0, store.nodes),
    right: store.right.slice(0, store.nodes),
    leafValues: store.leafValues.slice(0, store.leafEnd),
  };
}

interface Work {
  rows: Int32Array;
  keys: Uint32Array;
  order: Int32Array;
  counts: Float64Array;
  leftCounts: Float64Array;
  stack: Int32Array;
}

function growTree(
  store: NodeStore,
  work: Work,
  ranks: Uint32Array,
  values: Float64Array[],
  y: Int32Array,
  n: number,
  d: number,
  k: number,
  mtry: number,
  settings: ForestSettings,
  random: Random,
): number {
  const { rows, keys, order, counts, leftCounts, stack } = work;
  const root = store.add();
  let top = 0;
  stack[top++] = root;
  stack[top++] = 0;
  stack[top++] = n;
  stack[top++] = 0;
  // Invariant: each stack entry is a node whose rows are rows[lo..hi), not yet split nor made a leaf.
  while (top > 0) {
    const depth = stack[--top];
    const hi = stack[--top];
    const lo = stack[--top];
    const node = stack[--top];
    const m = hi - lo;
    counts.fill(0);
    for (let i = lo; i < hi; i++) counts[y[rows[i]]]++;
    let parentSquares = 0;
    let classesPresent = 0;
    for (let c = 0; c < k; c++) {
      parentSquares += counts[c] * counts[c];
      if (counts[c] > 0) classesPresent++;
    }
    const canSplit =
      classesPresent > 1 &&
      m >= 2 * settings.minLeaf &&
      (settings.maxDepth === 0 || depth < settings.maxDepth);
    let bestFeature = -1;
    let bestRank = 0;
    let bestNext = 0;
    // Gini: minimising Σ_side n_side(1 − Σ_c p²) is maximising Σ_side Σ_c count² / n_side.
    let bestScore = parentSquares / m + 1e-12 * m;
    if (canSplit) {
      let inspected = 0;
      // Partial Fisher–Yates over `order`: features order[0..j) have been drawn for this node.
      for (let j = 0; j < d && inspected < mtry; j++) {
        const pick = j + random.int(d - j);
        const f = order[pick];
        order[pick] = order[j];
        order[j] = f;
        const base = f * n;
        for (let i = lo; i < hi; i++) {
          const r = rows[i];
          keys[i] = ranks[base + r] * k + y[r];
        }
        const sorted = keys.subarray(lo, hi).sort();
        if (Math.floor(sorted[0] / k) === Math.floor(sorted[m - 1] / k)) continue; // constant here
        inspected++;
        const split = bestSplitOf(sorted, k, m, counts, leftCounts, settings.minLeaf, parentSquares);
        if (split.score > bestScore) {
          bestScore = split.score;
          bestFeature = f;
          bestRank = split.rank;
          bestNext = split.next;
        }
      }
    }
    if (bestFeature < 0) {
      store.leaf(node, counts, m);
      continue;
    }
    // Partition rows[lo..hi) by rank ≤ bestRank (left) in place.
    const base = bestFeature * n;
    let a = lo;
    let b = hi - 1;
    while (a <= b) {
      if (ranks[base + rows[a]] <= bestRank) a++;
      else {
        const tmp = rows[a];
        rows[a] = rows[b];
        rows[b] = tmp;
        b--;
      }
    }
    const v = values[bestFeature];
    // Midway between the node's two neighbouring values (not the training set's), as CART does.
    let threshold = (v[bestRank] + v[bestNext]) / 2;
    if (!(threshold < v[bestNext])) threshold = v[bestRank];
    const left = store.add();
    const right = store.add();
    store.feature[node] = bestFeature;
    store.threshold[node] = threshold;
    store.left[node] = left;
    store.right[node] = right;
    stack[top++] = right;
    stack[top++] = a;
    stack[top++] = hi;
    stack[top++] = depth + 1;
    stack[top++] = left;
    stack[top++] = lo;
    stack[top++] = a;
    stack[top++] = depth + 1;
  }
  return root;
}

/** The best split of one feature's sorted keys: the largest Σ count²/n over both sides, and its rank. */
function bestSplitOf(
  sorted: Uint32Array,
  k: number,
  m: number,
  counts: Float64Array,
  leftCounts: Float64Array,
  minLeaf: number,
  parentSquares: number,
): { score: number; rank: number; next: number } {
  leftCounts.fill(0);
  let leftSquares = 0;
  let rightSquares = parentSquares;
  let best = Number.NEGATIVE_INFINITY;
  let bestRank = 0;
  let bestNext = 0;
  // Invariant: after step i, rows sorted[0..i] are on the left; the sums of squares match the counts.
  for (let i = 0; i < m - 1; i++) {
    const key = sorted[i];
    const c = key % k;
    const l = leftCounts[c];
    leftSquares += 2 * l + 1;
    leftCounts[c] = l + 1;
    const r = counts[c] - l;
    rightSquares -= 2 * r - 1;
    const rank = (key - c) / k;
    const next = Math.floor(sorted[i + 1] / k);
    if (next === rank) continue;
    const nl = i + 1;
    const nr = m - nl;
    if (nl < minLeaf || nr < minLeaf) continue;
    const score = leftSquares / nl + rightSquares / nr;
    if (score > best) {
      best = score;
      bestRank = rank;
      bestNext = next;
    }
  }
  return { score: best, rank: bestRank, next: bestNext };
}

function forestScores(trees: ForestTrees, x: Matrix, classCount: number): Matrix {
  const out = new Float64Array(x.rows * classCount);
  const { roots, feature, threshold, left, right, leafValues } = trees;
  const d = x.cols;
  for (let i = 0; i < x.rows; i++) {
    const offset = i * d;
    for (let t = 0; t < roots.length; t++) {
      let node = roots[t];
      // Invariant: `node` is on the path of row i in tree t.
      while (feature[node] >= 0)
        node = x.data[offset + feature[node]] <= threshold[node] ? left[node] : right[node];
      const leaf = left[node];
      for (let c = 0; c < classCount; c++) out[i * classCount + c] += leafValues[leaf + c];
    }
    for (let c = 0; c < classCount; c++) out[i * classCount + c] /= roots.length;
  }
  return { rows: x.rows, cols: classCount, data: out };
}

function checkTrees(t: ForestTrees, features: number, classCount: number): void {
  const nodes = t.feature.length;
  for (let i = 0; i < nodes; i++) {
    const f = t.feature[i];
    const ok =
      f < 0
        ? t.left[i] >= 0 && t.left[i] + classCount <= t.leafValues.length
        : f < features && t.left[i] > i && t.left[i] < nodes && t.right[i] > i && t.right[i] < nodes;
    if (!ok) throw new UserError(`saved forest classifier has a broken node ${i}: train and save it again`);
  }
  for (const r of t.roots)
    if (!(r >= 0 && r < nodes)) throw new UserError('saved forest classifier has a broken root');
}
