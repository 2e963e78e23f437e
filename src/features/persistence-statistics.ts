import {
  type Channel,
  channelName,
  DEFAULT_INFINITE_POLICY,
  type DiagramSet,
  type InfinitePolicy,
} from '../core/diagram.js';
import type { Matrix } from '../core/matrix.js';
import {
  allIndices,
  checkChannelOptions,
  checkSaved,
  copyChannels,
  finiteChannel,
  trainingChannels,
} from './diagram-channels.js';
import { quantileSorted } from './landscape-vectorizer.js';

/**
 * Persistence statistics: per channel a fixed list of summaries of the finite pairs —
 *   count                      the number of pairs,
 *   for each of lifetime (death − birth), birth, death and midpoint ((birth + death) / 2):
 *     mean, std (population), min, q25, median, q75, max   (quantiles: type 7, Hyndman & Fan, 1996),
 *   total                      total persistence Σ (death − birth),
 *   entropy                    persistent entropy E = −Σ p_i ln p_i with p_i = (d_i − b_i) / Σ (d_j − b_j)
 *                              (Rucco, Castiglione, Merelli, Pettini, "Characterisation of the idiotypic
 *                              immune network through persistent entropy", 2016; natural logarithm, 0 ln 0 = 0),
 *   entropyRatio               E / ln(count), in [0, 1] (1 when all lifetimes are equal; 0 for count ≤ 1).
 * An empty channel gives zeros. Only the channels are learned in `fit` (from the training samples); the
 * statistics of a sample depend on that sample alone. Essential classes follow `infinite` (dropped by default).
 *
 * Feature layout: channel-major, then the list above; names read `H1/lifetime/mean`, `H0/entropy`.
 */
export interface PersistenceStatisticsOptions {
  /** Homology degrees to use. Default [0, 1]. */
  degrees?: number[];
  /** Essential classes: 'drop' (default) or clip to a value. */
  infinite?: InfinitePolicy;
}

export const DEFAULT_PERSISTENCE_STATISTICS_OPTIONS = {
  degrees: [0, 1],
  infinite: DEFAULT_INFINITE_POLICY,
} as const;

const QUANTITIES = ['lifetime', 'birth', 'death', 'midpoint'] as const;
const SUMMARIES = ['mean', 'std', 'min', 'q25', 'median', 'q75', 'max'] as const;

/** The statistic names of one channel, in feature order. */
export const STATISTIC_NAMES: readonly string[] = [
  'count',
  ...QUANTITIES.flatMap((q) => SUMMARIES.map((s) => `${q}/${s}`)),
  'total',
  'entropy',
  'entropyRatio',
];

export interface PersistenceStatisticsJSON {
  kind: 'landform.persistence-statistics';
  format: 1;
  options: { degrees: number[]; infinite: InfinitePolicy };
  state: { channels: Channel[] };
}

export class PersistenceStatistics {
  readonly degrees: number[];
  readonly infinite: InfinitePolicy;
  state?: { channels: Channel[] };

  constructor(options: PersistenceStatisticsOptions = {}) {
    const o = { ...DEFAULT_PERSISTENCE_STATISTICS_OPTIONS, ...options };
    this.degrees = checkChannelOptions('persistence statistics', o.degrees, 1);
    this.infinite = o.infinite;
  }

  options(): PersistenceStatisticsJSON['options'] {
    return { degrees: [...this.degrees], infinite: this.infinite };
  }

  with(options: PersistenceStatisticsOptions): PersistenceStatistics {
    return new PersistenceStatistics({ ...this.options(), ...options });
  }

  /** Learns the channels from `sets[indices]` only. */
  fit(sets: readonly DiagramSet[], indices?: ArrayLike<number>): this {
    this.state = { channels: trainingChannels(sets, indices ?? allIndices(sets.length), this.degrees) };
    return this;
  }

  transform(sets: readonly DiagramSet[], indices?: ArrayLike<number>): Matrix {
    const { channels } = this.fitted();
    const chosen = indices ?? allIndices(sets.length);
    const per = STATISTIC_NAMES.length;
    const cols = channels.length * per;
    const data = new Float64Array(chosen.length * cols);
    for (let r = 0; r < chosen.length; r++) {
      for (let c = 0; c < channels.length; c++) {
        const d = finiteChannel(sets[chosen[r]], channels[c], this.infinite);
        statisticsInto(d.births, d.deaths, data, r * cols + c * per);
      }
    }
    return { rows: chosen.length, cols, data };
  }

  fitTransform(sets: readonly DiagramSet[], indices?: ArrayLike<number>): Matrix {
    return this.fit(sets, indices).transform(sets, indices);
  }

  featureNames(): string[] {
    const names: string[] = [];
    for (const channel of this.fitted().channels) {
      const prefix = channelName(channel);
      for (const s of STATISTIC_NAMES) names.push(`${prefix}/${s}`);
    }
    return names;
  }

  toJSON(): PersistenceStatisticsJSON {
    return {
      kind: 'landform.persistence-statistics',
      format: 1,
      options: this.options(),
      state: { channels: copyChannels(this.fitted().channels) },
    };
  }

  static fromJSON(json: unknown): PersistenceStatistics {
    const j = checkSaved(
      json,
      'landform.persistence-statistics',
      'persistence statistics',
    ) as unknown as PersistenceStatisticsJSON;
    const v = new PersistenceStatistics(j.options);
    v.state = { channels: copyChannels(j.state.channels) };
    return v;
  }

  private fitted(): { channels: Channel[] } {
    if (!this.state) throw new Error('PersistenceStatistics: call fit() before transform()');
    return this.state;
  }
}

/** Persistent entropy −Σ p_i ln p_i, p_i = ℓ_i / Σ ℓ (Rucco et al. 2016); 0 when the total is 0. */
export function persistentEntropy(births: Float64Array, deaths: Float64Array): number {
  let total = 0;
  for (let i = 0; i < births.length; i++) total += deaths[i] - births[i];
  if (!(total > 0)) return 0;
  let e = 0;
  for (let i = 0; i < births.length; i++) {
    const p = (deaths[i] - births[i]) / total;
    if (p > 0) e -= p * Math.log(p);
  }
  return e;
}

/** Writes the statistics of one diagram (STATISTIC_NAMES order) into `out` at `offset`. */
export function statisticsInto(
  births: Float64Array,
  deaths: Float64Array,
  out: Float64Array,
  offset: number,
): void {
  const n = births.length;
  if (n === 0) {
    out.fill(0, offset, offset + STATISTIC_NAMES.length);
    return;
  }
  let k = offset;
  out[k++] = n;
  const values = new Float64Array(n);
  let total = 0;
  for (let q = 0; q < QUANTITIES.length; q++) {
    // Invariant: values holds quantity q of every pair; out[offset..k) the summaries written so far.
    for (let i = 0; i < n; i++) {
      const b = births[i];
      const d = deaths[i];
      values[i] = q === 0 ? d - b : q === 1 ? b : q === 2 ? d : (b + d) / 2;
    }
    let sum = 0;
    for (let i = 0; i < n; i++) sum += values[i];
    if (q === 0) total = sum;
    const mean = sum / n;
    let squares = 0;
    for (let i = 0; i < n; i++) squares += (values[i] - mean) ** 2;
    values.sort();
    out[k++] = mean;
    out[k++] = Math.sqrt(squares / n);
    out[k++] = values[0];
    out[k++] = quantileSorted(values, 0.25);
    out[k++] = quantileSorted(values, 0.5);
    out[k++] = quantileSorted(values, 0.75);
    out[k++] = values[n - 1];
  }
  const entropy = persistentEntropy(births, deaths);
  out[k++] = total;
  out[k++] = entropy;
  out[k++] = n > 1 ? entropy / Math.log(n) : 0;
}
