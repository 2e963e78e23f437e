import {
  type Channel,
  channelName,
  DEFAULT_INFINITE_POLICY,
  type DiagramSet,
  type InfinitePolicy,
} from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import type { Grid } from '../landscape/grid.js';
import {
  allIndices,
  channelRange,
  checkChannelOptions,
  checkSaved,
  copyChannelRanges,
  decimalsFor,
  finiteChannel,
  trainingChannels,
} from './diagram-channels.js';

/**
 * Betti curves: for each channel, β(t) = the number of pairs with birth ≤ t < death (the rank of the
 * homology of the filtration's complex at scale t, by the structure theorem of persistence: Zomorodian &
 * Carlsson, "Computing persistent homology", 2005), sampled at G evenly spaced points of a range learned in
 * `fit` per channel from the training diagrams only, by the landscape vectoriser's rule: from the smallest
 * birth to the `upperQuantile` quantile of the deaths. Essential classes follow `infinite` (dropped by
 * default; clipped ones count up to their clip value).
 *
 * Feature layout: channel-major, then grid point; names read `H1/betti/t=0.2500`.
 */
export interface BettiCurveOptions {
  /** Homology degrees to use. Default [0, 1]. */
  degrees?: number[];
  /** Grid size G: points per channel. Default 50. */
  gridSize?: number;
  /** Explicit range [start, stop] for every channel instead of learning one. Default: learned. */
  range?: { start: number; stop: number };
  /** Essential classes: 'drop' (default) or clip to a value. */
  infinite?: InfinitePolicy;
  /** Quantile of the training deaths used as the grid's stop. Default 0.99. */
  upperQuantile?: number;
}

export const DEFAULT_BETTI_CURVE_OPTIONS = {
  degrees: [0, 1],
  gridSize: 50,
  infinite: DEFAULT_INFINITE_POLICY,
  upperQuantile: 0.99,
} as const;

export interface BettiCurveState {
  /** One grid per channel learned from the training samples, in feature order. */
  grids: Array<{ channel: Channel; grid: Grid }>;
}

export interface BettiCurveJSON {
  kind: 'landform.betti-curves';
  format: 1;
  options: {
    degrees: number[];
    gridSize: number;
    range?: { start: number; stop: number };
    infinite: InfinitePolicy;
    upperQuantile: number;
  };
  state: { grids: Array<{ channel: Channel; grid: Grid }> };
}

export class BettiCurveVectorizer {
  readonly degrees: number[];
  readonly gridSize: number;
  readonly range?: { start: number; stop: number };
  readonly infinite: InfinitePolicy;
  readonly upperQuantile: number;
  state?: BettiCurveState;

  constructor(options: BettiCurveOptions = {}) {
    const o = { ...DEFAULT_BETTI_CURVE_OPTIONS, ...options };
    this.degrees = checkChannelOptions('Betti curves', o.degrees, o.upperQuantile);
    this.gridSize = o.gridSize;
    this.range = o.range;
    this.infinite = o.infinite;
    this.upperQuantile = o.upperQuantile;
    if (!Number.isInteger(this.gridSize) || this.gridSize < 2)
      throw new UserError(`Betti curve grid size ${this.gridSize} must be a whole number ≥ 2`);
    if (this.range && !(this.range.stop > this.range.start))
      throw new UserError('the Betti curve range needs stop > start');
  }

  options(): BettiCurveJSON['options'] {
    return {
      degrees: [...this.degrees],
      gridSize: this.gridSize,
      ...(this.range ? { range: { ...this.range } } : {}),
      infinite: this.infinite,
      upperQuantile: this.upperQuantile,
    };
  }

  /** A copy with some options changed. */
  with(options: BettiCurveOptions): BettiCurveVectorizer {
    return new BettiCurveVectorizer({ ...this.options(), ...options });
  }

  /** Learns the channels and each channel's grid range from `sets[indices]` only. */
  fit(sets: readonly DiagramSet[], indices?: ArrayLike<number>): this {
    const chosen = indices ?? allIndices(sets.length);
    const channels = trainingChannels(sets, chosen, this.degrees);
    this.state = {
      grids: channels.map((channel) => {
        const r = this.range ?? channelRange(sets, chosen, channel, this.infinite, this.upperQuantile);
        return { channel, grid: { start: r.start, stop: r.stop, count: this.gridSize } };
      }),
    };
    return this;
  }

  /** The Betti curves of `sets[indices]` (all by default), one row each. Uses only the fitted state. */
  transform(sets: readonly DiagramSet[], indices?: ArrayLike<number>): Matrix {
    const { grids } = this.fitted();
    const chosen = indices ?? allIndices(sets.length);
    const G = this.gridSize;
    const cols = grids.length * G;
    const data = new Float64Array(chosen.length * cols);
    const points = grids.map((g) => gridPoints(g.grid));
    for (let r = 0; r < chosen.length; r++) {
      const set = sets[chosen[r]];
      for (let c = 0; c < grids.length; c++) {
        const d = finiteChannel(set, grids[c].channel, this.infinite);
        bettiCurveInto(d.births, d.deaths, points[c], data, r * cols + c * G);
      }
    }
    return { rows: chosen.length, cols, data };
  }

  fitTransform(sets: readonly DiagramSet[], indices?: ArrayLike<number>): Matrix {
    return this.fit(sets, indices).transform(sets, indices);
  }

  featureNames(): string[] {
    const names: string[] = [];
    for (const { channel, grid } of this.fitted().grids) {
      const points = gridPoints(grid);
      const decimals = decimalsFor((grid.stop - grid.start) / (grid.count - 1), grid.start, grid.stop);
      const prefix = channelName(channel);
      for (const t of points) names.push(`${prefix}/betti/t=${t.toFixed(decimals)}`);
    }
    return names;
  }

  toJSON(): BettiCurveJSON {
    return {
      kind: 'landform.betti-curves',
      format: 1,
      options: this.options(),
      state: {
        grids: copyChannelRanges(this.fitted().grids, 'grid'),
      },
    };
  }

  static fromJSON(json: unknown): BettiCurveVectorizer {
    const j = checkSaved(
      json,
      'landform.betti-curves',
      'Betti curve vectoriser',
    ) as unknown as BettiCurveJSON;
    const v = new BettiCurveVectorizer(j.options);
    v.state = {
      grids: copyChannelRanges(j.state.grids, 'grid'),
    };
    return v;
  }

  private fitted(): BettiCurveState {
    if (!this.state) throw new Error('BettiCurveVectorizer: call fit() before transform()');
    return this.state;
  }
}

/** The grid's points t_j = start + (stop − start)·j/(count − 1), both ends included. */
export function gridPoints(grid: Grid): Float64Array {
  const t = new Float64Array(grid.count);
  for (let j = 0; j < grid.count; j++) t[j] = grid.start + ((grid.stop - grid.start) * j) / (grid.count - 1);
  return t;
}

/**
 * Writes β(t_j) = #{i : b_i ≤ t_j < d_i} for every grid point into `out` at `offset`. Each pair adds +1 at
 * the first point ≥ its birth and −1 at the first point ≥ its death; a running sum then gives the counts.
 * out[offset .. offset + t.length) must be zero on entry.
 */
export function bettiCurveInto(
  births: Float64Array,
  deaths: Float64Array,
  t: Float64Array,
  out: Float64Array,
  offset: number,
): void {
  const G = t.length;
  // out[offset + j] holds, until the sum below, the net count of intervals starting at point j.
  for (let i = 0; i < births.length; i++) {
    const from = firstAtLeast(t, births[i]);
    const to = firstAtLeast(t, deaths[i]);
    if (from >= to) continue;
    out[offset + from] += 1;
    if (to < G) out[offset + to] -= 1;
  }
  let running = 0;
  for (let j = 0; j < G; j++) {
    running += out[offset + j];
    out[offset + j] = running;
  }
}

/** The first index j with t[j] ≥ v (t.length when none). */
function firstAtLeast(t: Float64Array, v: number): number {
  let lo = 0;
  let hi = t.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (t[mid] < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
