import {
  type Channel,
  channelsOf,
  type Diagram,
  type DiagramSet,
  diagramOfChannel,
  finitePairs,
  type InfinitePolicy,
} from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import { quantileSorted } from './landscape-vectorizer.js';

/**
 * What the diagram vectorisers (Betti curves, persistence statistics, persistence images) share: the
 * channels learned from the training samples, the finite pairs of a channel under the essential-class
 * policy, the range rule of the landscape vectoriser per channel, and readable numbers in feature names.
 */

/** 0, 1, …, n − 1: every sample. */
export function allIndices(n: number): Int32Array {
  const a = new Int32Array(n);
  for (let i = 0; i < n; i++) a[i] = i;
  return a;
}

/** The channels of the training samples `sets[indices]` for the wanted degrees (see `channelsOf`). */
export function trainingChannels(
  sets: readonly DiagramSet[],
  indices: ArrayLike<number>,
  degrees: readonly number[],
): Channel[] {
  const chosen: DiagramSet[] = [];
  for (let r = 0; r < indices.length; r++) chosen.push(sets[indices[r]]);
  return channelsOf(chosen, degrees);
}

/** The finite pairs of one channel of a sample (essential classes dropped or clipped by `infinite`). */
export function finiteChannel(set: DiagramSet, channel: Channel, infinite: InfinitePolicy): Diagram {
  return finitePairs(diagramOfChannel(set, channel), infinite);
}

/**
 * The range rule of the landscape vectoriser, per channel, from the training pairs only: from the smallest
 * birth to the `upperQuantile` quantile of the deaths (so a few very long bars do not stretch it); [0, 1]
 * when the training samples have no finite pair in the channel.
 */
export function channelRange(
  sets: readonly DiagramSet[],
  indices: ArrayLike<number>,
  channel: Channel,
  infinite: InfinitePolicy,
  upperQuantile: number,
): { start: number; stop: number } {
  const deaths = channelValues(sets, indices, channel, infinite, 'death');
  if (deaths.length === 0) return { start: 0, stop: 1 };
  const births = channelValues(sets, indices, channel, infinite, 'birth');
  const start = births[0];
  let stop = quantileSorted(deaths, upperQuantile);
  if (!(stop > start)) stop = deaths[deaths.length - 1];
  if (!(stop > start)) stop = start + 1;
  return { start, stop };
}

/** One quantity of every finite training pair of a channel, sorted ascending. */
export function channelValues(
  sets: readonly DiagramSet[],
  indices: ArrayLike<number>,
  channel: Channel,
  infinite: InfinitePolicy,
  what: 'birth' | 'death' | 'persistence',
): Float64Array {
  const parts: Diagram[] = [];
  let total = 0;
  for (let r = 0; r < indices.length; r++) {
    const d = finiteChannel(sets[indices[r]], channel, infinite);
    parts.push(d);
    total += d.births.length;
  }
  const out = new Float64Array(total);
  let k = 0;
  for (const d of parts) {
    // Invariant: out[0..k) holds the values of the diagrams before d.
    for (let i = 0; i < d.births.length; i++) {
      out[k++] = what === 'birth' ? d.births[i] : what === 'death' ? d.deaths[i] : d.deaths[i] - d.births[i];
    }
  }
  return out.sort();
}

/** Enough decimals to tell neighbouring values `step` apart, at least 4 (as the landscape names). */
export function decimalsFor(step: number, start: number, stop: number): number {
  if (!(step > 0)) return 4;
  const needed = Math.ceil(-Math.log10(step)) + 1;
  const magnitude = Math.max(Math.abs(start), Math.abs(stop));
  return Math.min(Math.max(4, needed, magnitude < 1e-3 ? 8 : 0), 12);
}

/** Checks the options every diagram vectoriser shares; returns the degrees sorted without repeats. */
export function checkChannelOptions(
  what: string,
  degrees: readonly number[],
  upperQuantile: number,
): number[] {
  const sorted = [...new Set(degrees)].sort((a, b) => a - b);
  if (sorted.length === 0) throw new UserError('no homology degree chosen; give --degrees such as 0,1');
  for (const d of sorted)
    if (!Number.isInteger(d) || d < 0) throw new UserError(`homology degree ${d} must be a whole number ≥ 0`);
  if (!(upperQuantile > 0 && upperQuantile <= 1))
    throw new UserError(`${what}: upper quantile ${upperQuantile} must be in (0, 1]`);
  return sorted;
}

/** Checks a saved vectoriser's kind tag and format; `name` is how messages call it. */
export function checkSaved(json: unknown, kind: string, name: string): Record<string, unknown> {
  const j = json as { kind?: unknown; format?: unknown; options?: unknown; state?: unknown } | null;
  if (j?.kind !== kind) throw new UserError(`not a saved ${name} (kind tag missing or different)`);
  if (j.format !== 1)
    throw new UserError(`saved ${name} has format ${String(j.format)}; this landform reads format 1`);
  if (!j.options || !j.state) throw new UserError(`saved ${name} lacks its options or state`);
  return j as Record<string, unknown>;
}

/** A copy of channels as plain records (for state and JSON). */
export function copyChannels(channels: readonly Channel[]): Channel[] {
  return channels.map((c) =>
    c.filtration === undefined ? { degree: c.degree } : { degree: c.degree, filtration: c.filtration },
  );
}

/**
 * Copies what a vectoriser learned per channel — a channel and one plain record each (a grid, a frame) — so
 * that `toJSON` / `fromJSON` share no objects with the estimator they came from.
 */
export function copyChannelRanges<T extends { channel: Channel }>(
  entries: readonly T[],
  key: Exclude<keyof T, 'channel'>,
): T[] {
  return entries.map((e) => ({ ...e, channel: copyChannels([e.channel])[0], [key]: { ...e[key] } }) as T);
}
