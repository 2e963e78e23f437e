import { channelName } from '../core/diagram.js';
import type { EvaluationResult, StudyResult } from '../learn/evaluate.js';
import { bestResult } from '../learn/explain.js';
import { type ContrastTest, permutationReach, unreachableSentence } from './permutation.js';

/** How the findings name each feature set built from diagrams alone. */
const SHAPE_SET_WORDS: Record<string, string> = {
  landscape: 'landscape features',
  betti: 'Betti-curve features',
  stats: 'persistence statistics',
  pimage: 'persistence-image features',
};

/** The best result among the feature sets built from diagrams alone (landscape, betti, stats, pimage). */
function bestShape(results: readonly StudyResult[]): { result: StudyResult; words: string } | undefined {
  let out: { result: StudyResult; words: string } | undefined;
  for (const set of Object.keys(SHAPE_SET_WORDS)) {
    const r = bestResult(results, set);
    if (r && (!out || r.accuracy.mean > out.result.accuracy.mean))
      out = { result: r, words: SHAPE_SET_WORDS[set] };
  }
  return out;
}

/**
 * Plain-words findings: how the best features built from diagrams alone compare with the raw baseline, and
 * what the contrasts say. Given the permutations per test, a family whose smallest possible adjusted p is
 * above 5% is said to be untestable at that level instead of counted as "0 of N differ".
 */
export function findingsOf(
  evaluation: EvaluationResult,
  contrasts: readonly ContrastTest[],
  permutations?: number,
): string[] {
  const out: string[] = [];
  const pct = (v: number) => `${(100 * v).toFixed(0)}%`;
  const shape = bestShape(evaluation.results);
  const land = shape?.result;
  const words = shape?.words ?? 'landscape features';
  const Words = words.charAt(0).toUpperCase() + words.slice(1);
  const raw = bestResult(evaluation.results, 'raw');
  const combined = bestResult(evaluation.results, 'combined');
  const pair = land && evaluation.paired?.find((p) => p.features === land.features && p.model === land.model);
  if (land && raw && pair) {
    // The paired interval (same model, same outer folds; src/learn/paired.ts) decides the wording: a gap whose
    // interval holds zero is not called a gain, however large the means look.
    const l = `${words} (${land.model}) reach ${pct(land.accuracy.mean)} ± ${pct(land.accuracy.std)}`;
    const r = `the raw baseline (${raw.model}) ${pct(raw.accuracy.mean)} ± ${pct(raw.accuracy.std)}`;
    const points = (v: number) => `${v > 0 ? '+' : v < 0 ? '−' : ''}${Math.abs(100 * v).toFixed(0)}`;
    const interval = `with ${pair.model} on both, the paired difference over the same ${pair.pairs} folds is ${points(pair.mean)} points [${points(pair.lower)}, ${points(pair.upper)}] (${Math.round(100 * pair.level)}% interval)`;
    if (pair.lower > 0) out.push(`Shape helps here: ${l}, above ${r}; ${interval}, which excludes zero.`);
    else if (pair.upper < 0)
      out.push(
        `The raw baseline wins on this set: ${r} against ${l}; ${interval}, which excludes zero. A plain summary of the data already separates these classes; persistent homology adds nothing here.`,
      );
    else if (pair.mean > 0.02)
      out.push(
        `${Words} are somewhat ahead: ${l} against ${r}, but ${interval}, which includes zero: treat the gain as unproven.`,
      );
    else if (pair.mean >= -0.02)
      out.push(`No gain from shape on this set: ${l} and ${r} perform alike; ${interval}.`);
    else
      out.push(
        `The raw baseline is somewhat ahead: ${r} against ${l}, but ${interval}, which includes zero.`,
      );
  } else if (land && raw) {
    const gap = land.accuracy.mean - raw.accuracy.mean;
    const spread = Math.max(land.accuracy.std, raw.accuracy.std);
    const l = `${words} (${land.model}) reach ${pct(land.accuracy.mean)} ± ${pct(land.accuracy.std)}`;
    const r = `the raw baseline (${raw.model}) ${pct(raw.accuracy.mean)} ± ${pct(raw.accuracy.std)}`;
    if (gap >= 0.1 && gap > spread) out.push(`Shape helps here: ${l}, clearly above ${r}.`);
    else if (gap > 0.02)
      out.push(
        `${Words} are somewhat ahead: ${l} against ${r}; the gap is within about one fold-to-fold spread, so treat it as suggestive.`,
      );
    else if (gap >= -0.02) out.push(`No gain from shape on this set: ${l} and ${r} perform alike.`);
    else
      out.push(
        `The raw baseline wins on this set: ${r} against ${l}. A plain summary of the data already separates these classes; persistent homology adds nothing here.`,
      );
  } else if (land) {
    out.push(`${Words} (${land.model}) reach ${pct(land.accuracy.mean)} ± ${pct(land.accuracy.std)}.`);
  }
  if (combined && land && raw) {
    const top = Math.max(land.accuracy.mean, raw.accuracy.mean);
    out.push(
      combined.accuracy.mean > top + 0.02
        ? `Landscape and raw features together (${pct(combined.accuracy.mean)}) beat either alone: they carry different information.`
        : `Combining landscape and raw features gives ${pct(combined.accuracy.mean)}, no better than the better of the two alone.`,
    );
  }
  const unreachable =
    permutations === undefined
      ? undefined
      : unreachableSentence(
          permutationReach(contrasts.length, permutations),
          'class-pair × degree contrasts',
        );
  if (unreachable) out.push(unreachable);
  else if (contrasts.length > 0) {
    const differ = contrasts.filter((t) => t.pAdjusted <= 0.05);
    out.push(
      `${differ.length} of ${contrasts.length} class-pair × degree contrasts show different mean landscapes at the 5% level after Holm's correction` +
        (differ.length > 0
          ? ` (${differ
              .slice(0, 4)
              .map((t) => `${channelName(t)} ${t.a} vs ${t.b}`)
              .join('; ')}${differ.length > 4 ? '; …' : ''}).`
          : '.'),
    );
  }
  return out;
}
