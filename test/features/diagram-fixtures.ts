// Shared invented diagram sets for the vectoriser tests (leak and round-trip checks). Not a test file itself.

import { type DiagramSet, makeDiagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';

export function set(id: string, h0: Array<[number, number]>, h1: Array<[number, number]>): DiagramSet {
  return { sample: id, label: 'x', diagrams: [makeDiagram(0, h0), makeDiagram(1, h1)] };
}

/** n sets of H0 (20 finite bars and one essential class) and H1 (5 bars), all lengths times `scale`. */
export function randomSets(n: number, seed: number, scale = 1): DiagramSet[] {
  const r = new Random(seed);
  const out: DiagramSet[] = [];
  for (let s = 0; s < n; s++) {
    const h0: Array<[number, number]> = [];
    const h1: Array<[number, number]> = [];
    for (let i = 0; i < 20; i++) h0.push([0, scale * r.uniform(0.05, 1)]);
    h0.push([0, Infinity]);
    for (let i = 0; i < 5; i++) {
      const b = scale * r.uniform(0.2, 1);
      h1.push([b, b + scale * r.uniform(0, 0.8)]);
    }
    out.push(set(`s${s}`, h0, h1));
  }
  return out;
}

/** The same sets with every diagram tagged by one of two filtrations (two channels per degree). */
export function twoFiltrations(sets: readonly DiagramSet[]): DiagramSet[] {
  return sets.map((s) => ({
    ...s,
    diagrams: [
      ...s.diagrams.map((d) => ({ ...d, filtration: 'height:1:0' })),
      ...s.diagrams.map((d) => ({
        ...d,
        births: d.births.map((b) => 2 * b),
        deaths: d.deaths.map((x) => 2 * x),
        filtration: 'radial:0:0',
      })),
    ],
  }));
}

export const TRAIN = Int32Array.from({ length: 20 }, (_, i) => i);

/** The first 20 sets kept, the last 10 replaced by diagrams ten times larger. */
export function leaked(sets: readonly DiagramSet[]): DiagramSet[] {
  return [...sets.slice(0, 20), ...randomSets(sets.length - 20, 9, 10)];
}
