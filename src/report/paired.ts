import { escapeHtml } from './escape.js';

/**
 * The report's table of paired differences (a feature set minus the raw baseline, same model, same outer
 * folds), shown under the accuracy chart. The numbers come from the evaluation (src/learn/paired.ts).
 */
export interface PairedRow {
  features: string;
  baseline: string;
  model: string;
  pairs: number;
  mean: number;
  lower: number;
  upper: number;
  level: number;
}

/** A difference with its sign (a typographic minus for negatives): +0.030, −0.020, 0.000. */
export function signedDifference(v: number, digits = 3): string {
  if (!Number.isFinite(v)) return '—';
  const text = Math.abs(v).toFixed(digits);
  if (Number(text) === 0) return text;
  return `${v > 0 ? '+' : '−'}${text}`;
}

/** The table as an HTML fragment; empty text when there is nothing to compare (no raw baseline in the study). */
export function pairedTableHtml(rows: readonly PairedRow[]): string {
  if (rows.length === 0) return '';
  const level = Math.round(rows[0].level * 100);
  const body = rows
    .map((r) => {
      const verdict =
        r.lower > 0
          ? `${escapeHtml(r.features)} higher`
          : r.upper < 0
            ? `${escapeHtml(r.baseline)} higher`
            : 'no clear difference';
      return (
        `<tr data-paired="${escapeHtml(`${r.features}/${r.model}`)}"><td>${escapeHtml(r.features)} − ${escapeHtml(r.baseline)}</td><td>${escapeHtml(r.model)}</td>` +
        `<td class="num">${signedDifference(r.mean)} [${signedDifference(r.lower)}, ${signedDifference(r.upper)}]</td>` +
        `<td class="num">${r.pairs}</td><td>${verdict}</td></tr>`
      );
    })
    .join('');
  return (
    `<p class="how"><strong>Paired differences in accuracy.</strong> Each fold's accuracy of the feature set minus that of the raw baseline with the same model, on the same held-out samples; ` +
    `the interval is the corrected resampled t interval (Nadeau &amp; Bengio, 2003), wider than a plain t interval because the folds share training samples. ` +
    `An interval that contains 0 shows no difference these samples can resolve; one that excludes it is still an estimate from these samples only.</p>` +
    `<table class="grid paired"><tr><th>comparison</th><th>model</th><th class="num">mean difference [${level}% interval]</th><th class="num">folds</th><th>reading</th></tr>${body}</table>`
  );
}
