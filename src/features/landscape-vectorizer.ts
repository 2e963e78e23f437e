import {
  type Channel,
  channelName,
  channelsOf,
  DEFAULT_INFINITE_POLICY,
  type DiagramSet,
  diagramOfChannel,
  finitePairs,
  type InfinitePolicy,
} from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import type { Grid } from '../landscape/grid.js';
import { sampleLandscape } from '../landscape/sampled-landscape.js';

/**
 * The landscape vectoriser: for each chosen homology degree, layers 1..K of the persistence landscape
 * (Chazal, Fasy, Lecci, Rinaldo, Wasserman, "Stochastic convergence of persistence landscapes and silhouettes", 2014) sampled at G evenly
 * spaced points of a range [start, stop]. The range of each degree is learned in `fit` from the training
 * diagrams only:
 *   start = the smallest birth of the training pairs of that degree,
 *   stop  = the `upperQuantile` (default 0.99) quantile of their deaths,
 * so a few very long bars (outliers make long H0 bars of their own) do not stretch the grid. Essential classes
 * follow `infinite` (dropped by default). An explicit `range` skips the learning.
 *
 * Feature layout: channel-major, then layer, then grid point; feature names read `H1/L2/t=0.1250`.
 * A channel is a (filtration, degree) slot (homology/diagram.ts): when each sample is filtered several ways
 * (its diagrams tagged `height:1:0`, `erosion`, …), every filtration's degree gets its own grid, learned from
 * the training diagrams of that filtration only, and names read `height:1:0/H1/L2/t=0.1250`.
 */
export interface LandscapeVectorizerOptions {
  /** Homology degrees to use, ascending. Default [0, 1]. */
  degrees?: number[];
  /** Landscape depth K: layers 1..K. Default 5. */
  depth?: number;
  /** Grid size G: points per degree and layer. Default 50. */
  gridSize?: number;
  /** Explicit range [start, stop] used for every degree instead of learning one. Default: learned. */
  range?: { start: number; stop: number };
  /** Essential classes (death = +Infinity): 'drop' (default) or clip to a value. */
  infinite?: InfinitePolicy;
  /** Quantile of the training deaths used as the grid's stop. Default 0.99. */
  upperQuantile?: number;
  /** Centre each feature and divide by its training standard deviation. Default false. */
  standardize?: boolean;
}

export const DEFAULT_LANDSCAPE_VECTORIZER_OPTIONS = {
  degrees: [0, 1],
  depth: 5,
  gridSize: 50,
  infinite: DEFAULT_INFINITE_POLICY,
  upperQuantile: 0.99,
  standardize: false,
} as const;

/** Where one feature comes from on the landscape's axes. */
export interface FeatureLocation {
  degree: number;
  /** The filtration of the feature's channel, when samples were filtered several ways. */
  filtration?: string;
  /** Layer k, 1-based. */
  layer: number;
  /** The scale value t of the grid point. */
  t: number;
}

/** The grid of one channel: untagged (`filtration` absent) for the single-filtration case. */
export interface ChannelGrid {
  degree: number;
  filtration?: string;
  grid: Grid;
}

export interface LandscapeVectorizerState {
  /** One grid per channel: filtration-major, then the degrees in the order of `degrees`. */
  grids: ChannelGrid[];
  /** Per-feature mean and standard deviation when standardising. */
  means?: Float64Array;
  scales?: Float64Array;
}

export interface LandscapeVectorizerJSON {
  kind: 'landform.landscape-vectorizer';
  format: 1;
  options: {
    degrees: number[];
    depth: number;
    gridSize: number;
    range?: { start: number; stop: number };
    infinite: InfinitePolicy;
    upperQuantile: number;
    standardize: boolean;
  };
  state: { grids: ChannelGrid[]; means?: number[]; scales?: number[] };
}

export class LandscapeVectorizer {
  readonly degrees: number[];
  readonly depth: number;
  readonly gridSize: number;
  readonly range?: { start: number; stop: number };
  readonly infinite: InfinitePolicy;
  readonly upperQuantile: number;
  readonly standardize: boolean;
  state?: LandscapeVectorizerState;

  constructor(options: LandscapeVectorizerOptions = {}) {
    const o = { ...DEFAULT_LANDSCAPE_VECTORIZER_OPTIONS, ...options };
    this.degrees = [...new Set(o.degrees)].sort((a, b) => a - b);
    this.depth = o.depth;
    this.gridSize = o.gridSize;
    this.range = o.range;
    this.infinite = o.infinite;
    this.upperQuantile = o.upperQuantile;
    this.standardize = o.standardize;
    if (this.degrees.length === 0)
      throw new UserError('no homology degree chosen; give --degrees such as 0,1');
    if (!Number.isInteger(this.depth) || this.depth < 1)
      throw new UserError(`landscape depth ${this.depth} must be a whole number ≥ 1`);
    if (!Number.isInteger(this.gridSize) || this.gridSize < 2)
      throw new UserError(`grid size ${this.gridSize} must be a whole number ≥ 2`);
    if (this.range && !(this.range.stop > this.range.start))
      throw new UserError('the grid range needs stop > start');
    if (!(this.upperQuantile > 0 && this.upperQuantile <= 1))
      throw new Error('upperQuantile must be in (0, 1]');
  }

  /** A copy with some options changed (used by the inner cross-validation over K and G). */
  with(options: LandscapeVectorizerOptions): LandscapeVectorizer {
    return new LandscapeVectorizer({ ...this.options(), ...options });
  }

  options(): Required<Omit<LandscapeVectorizerOptions, 'range'>> & {
    range?: { start: number; stop: number };
  } {
    return {
      degrees: [...this.degrees],
      depth: this.depth,
      gridSize: this.gridSize,
      ...(this.range ? { range: { ...this.range } } : {}),
      infinite: this.infinite,
      upperQuantile: this.upperQuantile,
      standardize: this.standardize,
    };
  }

  /** Columns: channels × depth × grid size (before `fit`, one channel per degree is assumed). */
  get featureCount(): number {
    const channels = this.state ? this.state.grids.length : this.degrees.length;
    return channels * this.depth * this.gridSize;
  }

  /**
   * Learns the channels met in `sets[indices]` and each channel's grid range (and the standardisation) from
   * those sets only.
   */
  fit(sets: readonly DiagramSet[], indices?: ArrayLike<number>): this {
    const chosen = indices ?? identity(sets.length);
    const training: DiagramSet[] = [];
    for (let r = 0; r < chosen.length; r++) training.push(sets[chosen[r]]);
    const grids: ChannelGrid[] = channelsOf(training, this.degrees).map((channel) => ({
      ...channel,
      grid: this.range
        ? { start: this.range.start, stop: this.range.stop, count: this.gridSize }
        : learnGrid(sets, chosen, channel, this.infinite, this.upperQuantile, this.gridSize),
    }));
    this.state = { grids };
    if (this.standardize) {
      const raw = this.sampleAll(sets, chosen, grids);
      const { means, scales } = columnMoments(raw);
      this.state = { grids, means, scales };
    }
    return this;
  }

  /** The feature vectors of `sets[indices]` (all sets by default), one row each. Uses only the fitted state. */
  transform(sets: readonly DiagramSet[], indices?: ArrayLike<number>): Matrix {
    const state = this.fitted();
    const chosen = indices ?? identity(sets.length);
    checkChannels(sets, chosen, state.grids, this.degrees);
    const m = this.sampleAll(sets, chosen, state.grids);
    if (state.means && state.scales) applyStandardization(m, state.means, state.scales);
    return m;
  }

  fitTransform(sets: readonly DiagramSet[], indices?: ArrayLike<number>): Matrix {
    return this.fit(sets, indices).transform(sets, indices);
  }

  /** The fitted channels, in feature order. */
  channels(): Channel[] {
    return this.fitted().grids.map(({ degree, filtration }) =>
      filtration === undefined ? { degree } : { degree, filtration },
    );
  }

  /** Readable names, e.g. `H1/L2/t=0.1250` or `erosion/H1/L2/t=0.1250`, in feature order. */
  featureNames(): string[] {
    const state = this.fitted();
    const names: string[] = [];
    for (const channel of state.grids) {
      const { grid } = channel;
      const step = (grid.stop - grid.start) / (grid.count - 1);
      const decimals = decimalsFor(step, grid.start, grid.stop);
      const prefix = channelName(channel);
      for (let layer = 1; layer <= this.depth; layer++) {
        for (let j = 0; j < grid.count; j++)
          names.push(`${prefix}/L${layer}/t=${gridValue(grid, j).toFixed(decimals)}`);
      }
    }
    return names;
  }

  /** The (filtration, degree, layer, t) of feature `index`, from the fitted grids. */
  locate(index: number): FeatureLocation {
    const state = this.fitted();
    const perChannel = this.depth * this.gridSize;
    if (!(index >= 0 && index < this.featureCount)) throw new RangeError(`feature ${index} out of range`);
    const { degree, filtration, grid } = state.grids[Math.floor(index / perChannel)];
    const within = index % perChannel;
    return {
      degree,
      ...(filtration !== undefined ? { filtration } : {}),
      layer: Math.floor(within / this.gridSize) + 1,
      t: gridValue(grid, within % this.gridSize),
    };
  }

  toJSON(): LandscapeVectorizerJSON {
    const state = this.fitted();
    return {
      kind: 'landform.landscape-vectorizer',
      format: 1,
      options: {
        degrees: [...this.degrees],
        depth: this.depth,
        gridSize: this.gridSize,
        ...(this.range ? { range: { ...this.range } } : {}),
        infinite: this.infinite,
        upperQuantile: this.upperQuantile,
        standardize: this.standardize,
      },
      state: {
        grids: state.grids.map(copyChannelGrid),
        ...(state.means && state.scales ? { means: [...state.means], scales: [...state.scales] } : {}),
      },
    };
  }

  static fromJSON(json: unknown): LandscapeVectorizer {
    const j = json as Partial<LandscapeVectorizerJSON> | null;
    if (j?.kind !== 'landform.landscape-vectorizer')
      throw new UserError('not a saved landscape vectoriser (kind tag missing or different)');
    if (j.format !== 1)
      throw new UserError(
        `saved landscape vectoriser has format ${String(j.format)}; this landform reads format 1`,
      );
    if (!j.options || !j.state) throw new UserError('saved landscape vectoriser lacks its options or state');
    const v = new LandscapeVectorizer(j.options);
    v.state = {
      grids: j.state.grids.map(copyChannelGrid),
      ...(j.state.means && j.state.scales
        ? { means: Float64Array.from(j.state.means), scales: Float64Array.from(j.state.scales) }
        : {}),
    };
    return v;
  }

  private fitted(): LandscapeVectorizerState {
    if (!this.state) throw new Error('LandscapeVectorizer: call fit() before transform()');
    return this.state;
  }

  private sampleAll(
    sets: readonly DiagramSet[],
    indices: ArrayLike<number>,
    grids: LandscapeVectorizerState['grids'],
  ): Matrix {
    const cols = this.featureCount;
    const data = new Float64Array(indices.length * cols);
    const block = this.depth * this.gridSize;
    // Invariant: row r holds the features of sets[indices[r]], degree d's block at offset r·cols + d·K·G.
    for (let r = 0; r < indices.length; r++) {
      const set = sets[indices[r]];
      for (let d = 0; d < grids.length; d++) {
        const diagram = finitePairs(diagramOfChannel(set, grids[d]), this.infinite);
        sampleLandscape(diagram, grids[d].grid, this.depth, data, r * cols + d * block);
      }
    }
    return { rows: indices.length, cols, data };
  }
}

/**
 * Refuses a sample whose diagrams come from a filtration the vectoriser was not fitted on (its features would
 * silently be empty): e.g. a diagrams file made with other `--filtration` settings than the model's.
 */
function checkChannels(
  sets: readonly DiagramSet[],
  indices: ArrayLike<number>,
  grids: readonly ChannelGrid[],
  degrees: readonly number[],
): void {
  const known = new Set(grids.map((g) => g.filtration ?? ''));
  for (let r = 0; r < indices.length; r++) {
    const set = sets[indices[r]];
    for (const d of set.diagrams) {
      if (!degrees.includes(d.degree) || known.has(d.filtration ?? '')) continue;
      const expected = [...known].map((k) => (k === '' ? 'one unnamed filtration' : k)).join(', ');
      throw new UserError(
        `sample '${set.sample}' has ${d.filtration === undefined ? 'untagged diagrams' : `diagrams of filtration '${d.filtration}'`}, but the features were fitted on ${expected}; compute its diagrams with the same --filtration`,
      );
    }
  }
}

function copyChannelGrid(g: ChannelGrid): ChannelGrid {
  return {
    degree: g.degree,
    ...(g.filtration !== undefined ? { filtration: g.filtration } : {}),
    grid: { ...g.grid },
  };
}

function identity(n: number): Int32Array {
  const a = new Int32Array(n);
  for (let i = 0; i < n; i++) a[i] = i;
  return a;
}

function gridValue(grid: Grid, j: number): number {
  return grid.start + ((grid.stop - grid.start) * j) / (grid.count - 1);
}

/** Enough decimals to tell neighbouring grid points apart, at least 4. */
function decimalsFor(step: number, start: number, stop: number): number {
  if (!(step > 0)) return 4;
  const needed = Math.ceil(-Math.log10(step)) + 1;
  const magnitude = Math.max(Math.abs(start), Math.abs(stop));
  return Math.min(Math.max(4, needed, magnitude < 1e-3 ? 8 : 0), 12);
}

/**
 * The grid of one channel (a degree, or a filtration's degree) learned from the training pairs:
 * [min birth, quantile of deaths].
 */
export function learnGrid(
  sets: readonly DiagramSet[],
  indices: ArrayLike<number>,
  channel: number | Channel,
  infinite: InfinitePolicy,
  upperQuantile: number,
  count: number,
): Grid {
  const slot: Channel = typeof channel === 'number' ? { degree: channel } : channel;
  let total = 0;
  const finite = [];
  for (let r = 0; r < indices.length; r++) {
    const d = finitePairs(diagramOfChannel(sets[indices[r]], slot), infinite);
    finite.push(d);
    total += d.births.length;
  }
  if (total === 0) return { start: 0, stop: 1, count };
  const deaths = new Float64Array(total);
  let start = Infinity;
  let k = 0;
  for (const d of finite) {
    // Invariant: deaths[0..k) holds the deaths of the diagrams seen so far; start is their smallest birth.
    for (let i = 0; i < d.births.length; i++) {
      if (d.births[i] < start) start = d.births[i];
      deaths[k++] = d.deaths[i];
    }
  }
  deaths.sort();
  let stop = quantileSorted(deaths, upperQuantile);
  if (!(stop > start)) stop = deaths[deaths.length - 1];
  if (!(stop > start)) stop = start + 1;
  return { start, stop, count };
}

/** Linear-interpolation quantile of sorted values (the usual "type 7" definition; Hyndman & Fan, 1996). */
export function quantileSorted(sorted: ArrayLike<number>, q: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, n - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** Per-column mean and standard deviation (population); a constant column gets scale 1. */
export function columnMoments(m: Matrix): { means: Float64Array; scales: Float64Array } {
  const means = new Float64Array(m.cols);
  const scales = new Float64Array(m.cols);
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < m.cols; j++) means[j] += m.data[i * m.cols + j];
  for (let j = 0; j < m.cols; j++) means[j] /= Math.max(1, m.rows);
  for (let i = 0; i < m.rows; i++) {
    for (let j = 0; j < m.cols; j++) scales[j] += (m.data[i * m.cols + j] - means[j]) ** 2;
  }
  for (let j = 0; j < m.cols; j++) {
    const s = Math.sqrt(scales[j] / Math.max(1, m.rows));
    scales[j] = s > 1e-12 ? s : 1;
  }
  return { means, scales };
}

export function applyStandardization(m: Matrix, means: Float64Array, scales: Float64Array): void {
  // Invariant: entries before (i, j) are already centred and scaled.
  for (let i = 0; i < m.rows; i++) {
    for (let j = 0; j < m.cols; j++) m.data[i * m.cols + j] = (m.data[i * m.cols + j] - means[j]) / scales[j];
  }
}

/**
 * Parses a landscape feature name such as `H1/L2/t=0.1250` or `height:1:0/H1/L2/t=0.1250`; undefined when it
 * is not one.
 */
export function parseLandscapeFeatureName(name: string): FeatureLocation | undefined {
  const m = /^(?:(.+)\/)?H(\d+)\/L(\d+)\/t=(-?[0-9.]+(?:e[+-]?\d+)?)$/.exec(name);
  if (!m) return undefined;
  return {
    degree: Number(m[2]),
    ...(m[1] !== undefined ? { filtration: m[1] } : {}),
    layer: Number(m[3]),
    t: Number(m[4]),
  };
}
