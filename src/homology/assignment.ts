/**
 * Minimum-cost assignment on a square cost matrix, by shortest augmenting paths with row and column
 * potentials (the Hungarian method in the form of Jonker and Volgenant, "A shortest augmenting path
 * algorithm for dense and sparse linear assignment problems", 1987). O(size³) time, O(size) extra memory.
 */
export interface Assignment {
  /** columnOfRow[i] is the column given to row i. */
  columnOfRow: Int32Array;
  /** The sum of the chosen costs. */
  total: number;
}

/**
 * Solves min Σ_i cost[i·size + columnOfRow[i]] over permutations. Costs must be finite; an entry that must
 * never be chosen can be given a cost larger than the total of any admissible assignment.
 */
export function solveAssignment(cost: Float64Array, size: number): Assignment {
  if (cost.length !== size * size)
    throw new Error(`cost has ${cost.length} entries; a ${size}×${size} matrix needs ${size * size}`);
  for (let i = 0; i < cost.length; i++)
    if (!Number.isFinite(cost[i])) throw new Error('assignment costs must be finite');
  const n = size;
  // 1-based arrays; index 0 is the virtual start of each augmenting path.
  const u = new Float64Array(n + 1);
  const v = new Float64Array(n + 1);
  const rowOfColumn = new Int32Array(n + 1);
  const way = new Int32Array(n + 1);
  const minTo = new Float64Array(n + 1);
  const used = new Uint8Array(n + 1);
  // Warm start (column reduction, as in Jonker and Volgenant): v[j] = min_i cost(i, j), u = 0, then each
  // column whose minimum row is still free takes it. Reduced costs stay ≥ 0 and matched pairs are tight.
  const rowTaken = new Uint8Array(n + 1);
  for (let j = 1; j <= n; j++) {
    let best = Infinity;
    let bestRow = 0;
    for (let i = 1; i <= n; i++) {
      const c = cost[(i - 1) * n + j - 1];
      if (c < best) {
        best = c;
        bestRow = i;
      }
    }
    v[j] = best;
    if (!rowTaken[bestRow]) {
      rowTaken[bestRow] = 1;
      rowOfColumn[j] = bestRow;
    }
  }
  for (let i = 1; i <= n; i++) {
    if (rowTaken[i]) continue;
    rowOfColumn[0] = i;
    let j0 = 0;
    minTo.fill(Infinity);
    used.fill(0);
    // Invariant: u[r] + v[c] ≤ cost(r, c) for all r, c, with equality on matched pairs; the tree of used
    // columns grows along reduced-cost-zero edges until it reaches a free column.
    do {
      used[j0] = 1;
      const i0 = rowOfColumn[j0];
      let delta = Infinity;
      let j1 = 0;
      const base = (i0 - 1) * n;
      for (let j = 1; j <= n; j++) {
        if (used[j]) continue;
        const reduced = cost[base + j - 1] - u[i0] - v[j];
        if (reduced < minTo[j]) {
          minTo[j] = reduced;
          way[j] = j0;
        }
        if (minTo[j] < delta) {
          delta = minTo[j];
          j1 = j;
        }
      }
      for (let j = 0; j <= n; j++) {
        if (used[j]) {
          u[rowOfColumn[j]] += delta;
          v[j] -= delta;
        } else {
          minTo[j] -= delta;
        }
      }
      j0 = j1;
    } while (rowOfColumn[j0] !== 0);
    do {
      const j1 = way[j0];
      rowOfColumn[j0] = rowOfColumn[j1];
      j0 = j1;
    } while (j0 !== 0);
  }
  const columnOfRow = new Int32Array(n);
  for (let j = 1; j <= n; j++) if (rowOfColumn[j] > 0) columnOfRow[rowOfColumn[j] - 1] = j - 1;
  let total = 0;
  for (let i = 0; i < n; i++) total += cost[i * n + columnOfRow[i]];
  return { columnOfRow, total };
}

/**
 * The size of a maximum matching of a bipartite graph (Hopcroft and Karp, "An n^5/2 algorithm for maximum
 * matchings in bipartite graphs", 1973), given in compressed rows: the neighbours of left vertex i are
 * columns[offsets[i] .. offsets[i+1]).
 */
export function maximumMatching(
  left: number,
  right: number,
  offsets: Int32Array,
  columns: Int32Array,
): number {
  const matchL = new Int32Array(left).fill(-1);
  const matchR = new Int32Array(right).fill(-1);
  const dist = new Int32Array(left);
  const queue = new Int32Array(left);
  const stack = new Int32Array(left);
  const edgeAt = new Int32Array(left);
  let matched = 0;
  const INF = 0x3fffffff;
  for (;;) {
    // Breadth-first layers from the free left vertices.
    let head = 0;
    let tail = 0;
    for (let i = 0; i < left; i++) {
      if (matchL[i] < 0) {
        dist[i] = 0;
        queue[tail++] = i;
      } else dist[i] = INF;
    }
    let found = false;
    // Invariant: dist[x] is the length of the shortest alternating path from a free left vertex to x.
    while (head < tail) {
      const x = queue[head++];
      for (let e = offsets[x]; e < offsets[x + 1]; e++) {
        const y = matchR[columns[e]];
        if (y < 0) found = true;
        else if (dist[y] === INF) {
          dist[y] = dist[x] + 1;
          queue[tail++] = y;
        }
      }
    }
    if (!found) return matched;
    // Depth-first augmentation along the layers, with an explicit stack.
    for (let i = 0; i < left; i++) edgeAt[i] = offsets[i];
    for (let s = 0; s < left; s++) {
      if (matchL[s] >= 0) continue;
      let top = 0;
      stack[top++] = s;
      // Invariant: stack[0..top) is an alternating path from s along increasing dist.
      while (top > 0) {
        const x = stack[top - 1];
        if (edgeAt[x] === offsets[x + 1]) {
          dist[x] = INF;
          top--;
          continue;
        }
        const c = columns[edgeAt[x]];
        const y = matchR[c];
        if (y < 0) {
          // Augment: flip the path.
          for (let k = top - 1; k >= 0; k--) {
            const xk = stack[k];
            const ck = columns[edgeAt[xk]];
            matchL[xk] = ck;
            matchR[ck] = xk;
          }
          matched++;
          for (let k = 0; k < top; k++) dist[stack[k]] = INF;
          top = 0;
        } else if (dist[y] === dist[x] + 1) {
          stack[top++] = y;
        } else {
          edgeAt[x]++;
        }
      }
    }
  }
}
