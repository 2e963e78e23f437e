import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import { coveringGrid, gridPoints, gridStep } from '../../src/landscape/grid.js';

describe('grid', () => {
  it('has count points from start to stop inclusive', () => {
    const ts = gridPoints({ start: 0.1, stop: 0.7, count: 7 });
    expect(ts.length).toBe(7);
    expect(ts[0]).toBe(0.1);
    expect(ts[6]).toBe(0.7);
    for (let i = 1; i < 7; i++) expect(ts[i] - ts[i - 1]).toBeCloseTo(0.1, 14);
    expect(gridStep({ start: 0, stop: 2, count: 5 })).toBe(0.5);
    expect([...gridPoints({ start: 3, stop: 3, count: 1 })]).toEqual([3]);
  });

  it('refuses bad grids', () => {
    expect(() => gridPoints({ start: 1, stop: 0, count: 3 })).toThrow(/greater than start/);
    expect(() => gridPoints({ start: 0, stop: 1, count: 0 })).toThrow(/count/);
    expect(() => gridPoints({ start: 0, stop: Infinity, count: 3 })).toThrow(/finite/);
  });

  it('covers the finite pairs of several diagrams, ignoring essential classes', () => {
    const a = makeDiagram(0, [
      [0, Infinity],
      [0.5, 2],
    ]);
    const b = makeDiagram(0, [
      [-1, 0.25],
      [4, 4],
    ]);
    expect(coveringGrid([a, b], 50)).toEqual({ start: -1, stop: 2, count: 50 });
    expect(coveringGrid([makeDiagram(0, [[1, 1]])], 10)).toBeUndefined();
  });
});
