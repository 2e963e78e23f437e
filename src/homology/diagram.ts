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
}

/** The diagrams of one sample, one per degree, in increasing degree. */
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
