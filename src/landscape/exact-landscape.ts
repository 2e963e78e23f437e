import type { Diagram } from '../homology/diagram.js';
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
 * The exact persistence landscape of a diagram of finite pairs (Bubenik, "Statistical topological data
 * analysis using persistence landscapes", 2015): λ_k(t) is the k-th largest of the tents
 * max(0, min(t − b, d − t)).
 *
 * Layer by layer sweep (after Bubenik and Dłotko, "A persistence landscapes toolbox for topological
 * statistics", 2017): pairs sorted by birth ascending, death descending; the sweep walks the sorted pieces
 * once, tracing the upper envelope; whatever lies under it — pieces it skips and the lower part of two
 * crossing tents, cut at the crossing — is passed on, still sorted, as the pieces of the next layer.
 * Cost O(n log n) for the sort plus, per layer, the pieces left for that layer; each crossing adds one
 * piece and one breakpoint, so the work follows the size of the output (deeply nested pairs are walked
 * once per layer above them). Zero-length pairs contribute nothing (see `resolvable`).
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
  // Current pieces, sorted by birth ascending then death descending.
  let curB = new Float64Array(n);
  let curD = new Float64Array(n);
  {
    const selected = new Uint32Array(n);
    for (let i = 0, j = 0; i < n0; i++) if (resolvable(births[i], deaths[i])) selected[j++] = i;
    const order = sortPairs(births, deaths, selected);
    for (let j = 0; j < n; j++) {
      curB[j] = births[order[j]];
      curD[j] = deaths[order[j]];
    }
  }
  let nextB = new Float64Array(n);
  let nextD = new Float64Array(n);
  let size = n;
  const layers: LandscapeLayer[] = [];
  const bufT = new Growable();
  const bufV = new Growable();
  while (size > 0 && layers.length < maxDepth) {
    bufT.clear();
    bufV.clear();
    let nextSize = 0;
    let b = curB[0];
    let d = curD[0];
    bufT.push(b);
    bufV.push(0);
    bufT.push((b + d) / 2);
    bufV.push((d - b) / 2);
    let p = 1;
    // Invariant: the layer is traced up to the peak of the current tent (b, d); pieces cur[1..p) are either
    // on the layer already or passed on to next[0..nextSize), which stays sorted.
    for (;;) {
      while (p < size && !(curD[p] > d)) {
        nextSize = insertSorted(nextB, nextD, nextSize, curB[p], curD[p]);
        p++;
      }
      if (p === size) {
        bufT.push(d);
        bufV.push(0);
        break;
      }
      const b2 = curB[p];
      const d2 = curD[p];
      p++;
      if (b2 > d) {
        bufT.push(d);
        bufV.push(0);
      }
      if (b2 >= d) {
        bufT.push(b2);
        bufV.push(0);
      } else {
        // The tents cross at (b2 + d)/2; below it, the piece (b2, d) goes on to the next layer.
        bufT.push((b2 + d) / 2);
        bufV.push((d - b2) / 2);
        nextSize = insertSorted(nextB, nextD, nextSize, b2, d);
      }
      bufT.push((b2 + d2) / 2);
      bufV.push((d2 - b2) / 2);
      b = b2;
      d = d2;
    }
    layers.push(cleanLayer(bufT, bufV));
    const swapB = curB;
    const swapD = curD;
    curB = nextB;
    curD = nextD;
    nextB = swapB;
    nextD = swapD;
    size = nextSize;
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

/** Appends (b, d) to the sorted pieces, moving it back past pieces that should follow it. Returns the new size. */
function insertSorted(pb: Float64Array, pd: Float64Array, size: number, b: number, d: number): number {
  let j = size;
  // Invariant: pieces [j+1, size] are after (b, d) in the order (birth ascending, death descending).
  while (j > 0 && (pb[j - 1] > b || (pb[j - 1] === b && pd[j - 1] < d))) {
    pb[j] = pb[j - 1];
    pd[j] = pd[j - 1];
    j--;
  }
  pb[j] = b;
  pd[j] = d;
  return size + 1;
}

/** Copies the traced breakpoints, dropping repeats of the same t that rounding may produce. */
function cleanLayer(t: Growable, v: Growable): LandscapeLayer {
  const m = t.length;
  const outT = new Float64Array(m);
  const outV = new Float64Array(m);
  let k = 0;
  // Invariant: outT[0..k) is strictly increasing.
  for (let i = 0; i < m; i++) {
    const ti = t.data[i];
    if (k > 0 && !(ti > outT[k - 1])) {
      // Same place again: keep the larger value, except that the last point must stay at zero.
      if (i === m - 1) outV[k - 1] = 0;
      else if (v.data[i] > outV[k - 1]) outV[k - 1] = v.data[i];
      continue;
    }
    outT[k] = ti;
    outV[k] = v.data[i];
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
