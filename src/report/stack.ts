/**
 * A stack of sampled landscapes of one degree, all on the same grid and depth: the shape in which the
 * statistics of this stage (bands, permutation tests) read their data. Row i holds sample i's values,
 * layer-major (layer k at offset k × gridCount), exactly the layout of a sampled landscape's `values`.
 */
export interface GridSpec {
  start: number;
  stop: number;
  count: number;
}

export interface LandscapeStack {
  /** Number of samples (rows). */
  samples: number;
  depth: number;
  grid: GridSpec;
  /** samples × depth × grid.count values, row-major. */
  values: Float64Array;
}

/** Stacks per-sample value arrays (each depth × grid.count, layer-major) into one block. */
export function stackLandscapes(
  rows: ReadonlyArray<ArrayLike<number>>,
  grid: GridSpec,
  depth: number,
): LandscapeStack {
  const width = depth * grid.count;
  const values = new Float64Array(rows.length * width);
  for (let i = 0; i < rows.length; i++) {
    const r = rows[i];
    if (r.length !== width)
      throw new Error(`stackLandscapes: row ${i} has ${r.length} values, expected ${width}`);
    for (let j = 0; j < width; j++) values[i * width + j] = r[j];
  }
  return { samples: rows.length, depth, grid, values };
}

/** The rows of `stack` at `indices`, as a new stack. */
export function selectRows(stack: LandscapeStack, indices: ArrayLike<number>): LandscapeStack {
  const width = stack.depth * stack.grid.count;
  const values = new Float64Array(indices.length * width);
  for (let k = 0; k < indices.length; k++) {
    const i = indices[k];
    values.set(stack.values.subarray(i * width, (i + 1) * width), k * width);
  }
  return { samples: indices.length, depth: stack.depth, grid: stack.grid, values };
}

/** The pointwise mean of the rows (the sampled mean landscape). */
export function stackMean(stack: LandscapeStack): Float64Array {
  const width = stack.depth * stack.grid.count;
  const mean = new Float64Array(width);
  const n = stack.samples;
  if (n === 0) return mean;
  // Invariant: after row i, mean[j] holds the sum of rows 0..i at column j.
  for (let i = 0; i < n; i++) {
    const base = i * width;
    for (let j = 0; j < width; j++) mean[j] += stack.values[base + j];
  }
  for (let j = 0; j < width; j++) mean[j] /= n;
  return mean;
}

/** Grid spacing; a one-point grid has spacing 0. */
export function gridStep(grid: GridSpec): number {
  return grid.count > 1 ? (grid.stop - grid.start) / (grid.count - 1) : 0;
}

/**
 * The Lp norm of a sampled multi-layer function, ‖f‖_p = (Σ_k ∫ |f_k(t)|^p dt)^(1/p), with each integral by
 * the trapezoid rule on the grid; p = Infinity gives the sup over all layers and grid points. This is the
 * norm of Chazal, Fasy, Lecci, Rinaldo, Wasserman, "Stochastic convergence of persistence landscapes and silhouettes", 2014, evaluated on
 * a grid; it converges to the exact norm as the grid is refined.
 */
export function sampledNorm(values: ArrayLike<number>, depth: number, grid: GridSpec, p = 2): number {
  const count = grid.count;
  if (p === Infinity) {
    let sup = 0;
    for (let j = 0; j < depth * count; j++) {
      const a = Math.abs(values[j]);
      if (a > sup) sup = a;
    }
    return sup;
  }
  const h = gridStep(grid);
  let total = 0;
  // Invariant: `total` is Σ over finished layers of the trapezoid sum of |f|^p (without the factor h).
  for (let k = 0; k < depth; k++) {
    const base = k * count;
    let layer = 0;
    for (let j = 0; j < count; j++) {
      const w = j === 0 || j === count - 1 ? 0.5 : 1;
      layer += w * Math.abs(values[base + j]) ** p;
    }
    total += layer;
  }
  return (total * h) ** (1 / p);
}

/** ‖a − b‖_p for two sampled functions of the same layout (see `sampledNorm`). */
export function sampledDistance(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  depth: number,
  grid: GridSpec,
  p = 2,
): number {
  const width = depth * grid.count;
  const diff = new Float64Array(width);
  for (let j = 0; j < width; j++) diff[j] = a[j] - b[j];
  return sampledNorm(diff, depth, grid, p);
}
