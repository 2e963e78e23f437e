/**
 * Sorting persistence pairs by birth ascending, then death descending — the order the landscape sweep
 * needs — without a comparator on the whole array: a stable least-significant-digit radix sort (8-bit
 * digits, constant digits skipped) on the high 32 bits of each birth, read as an order-preserving
 * unsigned key; then each run of equal keys (births equal in their top 20 mantissa bits) is finished with
 * the full comparison — insertion for short runs, a comparison sort for long ones (e.g. all births 0 in H0).
 */

const scratchFloat = new Float64Array(1);
const scratchWords = new Uint32Array(scratchFloat.buffer);
/** Index of the high 32-bit word of a double on this machine. */
const HIGH = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;
/** Runs longer than this are finished by a comparison sort instead of insertion. */
const INSERTION_LIMIT = 24;

/** The high 32 bits of an order-preserving unsigned key of x (−0 treated as +0). */
function highKey(x: number): number {
  scratchFloat[0] = x + 0;
  const h = scratchWords[HIGH];
  return (h & 0x80000000 ? ~h : h | 0x80000000) >>> 0;
}

/** The indices in `order`, sorted by births ascending and, among equal births, deaths descending. */
export function sortPairs(births: Float64Array, deaths: Float64Array, order: Uint32Array): Uint32Array {
  const n = order.length;
  if (n < 2) return order;
  let keys = new Uint32Array(n);
  for (let i = 0; i < n; i++) keys[i] = highKey(births[order[i]]);
  let o = order.slice();
  let keys2 = new Uint32Array(n);
  let o2 = new Uint32Array(n);
  const counts = new Uint32Array(256);
  for (let shift = 0; shift < 32; shift += 8) {
    counts.fill(0);
    for (let i = 0; i < n; i++) counts[(keys[i] >>> shift) & 255]++;
    let constant = false;
    for (let c = 0; c < 256; c++) if (counts[c] === n) constant = true;
    if (constant) continue;
    let sum = 0;
    for (let c = 0; c < 256; c++) {
      const k = counts[c];
      counts[c] = sum;
      sum += k;
    }
    // Invariant: counts[c] is the next free slot for digit c; equal digits keep their relative order.
    for (let i = 0; i < n; i++) {
      const at = counts[(keys[i] >>> shift) & 255]++;
      o2[at] = o[i];
      keys2[at] = keys[i];
    }
    [o, o2] = [o2, o];
    [keys, keys2] = [keys2, keys];
  }
  const before = (x: number, y: number): boolean =>
    births[x] < births[y] || (births[x] === births[y] && deaths[x] > deaths[y]);
  // Invariant: o[0..start) is in final order; the run [start, end) shares one key.
  for (let start = 0; start < n; ) {
    let end = start + 1;
    while (end < n && keys[end] === keys[start]) end++;
    if (end - start > INSERTION_LIMIT) {
      o.subarray(start, end).sort((x, y) => births[x] - births[y] || deaths[y] - deaths[x]);
    } else {
      for (let i = start + 1; i < end; i++) {
        const item = o[i];
        let j = i;
        while (j > start && before(item, o[j - 1])) {
          o[j] = o[j - 1];
          j--;
        }
        o[j] = item;
      }
    }
    start = end;
  }
  return o;
}
