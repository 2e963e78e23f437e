import type { Hyperparameters } from '../learn/classifier.js';
import type { StudyResult } from '../learn/evaluate.js';

/**
 * What the inner cross-validation chose in each outer fold, shaped for the report's accuracy part: per
 * (feature set, model), one row per distinct choice with the folds that made it and their accuracies. A
 * choice that changes from fold to fold is itself a finding (the data do not pin the hyperparameters down).
 */
export interface ChosenRow {
  features: string;
  model: string;
  /** The choice in words: 'depth 6 · grid 20 · kernel linear · C 1'. */
  choice: string;
  /** The outer folds that made it: '2' (one repeat) or '1.2' (repeat 1, fold 2), counted from 1. */
  folds: string[];
  /** Held-out accuracy of each of those folds. */
  accuracies: number[];
}

/** Rows of the table shown at most; the rest are counted in a note (metrics.json keeps every fold). */
export const CHOSEN_ROWS_SHOWN = 40;

const KEY_WORDS: Record<string, string> = { gridSize: 'grid', gamma: 'γ', varianceKept: 'variance kept' };

function valueWords(v: unknown): string {
  if (typeof v === 'number') return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(3)));
  return String(v);
}

/** 'depth 6 · grid 20 · kernel linear · C 1' (keys in the order the evaluation records them). */
export function choiceWords(chosen: Hyperparameters): string {
  const parts = Object.entries(chosen).map(([k, v]) => `${KEY_WORDS[k] ?? k} ${valueWords(v)}`);
  return parts.length === 0 ? 'defaults (nothing searched)' : parts.join(' · ');
}

export function chosenRows(results: readonly StudyResult[]): ChosenRow[] {
  const out: ChosenRow[] = [];
  for (const r of results) {
    const repeats = new Set(r.folds.map((f) => f.repeat)).size;
    const mine = new Map<string, ChosenRow>();
    for (const f of r.folds) {
      const choice = choiceWords(f.chosen);
      const row = mine.get(choice) ?? {
        features: r.features,
        model: r.model,
        choice,
        folds: [],
        accuracies: [],
      };
      row.folds.push(repeats > 1 ? `${f.repeat + 1}.${f.fold + 1}` : String(f.fold + 1));
      row.accuracies.push(f.accuracy);
      mine.set(choice, row);
    }
    out.push(...mine.values());
  }
  return out;
}
