import { describe, expect, it } from 'vitest';
import { Random } from '../../../src/core/random.js';
import { generateLattice, LATTICE_CLASSES, panelStruts } from '../../../src/demo/scenarios/lattice.js';
import { sameSamples } from './same-samples.js';

/** First Betti number of the graph the strut pieces form: edges − vertices + components. */
function cycleRank(pieces: number[][]): number {
  const key = (x: number, y: number): string => `${x.toFixed(6)},${y.toFixed(6)}`;
  const parent = new Map<string, string>();
  const find = (a: string): string => {
    let r = a;
    while (parent.get(r) !== r) r = parent.get(r) as string;
    return r;
  };
  for (const p of pieces) {
    for (const k of [key(p[0], p[1]), key(p[2], p[3])]) if (!parent.has(k)) parent.set(k, k);
    parent.set(find(key(p[0], p[1])), find(key(p[2], p[3])));
  }
  const components = new Set([...parent.keys()].map(find)).size;
  return pieces.length - parent.size + components;
}

describe('lattice scenario', () => {
  it('draws panels whose strut graphs have 4, 3 and 1 independent loops', () => {
    // Source: the cycle rank of a graph, E − V + C, is its first Betti number (Kirchhoff, "Über die
    // Auflösung der Gleichungen…", 1847; any graph theory text, e.g. Berge, "The theory of graphs", 1958).
    const r = new Random(1);
    for (let trial = 0; trial < 20; trial++) {
      expect(cycleRank(panelStruts('intact', 2, 2, 0.75, r))).toBe(4);
      expect(cycleRank(panelStruts('broken-strut', 2, 2, 0.75, r))).toBe(3);
      expect(cycleRank(panelStruts('merged-cells', 2, 2, 0.75, r))).toBe(1);
      expect(cycleRank(panelStruts('intact', 2, 3, 0.75, r))).toBe(6);
      expect(cycleRank(panelStruts('merged-cells', 2, 3, 0.75, r))).toBe(3);
    }
  });

  it('is reproducible from its seed, balanced, and varies size, scale and position', () => {
    const a = generateLattice(4101);
    expect(sameSamples(generateLattice(4101), a)).toBe(true);
    expect(generateLattice(4102)[0].coords).not.toEqual(a[0].coords);
    expect(a.length).toBe(75);
    for (const label of LATTICE_CLASSES) expect(a.filter((s) => s.label === label).length).toBe(25);
    const counts = a.map((s) => s.count);
    expect(Math.min(...counts)).toBeGreaterThanOrEqual(130);
    expect(Math.max(...counts)).toBeLessThanOrEqual(183);
    expect(new Set(counts).size).toBeGreaterThan(20);
    for (const s of a) {
      expect(s.dim).toBe(2);
      expect(s.coords.length).toBe(2 * s.count);
      // Rounded to 4 decimals, as written to the CSV.
      expect(s.coords.every((v) => Math.round(v * 10000) / 10000 === v)).toBe(true);
    }
    const small = generateLattice(9, { perClass: 2, points: [20, 20], strayChance: 0 });
    expect(small.map((s) => s.count)).toEqual([20, 20, 20, 20, 20, 20]);
  });
});
