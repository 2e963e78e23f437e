import type { Diagram } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import { argsortValues } from './order.js';
import { UnionFind } from './union-find.js';

/**
 * Sublevel-set persistence (H0) of a 1-D signal, as a path graph whose vertices carry the values and whose
 * edges take the larger value of their ends. Each local minimum starts a class; where two classes meet, the
 * one with the higher minimum dies (elder rule). The global minimum lives forever (death Infinity).
 *
 * Superlevel sets (`superlevel: true`) are the sublevel sets of −values, and are reported on that negated
 * scale, so death ≥ birth still holds: a peak of height 5 that merges at 3 reads birth −5, death −3.
 */
export function signalPersistence(values: Float64Array, options: { superlevel?: boolean } = {}): Diagram {
  const m = values.length;
  const f = options.superlevel ? values.map((v) => 0 - v) : values;
  for (let p = 0; p < m; p++) {
    if (!Number.isFinite(f[p]))
      throw new UserError(`signal value ${p + 1} is ${values[p]}; values must be finite numbers`);
  }
  const order = argsortValues(f);
  const uf = new UnionFind(m);
  const active = new Uint8Array(m);
  const births: number[] = [];
  const deaths: number[] = [];
  // invariant: active marks the samples at or below the current level; each root's oldest is its minimum
  for (let k = 0; k < m; k++) {
    const p = order[k];
    active[p] = 1;
    for (let side = -1; side <= 1; side += 2) {
      const q = p + side;
      if (q < 0 || q >= m || !active[q]) continue;
      const rp = uf.find(p);
      const rq = uf.find(q);
      if (rp === rq) continue;
      const op = uf.oldest[rp];
      const oq = uf.oldest[rq];
      const pOlder = f[op] < f[oq] || (f[op] === f[oq] && op < oq);
      const younger = pOlder ? oq : op;
      if (f[p] > f[younger]) {
        births.push(f[younger]);
        deaths.push(f[p]);
      }
      uf.link(rp, rq, pOlder ? op : oq);
    }
  }
  if (m > 0) {
    births.push(f[order[0]]);
    deaths.push(Infinity);
  }
  return { degree: 0, births: Float64Array.from(births), deaths: Float64Array.from(deaths) };
}

export interface DelayEmbedding {
  /** Number of coordinates per point. */
  dimension: number;
  /** Steps between coordinates of one point. */
  delay: number;
  /** Steps between consecutive points (default 1). */
  stride?: number;
}

/**
 * The delay (sliding-window) embedding: point t is (x[s], x[s + delay], …, x[s + (dimension−1)·delay]) with
 * s = t·stride, for every s whose window fits in the signal.
 */
export function delayEmbedding(
  values: Float64Array,
  embed: DelayEmbedding,
): { coords: Float64Array; count: number; dim: number } {
  const { dimension, delay } = embed;
  const stride = embed.stride ?? 1;
  for (const [name, v] of [
    ['dimension', dimension],
    ['delay', delay],
    ['stride', stride],
  ] as const) {
    if (!Number.isInteger(v) || v < 1)
      throw new UserError(`embedding ${name} ${v} must be a whole number ≥ 1`);
  }
  const span = (dimension - 1) * delay;
  if (values.length <= span) {
    throw new UserError(
      `a signal of ${values.length} values is too short for an embedding of dimension ${dimension} and delay ${delay} (needs more than ${span}); lower them`,
    );
  }
  const count = Math.floor((values.length - 1 - span) / stride) + 1;
  const coords = new Float64Array(count * dimension);
  for (let t = 0; t < count; t++) {
    const s = t * stride;
    // invariant: coordinates of points before t are written
    for (let d = 0; d < dimension; d++) coords[t * dimension + d] = values[s + d * delay];
  }
  return { coords, count, dim: dimension };
}
