import type { Diagram } from '../core/diagram.js';
import { sortPairs } from './pair-order.js';

/**
 * One layer λ_k of a persistence landscape, given by its breakpoints: `t` strictly increasing, the layer
 * linear between neighbouring breakpoints, zero outside [t[0], t[last]], and v[0] = v[last] = 0.
 * A layer made of several tents separated by gaps has breakpoints (d, 0), (b′, 0) around each gap.
 */
export interface LandscapeLayer {
  t: Float64Array;
  v: Float64Array;
}

/** λ_1, λ_2, … of one diagram; layers beyond the last are identically zero and not stored. */
export interface ExactLandscape {
  degree: number;
  layers: LandscapeLayer[];
}

export interface ExactLandscapeOptions {
  /** Compute at most this many layers (default Infinity: every non-zero layer). */
  maxDepth?: number;
}

/**
 * The exact persistence landscape of a diagram of finite pairs (Chazal, Fasy, Lecci, Rinaldo, Wasserman, "Stochastic convergence of persistence
 * landscapes and silhouettes", 2014): λ_k(t) is the k-th largest of the tents
 * max(0, min(t − b, d − t)).
 *
 * A layer-by-layer sweep. The pairs are sorted once by birth ascending, death descending, into fixed slots.
 * Tracing λ_k, the sweep jumps from the current tent (b, d) to the first later slot whose death exceeds
 * d — found in O(log n) by descending a max-tree of the slots' deaths, so pieces nested under the layer
 * are never visited. Where two tents cross, the lower part (b′, d) stays in the slot of (b′, d′) as a
 * piece of λ_{k+1}; a piece reached across a gap leaves its slot. Whatever the sweep did not touch is left
 * in place for λ_{k+1}. Each jump adds breakpoints, so the cost is O(n log n + X log n) for X output
 * breakpoints. Zero-length pairs contribute nothing (see `resolvable`).
 *
 * Finite pairs only: apply `finitePairs` first. Throws on an infinite or NaN value.
 */
export function exactLandscape(diagram: Diagram, options: ExactLandscapeOptions = {}): ExactLandscape {
  const maxDepth = options.maxDepth ?? Infinity;
  if (!(maxDepth >= 0)) throw new Error(`maxDepth ${maxDepth} must be ≥ 0`);
  const { births, deaths } = diagram;
  const n0 = births.length;
  let n = 0;
  for (let i = 0; i < n0; i++) {
    const b = births[i];
    const d = deaths[i];
    if (!Number.isFinite(b) || !Number.isFinite(d)) {
      throw new Error(
        `pair ${i} of the degree-${diagram.degree} diagram is (${b}, ${d}); landscapes need finite pairs — apply finitePairs first`,
      );
    }
    if (resolvable(b, d)) n++;
  }
  const layers: LandscapeLayer[] = [];
  if (n === 0 || maxDepth === 0) return { degree: diagram.degree, layers };
  // Slots sorted by birth ascending then death descending; births never change, deaths shrink at crossings.
  const slotB = new Float64Array(n);
  const tree = new DeathTree(n);
  {
    const selected = new Uint32Array(n);
    for (let i = 0, j = 0; i < n0; i++) if (resolvable(births[i], deaths[i])) selected[j++] = i;
    const order = sortPairs(births, deaths, selected);
    for (let j = 0; j < n; j++) slotB[j] = births[order[j]];
    tree.fill(n, (j) => deaths[order[j]]);
  }
  const bufT = new Growable();
  const bufV = new Growable();
  while (layers.length < maxDepth) {
    const first = tree.firstAbove(0, -Infinity);
    if (first < 0) break;
    bufT.clear();
    bufV.clear();
    let b = slotB[first];
    let d = tree.death(first);
    tree.set(first, -Infinity);
    bufT.push(b);
    bufV.push(0);
    bufT.push((b + d) / 2);
    bufV.push((d - b) / 2);
    let p = first + 1;
    // Invariant: the layer is traced up to the peak of the current tent (b, d); slots before p hold the
    // pieces of the next layer, slots from p on the remaining pieces of this one.
    for (;;) {
      const q = tree.firstAbove(p, d);
      if (q < 0) {
        bufT.push(d);
        bufV.push(0);
        break;
      }
      const b2 = slotB[q];
      const d2 = tree.death(q);
      if (b2 > d) {
        bufT.push(d);
        bufV.push(0);
      }
      if (b2 >= d) {
        bufT.push(b2);
        bufV.push(0);
        tree.set(q, -Infinity);
      } else {
        // The tents cross at (b2 + d)/2; below it, the piece (b2, d) stays for the next layer (unless it
        // is narrower than rounding).
        bufT.push((b2 + d) / 2);
        bufV.push((d - b2) / 2);
        tree.set(q, resolvable(b2, d) ? d : -Infinity);
      }
      bufT.push((b2 + d2) / 2);
      bufV.push((d2 - b2) / 2);
      b = b2;
      d = d2;
      p = q + 1;
    }
    layers.push(cleanLayer(bufT, bufV));
  }
  return { degree: diagram.degree, layers };
}

/**
 * Whether a pair has a tent of positive width in floating point: its midpoint lies strictly between birth
 * and death. Zero-length pairs (and pairs narrower than rounding, e.g. (0, 5e-324)) contribute nothing.
 */
export function resolvable(b: number, d: number): boolean {
  const m = (b + d) / 2;
  return m > b && m < d;
}

/**
 * The deaths of the slots in a complete binary max-tree (−Infinity marks an empty slot): point updates
 * and "first slot at or after p whose death exceeds x" in O(log n).
 */
class DeathTree {
  private readonly size: number;
  private readonly max: Float64Array;

  constructor(n: number) {
    let size = 1;
    while (size < n) size <<= 1;
    this.size = size;
    this.max = new Float64Array(2 * size).fill(-Infinity);
  }

  /** Sets slots 0..n−1 from `deathOf`; the slots past n stay empty. */
  fill(n: number, deathOf: (slot: number) => number): void {
    const { size, max } = this;
    for (let j = 0; j < size; j++) max[size + j] = j < n ? deathOf(j) : -Infinity;
    for (let i = size - 1; i >= 1; i--) max[i] = max[2 * i] > max[2 * i + 1] ? max[2 * i] : max[2 * i + 1];
  }

  death(slot: number): number {
    return this.max[this.size + slot];
  }

  set(slot: number, death: number): void {
    const max = this.max;
    let i = this.size + slot;
    max[i] = death;
    // Invariant: every node below i holds the maximum of its leaves.
    for (i >>= 1; i >= 1; i >>= 1) {
      const m = max[2 * i] > max[2 * i + 1] ? max[2 * i] : max[2 * i + 1];
      if (max[i] === m) break;
      max[i] = m;
    }
  }

  /** The first slot ≥ from whose death is > x, or −1. */
  firstAbove(from: number, x: number): number {
    const { size, max } = this;
    if (from >= size) return -1;
    let i = size + from;
    if (!(max[i] > x)) {
      // Climb until a right sibling subtree holds a death above x.
      for (;;) {
        while (i & 1) i >>= 1;
        if (i === 0) return -1;
        i++;
        if (max[i] > x) break;
      }
      // Descend to its leftmost such leaf.
      while (i < size) {
        i <<= 1;
        if (!(max[i] > x)) i++;
      }
    }
    return i - size;
  }
}

/**
 * Copies the traced breakpoints, dropping repeats of the same t that rounding may produce and interior
 * points where the layer goes straight on (possible after a crossing between tents of equal birth).
 */
function cleanLayer(t: Growable, v: Growable): LandscapeLayer {
  const m = t.length;
  const outT = new Float64Array(m);
  const outV = new Float64Array(m);
  let k = 0;
  // Invariant: outT[0..k) is strictly increasing and no kept interior point lies inside a straight run.
  for (let i = 0; i < m; i++) {
    const ti = t.data[i];
    const vi = v.data[i];
    if (k > 0 && !(ti > outT[k - 1])) {
      // Same place again: keep the larger value, except that the last point must stay at zero.
      if (i === m - 1) outV[k - 1] = 0;
      else if (vi > outV[k - 1]) outV[k - 1] = vi;
      continue;
    }
    if (k >= 2 && outV[k - 1] > 0 && Math.sign(outV[k - 1] - outV[k - 2]) === Math.sign(vi - outV[k - 1]))
      k--;
    outT[k] = ti;
    outV[k] = vi;
    k++;
  }
  return { t: outT.slice(0, k), v: outV.slice(0, k) };
}

/** A growable Float64Array buffer. */
class Growable {
  data = new Float64Array(64);
  length = 0;
  clear(): void {
    this.length = 0;
  }
  push(x: number): void {
    if (this.length === this.data.length) {
      const bigger = new Float64Array(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = x;
  }
}
