import type { Diagram } from '../core/diagram.js';
import { checkGrid, type Grid, gridStep } from './grid.js';

/**
 * A landscape sampled on a grid to a fixed depth: `values` holds depth × count numbers, row-major, layer k
 * (1-based) at offset (k − 1)·count. Layers beyond the diagram's pairs are zeros.
 */
export interface SampledLandscape {
  degree: number;
  grid: Grid;
  depth: number;
  values: Float64Array;
}

/**
 * Samples λ_1..λ_depth of a diagram of finite pairs on the grid. When `out` is given the values are written
 * into it at `offset` (depth × count numbers) and the result's `values` is a view of that stretch.
 */
export function sampleLandscape(
  diagram: Diagram,
  grid: Grid,
  depth: number,
  out?: Float64Array,
  offset = 0,
): SampledLandscape {
  const size = depth * grid.count;
  const target = out ?? new Float64Array(size);
  sampleLandscapeInto(diagram, grid, depth, target, offset);
  const values = out === undefined ? target : target.subarray(offset, offset + size);
  return { degree: diagram.degree, grid, depth, values };
}

/**
 * The fast path behind `sampleLandscape`, allocating nothing: for each pair, only the grid points inside
 * its support (b, d) are visited, and each keeps its top `depth` tent values, largest first, in the layer
 * rows of `out` by insertion. Throws on an infinite or NaN value (apply `finitePairs` first).
 */
export function sampleLandscapeInto(
  diagram: Diagram,
  grid: Grid,
  depth: number,
  out: Float64Array,
  offset: number,
): void {
  checkGrid(grid);
  if (!Number.isInteger(depth) || depth < 1) throw new Error(`depth ${depth} must be a whole number ≥ 1`);
  const count = grid.count;
  const size = depth * count;
  if (!Number.isInteger(offset) || offset < 0 || offset + size > out.length) {
    throw new Error(`out has ${out.length} numbers; ${size} are needed at offset ${offset}`);
  }
  out.fill(0, offset, offset + size);
  const { births, deaths } = diagram;
  const start = grid.start;
  const step = gridStep(grid);
  const last = count - 1;
  const lastRow = offset + (depth - 1) * count;
  // Invariant: for every grid point i, out[offset + (k−1)·count + i], k = 1..depth, holds the k largest tent
  // values at t_i of the pairs seen so far, in decreasing order (zeros where fewer pairs cover t_i).
  for (let p = 0; p < births.length; p++) {
    const b = births[p];
    const d = deaths[p];
    if (!Number.isFinite(b) || !Number.isFinite(d)) {
      throw new Error(
        `pair ${p} of the degree-${diagram.degree} diagram is (${b}, ${d}); landscapes need finite pairs — apply finitePairs first`,
      );
    }
    if (!(d > b)) continue;
    let lo: number;
    let hi: number;
    if (step > 0) {
      lo = Math.ceil((b - start) / step);
      hi = Math.floor((d - start) / step);
      if (lo < 0) lo = 0;
      if (hi > last) hi = last;
    } else {
      lo = 0;
      hi = b < start && start < d ? 0 : -1;
    }
    for (let i = lo; i <= hi; i++) {
      const t = i === last && step > 0 ? grid.stop : start + i * step;
      const up = t - b;
      const down = d - t;
      const h = up < down ? up : down;
      if (!(h > out[lastRow + i])) continue;
      // Insert h into column i: shift smaller values one layer down.
      let row = lastRow;
      while (row > offset && out[row - count + i] < h) {
        out[row + i] = out[row - count + i];
        row -= count;
      }
      out[row + i] = h;
    }
  }
}
