/**
 * Holm's step-down correction for a family of m tests (Holm, "A simple sequentially rejective multiple test
 * procedure", Scandinavian Journal of Statistics, 1979). It controls the family-wise error rate under any
 * dependence between the tests and is uniformly more powerful than Bonferroni.
 *
 * Adjusted p-values: sort the p-values increasingly, p(1) ≤ … ≤ p(m); then
 *   adjusted(i) = max over j ≤ i of min(1, (m − j + 1) · p(j)),
 * and a test is rejected at level α exactly when its adjusted p-value is ≤ α.
 */
export function holmAdjust(pValues: ArrayLike<number>): Float64Array {
  const m = pValues.length;
  const order = new Int32Array(m);
  for (let i = 0; i < m; i++) {
    const p = pValues[i];
    if (!(p >= 0 && p <= 1)) throw new Error(`holmAdjust: p-value ${p} at ${i} is not in [0, 1]`);
    order[i] = i;
  }
  // Stable sort by p so that ties keep their input order.
  const sorted = Array.from(order).sort((a, b) => pValues[a] - pValues[b] || a - b);
  const adjusted = new Float64Array(m);
  // Invariant: `running` is the largest min(1, (m − j) · p(j)) over the first j sorted tests seen so far.
  let running = 0;
  for (let j = 0; j < m; j++) {
    const index = sorted[j];
    const candidate = Math.min(1, (m - j) * pValues[index]);
    if (candidate > running) running = candidate;
    adjusted[index] = running;
  }
  return adjusted;
}

/** Which hypotheses Holm's procedure rejects at family-wise level `alpha` (true = rejected). */
export function holmRejects(pValues: ArrayLike<number>, alpha = 0.05): boolean[] {
  const adjusted = holmAdjust(pValues);
  return Array.from(adjusted, (p) => p <= alpha);
}
