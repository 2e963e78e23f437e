/**
 * Persistence diagrams as plain data: a diagram of one homology degree is two parallel Float64Arrays
 * (struct of arrays). A death of +Infinity marks an essential class.
 */
export interface PersistencePair {
  birth: number;
  death: number;
}

export interface Diagram {
  degree: number;
  births: Float64Array;
  deaths: Float64Array;
  /**
   * The filtration that made it, when a sample is filtered several ways (e.g. 'height:1:0' for an image);
   * absent when the sample has one filtration. Together with the degree it names the diagram's channel.
   */
  filtration?: string;
}

/**
 * The diagrams of one sample, one per degree in increasing degree; with several filtrations, one per
 * (filtration, degree), filtration-major in the order the filtrations were asked for.
 */
export interface DiagramSet {
  sample: string;
  label: string;
  diagrams: Diagram[];
}

export function makeDiagram(
  degree: number,
  pairs: ArrayLike<PersistencePair> | Array<[number, number]>,
): Diagram {
  const n = pairs.length;
  const births = new Float64Array(n);
  const deaths = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const p = (pairs as ArrayLike<unknown>)[i];
    if (Array.isArray(p)) {
      births[i] = p[0];
      deaths[i] = p[1];
    } else {
      births[i] = (p as PersistencePair).birth;
      deaths[i] = (p as PersistencePair).death;
    }
  }
  return { degree, births, deaths };
}

export function emptyDiagram(degree: number): Diagram {
  return { degree, births: new Float64Array(0), deaths: new Float64Array(0) };
}

export function pairCount(diagram: Diagram): number {
  return diagram.births.length;
}

export function toPairs(diagram: Diagram): PersistencePair[] {
  const out: PersistencePair[] = [];
  for (let i = 0; i < diagram.births.length; i++)
    out.push({ birth: diagram.births[i], death: diagram.deaths[i] });
  return out;
}

/** The diagram of `degree` in a set, or an empty one when the set has none of that degree. */
export function diagramOfDegree(set: DiagramSet, degree: number): Diagram {
  return set.diagrams.find((d) => d.degree === degree) ?? emptyDiagram(degree);
}

/**
 * A channel is one (filtration, degree) slot of every sample's diagrams. A study with one filtration has one
 * channel per degree; with F filtrations it has F × degrees, and every vectoriser learns its grid (range) per
 * channel inside the training fold.
 */
export interface Channel {
  degree: number;
  /** Absent for the single-filtration case. */
  filtration?: string;
}

/**
 * The channels of `sets` for the wanted degrees: each filtration tag in the order first met (untagged
 * diagrams first), then the degrees in increasing order. With no diagram of any tag, one untagged channel
 * per degree (so an empty training set still has its channels).
 */
export function channelsOf(sets: readonly DiagramSet[], degrees: readonly number[]): Channel[] {
  const tags: Array<string | undefined> = [];
  for (const set of sets) {
    for (const d of set.diagrams) if (!tags.includes(d.filtration)) tags.push(d.filtration);
  }
  if (tags.length === 0) tags.push(undefined);
  tags.sort((a, b) => (a === undefined ? -1 : b === undefined ? 1 : 0));
  const sorted = [...new Set(degrees)].sort((a, b) => a - b);
  const out: Channel[] = [];
  for (const filtration of tags)
    for (const degree of sorted) out.push(filtration === undefined ? { degree } : { degree, filtration });
  return out;
}

/** The diagram of a channel in a set, or an empty one (tagged like the channel) when the set has none. */
export function diagramOfChannel(set: DiagramSet, channel: Channel): Diagram {
  const found = set.diagrams.find((d) => d.degree === channel.degree && d.filtration === channel.filtration);
  if (found) return found;
  const empty = emptyDiagram(channel.degree);
  return channel.filtration === undefined ? empty : { ...empty, filtration: channel.filtration };
}

/** A degree alone is the untagged channel of that degree. */
export function asChannel(slot: number | Channel): Channel {
  return typeof slot === 'number' ? { degree: slot } : slot;
}

/** 'H1' for an untagged channel, 'height:1:0/H1' for a tagged one: the prefix of feature names. */
export function channelName(channel: Channel): string {
  return channel.filtration === undefined ? `H${channel.degree}` : `${channel.filtration}/H${channel.degree}`;
}

/** Keeps the pairs whose persistence (death − birth) is at least `minimum`; essential classes always pass. */
export function filterByPersistence(diagram: Diagram, minimum: number): Diagram {
  return selectPairs(diagram, (b, d) => d - b >= minimum);
}

export function filterByDegree(set: DiagramSet, degrees: readonly number[]): DiagramSet {
  return { ...set, diagrams: set.diagrams.filter((d) => degrees.includes(d.degree)) };
}

/**
 * What to do with essential classes (death = +Infinity) before computing landscapes, which need finite
 * pairs: drop them (the default), or clip their death to a fixed value.
 */
export type InfinitePolicy = { mode: 'drop' } | { mode: 'clip'; value: number };

export const DEFAULT_INFINITE_POLICY: InfinitePolicy = { mode: 'drop' };

export function describeInfinitePolicy(policy: InfinitePolicy): string {
  return policy.mode === 'drop' ? 'drop' : `clip:${policy.value}`;
}

/** Applies the essential-class policy; the result has only finite deaths. Pairs clipped to ≤ birth vanish. */
export function finitePairs(diagram: Diagram, policy: InfinitePolicy = DEFAULT_INFINITE_POLICY): Diagram {
  let hasInfinite = false;
  for (let i = 0; i < diagram.deaths.length; i++) if (diagram.deaths[i] === Infinity) hasInfinite = true;
  if (!hasInfinite) return diagram;
  if (policy.mode === 'drop') return selectPairs(diagram, (_b, d) => d !== Infinity);
  const clipped = selectPairs(diagram, (b, d) => d !== Infinity || policy.value > b);
  for (let i = 0; i < clipped.deaths.length; i++)
    if (clipped.deaths[i] === Infinity) clipped.deaths[i] = policy.value;
  return clipped;
}

function selectPairs(diagram: Diagram, keep: (birth: number, death: number) => boolean): Diagram {
  let count = 0;
  const n = diagram.births.length;
  const mask = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    if (keep(diagram.births[i], diagram.deaths[i])) {
      mask[i] = 1;
      count++;
    }
  }
  const births = new Float64Array(count);
  const deaths = new Float64Array(count);
  for (let i = 0, j = 0; i < n; i++) {
    if (mask[i]) {
      births[j] = diagram.births[i];
      deaths[j] = diagram.deaths[i];
      j++;
    }
  }
  return { degree: diagram.degree, births, deaths };
}

/** Parses `drop` or `clip:VALUE`; returns undefined when the text is neither. */
export function parseInfinitePolicy(text: string): InfinitePolicy | undefined {
  if (text === 'drop') return { mode: 'drop' };
  const m = /^clip:(.+)$/.exec(text);
  if (m) {
    const value = Number(m[1]);
    if (Number.isFinite(value)) return { mode: 'clip', value };
  }
  return undefined;
}
