import { csvField, csvNumber } from '../io/csv.js';
import { type EvaluationResult, foldScore } from './evaluate.js';

/**
 * The per-sample and per-fold tables `landform evaluate` writes beside metrics.json. Both are plain CSV with
 * a header, rows in a fixed order and numbers in their shortest round-trip form, so the same seed gives the
 * same bytes (and so do worker threads: every number comes from the units' own outcomes).
 */

/** Name of the out-of-fold predictions in an evaluation folder. */
export const PREDICTIONS_FILE = 'predictions.csv';
/** Name of the per-fold scores in an evaluation folder. */
export const FOLDS_FILE = 'folds.csv';

/**
 * Out-of-fold predictions: `sample,label,features,model,repeat,fold,predicted,score:<class>…`. One row per
 * sample per (feature set, model, repeat) — every sample is held out exactly once per repeat — in the order
 * of metrics.json's results, then repeat, then the dataset's sample order. `fold` is the outer fold (from 1)
 * that held the sample out; the score columns are the model's class probabilities, in `classes` order.
 */
export function formatStudyPredictionsCsv(result: EvaluationResult): string {
  const { classes, sampleIds, labels } = result;
  const k = classes.length;
  const lines = [
    [
      'sample',
      'label',
      'features',
      'model',
      'repeat',
      'fold',
      'predicted',
      ...classes.map((c) => `score:${c}`),
    ]
      .map(csvField)
      .join(','),
  ];
  const n = sampleIds.length;
  for (const r of result.results) {
    const repeats = new Map<number, Array<{ fold: number; outcome: number; row: number }>>();
    r.folds.forEach((o, oi) => {
      let slots = repeats.get(o.repeat);
      if (!slots) {
        slots = new Array(n);
        repeats.set(o.repeat, slots);
      }
      for (let i = 0; i < o.test.length; i++) {
        const s = o.test[i];
        if (slots[s] !== undefined)
          throw new Error(`formatStudyPredictionsCsv: sample ${s} held out twice in repeat ${o.repeat}`);
        slots[s] = { fold: o.fold, outcome: oi, row: i };
      }
    });
    const prefix = `${csvField(r.features)},${csvField(r.model)}`;
    for (const repeat of [...repeats.keys()].sort((a, b) => a - b)) {
      const slots = repeats.get(repeat)!;
      for (let s = 0; s < n; s++) {
        const slot = slots[s];
        if (slot === undefined) continue;
        const o = r.folds[slot.outcome];
        let line =
          `${csvField(sampleIds[s])},${csvField(classes[labels[s]])},${prefix},${repeat + 1},${slot.fold + 1},` +
          csvField(classes[o.predicted[slot.row]]);
        const base = slot.row * o.scores.cols;
        for (let c = 0; c < k; c++) line += `,${csvNumber(o.scores.data[base + c])}`;
        lines.push(line);
      }
    }
  }
  return lines.join('\n') + '\n';
}

/**
 * Per-fold scores: `features,model,repeat,fold,samples,correct,accuracy,balanced_accuracy,macro_f1`, one row
 * per outer fold of each (feature set, model), in metrics.json's order; values rounded as there (6 decimals).
 * metrics.json's `accuracy.mean` is the plain mean of this file's `accuracy` over a result's rows.
 */
export function formatFoldsCsv(result: EvaluationResult): string {
  const lines = ['features,model,repeat,fold,samples,correct,accuracy,balanced_accuracy,macro_f1'];
  const value = (v: number | null): string => (v === null ? '' : csvNumber(v));
  for (const r of result.results) {
    for (const o of r.folds) {
      const f = foldScore(o);
      lines.push(
        [
          csvField(r.features),
          csvField(r.model),
          f.repeat,
          f.fold,
          f.samples,
          f.correct,
          value(f.accuracy),
          value(f.balancedAccuracy),
          value(f.macroF1),
        ].join(','),
      );
    }
  }
  return lines.join('\n') + '\n';
}
