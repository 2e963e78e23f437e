import type { Diagram } from '../core/diagram.js';

/** An evenly spaced grid of `count` points from `start` to `stop`, both included. */
export interface Grid {
  start: number;
  stop: number;
  count: number;
}

/** Distance between neighbouring grid points (0 for a one-point grid). */
export function gridStep(grid: Grid): number {
  return grid.count > 1 ? (grid.stop - grid.start) / (grid.count - 1) : 0;
}

/** The `count` points of the grid, `start` first and exactly `stop` last. */
export function gridPoints(grid: Grid): Float64Array {
  checkGrid(grid);
  const out = new Float64Array(grid.count);
  const step = gridStep(grid);
  // Invariant: out[0..i) hold start + j·step for j < i.
  for (let i = 0; i < grid.count; i++) out[i] = grid.start + i * step;
  if (grid.count > 1) out[grid.count - 1] = grid.stop;
  return out;
}

/** Throws unless the grid has a whole count ≥ 1 and finite ends with start ≤ stop (start < stop when count > 1). */
export function checkGrid(grid: Grid): void {
  if (!Number.isInteger(grid.count) || grid.count < 1)
    throw new Error(`grid count ${grid.count} must be a whole number ≥ 1`);
  if (!Number.isFinite(grid.start) || !Number.isFinite(grid.stop))
    throw new Error('grid ends must be finite');
  if (grid.count > 1 ? !(grid.stop > grid.start) : grid.stop < grid.start) {
    throw new Error(`grid stop ${grid.stop} must be greater than start ${grid.start}`);
  }
}

export function sameGrid(a: Grid, b: Grid): boolean {
  return a.start === b.start && a.stop === b.stop && a.count === b.count;
}

/**
 * The smallest grid of `count` points covering every finite pair of the diagrams: from the lowest birth to
 * the highest death. Infinite deaths are ignored. Undefined when no diagram has a finite pair of positive length.
 */
export function coveringGrid(diagrams: readonly Diagram[], count: number): Grid | undefined {
  let lo = Infinity;
  let hi = -Infinity;
  for (const diagram of diagrams) {
    const { births, deaths } = diagram;
    // Invariant: lo/hi bound the finite, positive-length pairs seen so far.
    for (let i = 0; i < births.length; i++) {
      const b = births[i];
      const d = deaths[i];
      if (!Number.isFinite(b) || !Number.isFinite(d) || !(d > b)) continue;
      if (b < lo) lo = b;
      if (d > hi) hi = d;
    }
  }
  if (!(hi > lo)) return undefined;
  return { start: lo, stop: hi, count };
}
