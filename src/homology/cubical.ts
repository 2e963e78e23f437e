import type { Diagram } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import { argsortValues } from './order.js';

/**
 * Sublevel-set persistence of images (2-D, H0 and H1) and volumes (3-D, H0–H2) on a cubical complex whose
 * vertices are the pixels (voxels): edges join axis neighbours, squares fill 2 × 2 blocks, cubes 2 × 2 × 2
 * blocks, and every cell takes the largest value of its vertices. Ties are ordered by (value, dimension,
 * cell number), one total order used by every pass.
 *
 * - H0: union-find over the edges in filtration order (elder rule).
 * - The top degree (H1 of an image, H2 of a volume): by duality, union-find over the top cells plus one
 *   outside cell, visiting the cells one dimension lower in reverse filtration order; a merge pairs the
 *   lower cell with the oldest (latest-valued) cell of the younger part.
 * - H1 of a volume: the standard column reduction over Z/2 of the squares left unpaired by the dual pass
 *   (they are exactly the squares that kill a loop), with edges as rows — clearing from the top.
 *
 * Superlevel sets (`superlevel: true`) are the sublevel sets of −values and are reported on that negated
 * scale (birth −200, death −50 for a bright class born at 200 that dies at 50), so death ≥ birth holds.
 */
export interface CubicalOptions {
  /** Filter by superlevel sets (bright features first) instead of sublevel sets (default false). */
  superlevel?: boolean;
  /** Highest degree computed (default: image dimension − 1, i.e. 1 for images, 2 for volumes). */
  maxDegree?: number;
}

export function cubicalPersistence(
  values: Float64Array,
  shape: number[],
  options: CubicalOptions = {},
): Diagram[] {
  const total = imageSize(values, shape);
  const f = options.superlevel ? values.map((v) => 0 - v) : Float64Array.from(values);
  for (let p = 0; p < total; p++) {
    if (!Number.isFinite(f[p]))
      throw new UserError(`pixel ${p + 1} is ${values[p]}; pixel values must be finite numbers`);
  }
  const top = shape.length - 1;
  const maxDegree = Math.min(options.maxDegree ?? top, top);
  const D = shape.length === 3 ? shape[0] : 1;
  const H = shape.length >= 2 ? shape[shape.length - 2] : 1;
  const W = shape[shape.length - 1];
  const grid = new Grid(D, H, W, f);
  const out: Diagram[] = [grid.zeroDegree()];
  if (maxDegree >= 1) {
    if (top === 1) out.push(grid.dualPass(1));
    else {
      const { diagram, killers } = grid.dualPassWithKillers();
      out.push(grid.loopsOfVolume(killers));
      if (maxDegree >= 2) out.push(diagram);
    }
  }
  return out;
}

/** Checks an image's shape (1 to 3 axes of whole sizes ≥ 1) against its values; returns the pixel count. */
export function imageSize(values: ArrayLike<number>, shape: readonly number[]): number {
  if (shape.length < 1 || shape.length > 3)
    throw new UserError(`an image has 1 to 3 axes, got shape [${shape.join(', ')}]`);
  let total = 1;
  for (const s of shape) {
    if (!Number.isInteger(s) || s < 1)
      throw new UserError(`image shape [${shape.join(', ')}] must be whole numbers ≥ 1`);
    total *= s;
  }
  if (values.length !== total)
    throw new UserError(`image shape [${shape.join(', ')}] needs ${total} values, got ${values.length}`);
  return total;
}

class Grid {
  readonly exCount: number;
  readonly eyCount: number;
  readonly ezCount: number;
  readonly edgeValues: Float64Array;
  readonly sxyCount: number;
  readonly sxzCount: number;
  readonly syzCount: number;
  readonly squareValues: Float64Array;
  readonly cubeValues: Float64Array;

  constructor(
    readonly D: number,
    readonly H: number,
    readonly W: number,
    readonly f: Float64Array,
  ) {
    this.exCount = D * H * (W - 1);
    this.eyCount = D * (H - 1) * W;
    this.ezCount = (D - 1) * H * W;
    this.edgeValues = new Float64Array(this.exCount + this.eyCount + this.ezCount);
    this.sxyCount = D * (H - 1) * (W - 1);
    this.sxzCount = (D - 1) * H * (W - 1);
    this.syzCount = (D - 1) * (H - 1) * W;
    this.squareValues = new Float64Array(this.sxyCount + this.sxzCount + this.syzCount);
    this.cubeValues = new Float64Array((D - 1) * (H - 1) * (W - 1));
    const ev = this.edgeValues;
    const sv = this.squareValues;
    for (let z = 0; z < D; z++)
      for (let y = 0; y < H; y++)
        for (let x = 0; x < W; x++) {
          // invariant: every cell whose lowest corner precedes (z, y, x) has its value
          const p = this.vertex(z, y, x);
          if (x + 1 < W) ev[this.ex(z, y, x)] = Math.max(f[p], f[p + 1]);
          if (y + 1 < H) ev[this.ey(z, y, x)] = Math.max(f[p], f[p + W]);
          if (z + 1 < D) ev[this.ez(z, y, x)] = Math.max(f[p], f[p + H * W]);
        }
    for (let z = 0; z < D; z++)
      for (let y = 0; y < H; y++)
        for (let x = 0; x < W; x++) {
          if (x + 1 < W && y + 1 < H)
            sv[this.sxy(z, y, x)] = Math.max(ev[this.ex(z, y, x)], ev[this.ex(z, y + 1, x)]);
          if (x + 1 < W && z + 1 < D)
            sv[this.sxz(z, y, x)] = Math.max(ev[this.ex(z, y, x)], ev[this.ex(z + 1, y, x)]);
          if (y + 1 < H && z + 1 < D)
            sv[this.syz(z, y, x)] = Math.max(ev[this.ey(z, y, x)], ev[this.ey(z + 1, y, x)]);
          if (x + 1 < W && y + 1 < H && z + 1 < D) {
            this.cubeValues[this.cube(z, y, x)] = Math.max(sv[this.sxy(z, y, x)], sv[this.sxy(z + 1, y, x)]);
          }
        }
  }

  vertex(z: number, y: number, x: number): number {
    return (z * this.H + y) * this.W + x;
  }
  ex(z: number, y: number, x: number): number {
    return (z * this.H + y) * (this.W - 1) + x;
  }
  ey(z: number, y: number, x: number): number {
    return this.exCount + (z * (this.H - 1) + y) * this.W + x;
  }
  ez(z: number, y: number, x: number): number {
    return this.exCount + this.eyCount + (z * this.H + y) * this.W + x;
  }
  sxy(z: number, y: number, x: number): number {
    return (z * (this.H - 1) + y) * (this.W - 1) + x;
  }
  sxz(z: number, y: number, x: number): number {
    return this.sxyCount + (z * this.H + y) * (this.W - 1) + x;
  }
  syz(z: number, y: number, x: number): number {
    return this.sxyCount + this.sxzCount + (z * (this.H - 1) + y) * this.W + x;
  }
  cube(z: number, y: number, x: number): number {
    return (z * (this.H - 1) + y) * (this.W - 1) + x;
  }

  /** H0 by union-find over the edges in filtration order. */
  zeroDegree(): Diagram {
    const { f, W, H } = this;
    const n = f.length;
    const parent = new Int32Array(n);
    const oldest = new Int32Array(n);
    for (let p = 0; p < n; p++) {
      parent[p] = p;
      oldest[p] = p;
    }
    const find = (x: number): number => {
      while (parent[x] !== x) {
        parent[x] = parent[parent[x]];
        x = parent[x];
      }
      return x;
    };
    const order = argsortValues(this.edgeValues);
    const births: number[] = [];
    const deaths: number[] = [];
    const plane = H * W;
    // invariant: components of the edges before k are merged, each root knowing its oldest vertex
    for (let k = 0; k < order.length; k++) {
      const e = order[k];
      let a: number;
      let b: number;
      if (e < this.exCount) {
        a = e + Math.floor(e / (W - 1));
        b = a + 1;
      } else if (e < this.exCount + this.eyCount) {
        const r = e - this.exCount;
        const z = Math.floor(r / ((H - 1) * W));
        a = z * plane + (r - z * (H - 1) * W);
        b = a + W;
      } else {
        a = e - this.exCount - this.eyCount;
        b = a + plane;
      }
      const ra = find(a);
      const rb = find(b);
      if (ra === rb) continue;
      const oa = oldest[ra];
      const ob = oldest[rb];
      const aOlder = f[oa] < f[ob] || (f[oa] === f[ob] && oa < ob);
      const younger = aOlder ? ob : oa;
      const death = this.edgeValues[e];
      if (death > f[younger]) {
        births.push(f[younger]);
        deaths.push(death);
      }
      if (aOlder) {
        parent[rb] = ra;
      } else {
        parent[ra] = rb;
      }
    }
    let min = 0;
    for (let p = 1; p < n; p++) if (f[p] < f[min]) min = p;
    births.push(f[min]);
    deaths.push(Infinity);
    return { degree: 0, births: Float64Array.from(births), deaths: Float64Array.from(deaths) };
  }

  /** H1 of an image (degree 1, top = squares) by the dual union-find. */
  dualPass(degree: 1): Diagram {
    const { W, H } = this;
    const cells = this.squareValues;
    const lower = this.edgeValues;
    const result = dualUnionFind(cells, lower, (e, out) => {
      if (e < this.exCount) {
        const y = Math.floor(e / (W - 1));
        const x = e - y * (W - 1);
        out[0] = y >= 1 ? (y - 1) * (W - 1) + x : -1;
        out[1] = y <= H - 2 ? y * (W - 1) + x : -1;
      } else {
        const r = e - this.exCount;
        const y = Math.floor(r / W);
        const x = r - y * W;
        out[0] = x >= 1 ? y * (W - 1) + x - 1 : -1;
        out[1] = x <= W - 2 ? y * (W - 1) + x : -1;
      }
    });
    return { degree, births: result.births, deaths: result.deaths };
  }

  /** H2 of a volume by the dual union-find over cubes; also marks the squares that kill loops. */
  dualPassWithKillers(): { diagram: Diagram; killers: Uint8Array } {
    const { D, H, W } = this;
    const cubeOf = (z: number, y: number, x: number): number =>
      z < 0 || y < 0 || x < 0 || z > D - 2 || y > H - 2 || x > W - 2 ? -1 : this.cube(z, y, x);
    const result = dualUnionFind(this.cubeValues, this.squareValues, (s, out) => {
      if (s < this.sxyCount) {
        const x = s % (W - 1);
        const zy = (s - x) / (W - 1);
        const y = zy % (H - 1);
        const z = (zy - y) / (H - 1);
        out[0] = cubeOf(z - 1, y, x);
        out[1] = cubeOf(z, y, x);
      } else if (s < this.sxyCount + this.sxzCount) {
        const r = s - this.sxyCount;
        const x = r % (W - 1);
        const zy = (r - x) / (W - 1);
        const y = zy % H;
        const z = (zy - y) / H;
        out[0] = cubeOf(z, y - 1, x);
        out[1] = cubeOf(z, y, x);
      } else {
        const r = s - this.sxyCount - this.sxzCount;
        const x = r % W;
        const zy = (r - x) / W;
        const y = zy % (H - 1);
        const z = (zy - y) / (H - 1);
        out[0] = cubeOf(z, y, x - 1);
        out[1] = cubeOf(z, y, x);
      }
    });
    return {
      diagram: { degree: 2, births: result.births, deaths: result.deaths },
      killers: result.cycleCells,
    };
  }

  /** H1 of a volume: reduce the boundaries of the loop-killing squares (Z/2, rows = edges by filtration rank). */
  loopsOfVolume(killers: Uint8Array): Diagram {
    const { H, W } = this;
    const edgeOrder = argsortValues(this.edgeValues);
    const edgeRank = new Int32Array(edgeOrder.length);
    for (let k = 0; k < edgeOrder.length; k++) edgeRank[edgeOrder[k]] = k;
    const squareOrder = argsortValues(this.squareValues);
    const owner = new Int32Array(edgeOrder.length).fill(-1);
    const stored: Int32Array[] = [];
    const births: number[] = [];
    const deaths: number[] = [];
    const boundary = new Int32Array(4);
    for (let k = 0; k < squareOrder.length; k++) {
      const s = squareOrder[k];
      if (!killers[s]) continue;
      if (s < this.sxyCount) {
        const x = s % (W - 1);
        const zy = (s - x) / (W - 1);
        const y = zy % (H - 1);
        const z = (zy - y) / (H - 1);
        boundary[0] = this.ex(z, y, x);
        boundary[1] = this.ex(z, y + 1, x);
        boundary[2] = this.ey(z, y, x);
        boundary[3] = this.ey(z, y, x + 1);
      } else if (s < this.sxyCount + this.sxzCount) {
        const r = s - this.sxyCount;
        const x = r % (W - 1);
        const zy = (r - x) / (W - 1);
        const y = zy % H;
        const z = (zy - y) / H;
        boundary[0] = this.ex(z, y, x);
        boundary[1] = this.ex(z + 1, y, x);
        boundary[2] = this.ez(z, y, x);
        boundary[3] = this.ez(z, y, x + 1);
      } else {
        const r = s - this.sxyCount - this.sxzCount;
        const x = r % W;
        const zy = (r - x) / W;
        const y = zy % (H - 1);
        const z = (zy - y) / (H - 1);
        boundary[0] = this.ey(z, y, x);
        boundary[1] = this.ey(z + 1, y, x);
        boundary[2] = this.ez(z, y, x);
        boundary[3] = this.ez(z, y + 1, x);
      }
      let column: Int32Array = new Int32Array(4);
      for (let q = 0; q < 4; q++) column[q] = edgeRank[boundary[q]];
      column.sort();
      // invariant: column is the sorted (ascending) set of edge ranks of the current reduced boundary
      while (column.length > 0 && owner[column[column.length - 1]] >= 0) {
        column = symmetricDifference(column, stored[owner[column[column.length - 1]]]);
      }
      if (column.length === 0) continue; // cannot happen for a loop-killing square; kept for safety
      const low = column[column.length - 1];
      owner[low] = stored.length;
      stored.push(column);
      const birth = this.edgeValues[edgeOrder[low]];
      const death = this.squareValues[s];
      if (death > birth) {
        births.push(birth);
        deaths.push(death);
      }
    }
    return { degree: 1, births: Float64Array.from(births), deaths: Float64Array.from(deaths) };
  }
}

/**
 * Union-find over top cells plus one outside cell (number = count), visiting lower cells in reverse
 * filtration order. A lower cell whose two sides are already joined is marked in `cycleCells`.
 */
function dualUnionFind(
  cellValues: Float64Array,
  lowerValues: Float64Array,
  sides: (lower: number, out: Int32Array) => void,
): { births: Float64Array; deaths: Float64Array; cycleCells: Uint8Array } {
  const count = cellValues.length;
  const outside = count;
  const parent = new Int32Array(count + 1);
  const oldest = new Int32Array(count + 1);
  for (let c = 0; c <= count; c++) {
    parent[c] = c;
    oldest[c] = c;
  }
  const find = (x: number): number => {
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]];
      x = parent[x];
    }
    return x;
  };
  // Later in filtration order (value, then cell number) is older in the reverse pass; outside is oldest.
  const later = (a: number, b: number): boolean =>
    a === outside ||
    (b !== outside && (cellValues[a] > cellValues[b] || (cellValues[a] === cellValues[b] && a > b)));
  const order = argsortValues(lowerValues);
  const cycleCells = new Uint8Array(lowerValues.length);
  const births: number[] = [];
  const deaths: number[] = [];
  const pair = new Int32Array(2);
  // invariant: top cells joined through the lower cells after k (in filtration order) share a root
  for (let k = order.length - 1; k >= 0; k--) {
    const low = order[k];
    sides(low, pair);
    const a = find(pair[0] < 0 ? outside : pair[0]);
    const b = find(pair[1] < 0 ? outside : pair[1]);
    if (a === b) {
      cycleCells[low] = 1;
      continue;
    }
    const oa = oldest[a];
    const ob = oldest[b];
    const aOlder = later(oa, ob);
    const younger = aOlder ? ob : oa;
    const birth = lowerValues[low];
    const death = cellValues[younger];
    if (death > birth) {
      births.push(birth);
      deaths.push(death);
    }
    if (aOlder) parent[b] = a;
    else parent[a] = b;
  }
  return { births: Float64Array.from(births), deaths: Float64Array.from(deaths), cycleCells };
}

function symmetricDifference(a: Int32Array, b: Int32Array): Int32Array {
  const out = new Int32Array(a.length + b.length);
  let i = 0;
  let j = 0;
  let w = 0;
  // invariant: out[0..w) is the sorted symmetric difference of a[0..i) and b[0..j)
  while (i < a.length && j < b.length) {
    if (a[i] < b[j]) out[w++] = a[i++];
    else if (a[i] > b[j]) out[w++] = b[j++];
    else {
      i++;
      j++;
    }
  }
  while (i < a.length) out[w++] = a[i++];
  while (j < b.length) out[w++] = b[j++];
  return out.slice(0, w);
}
