import { describe, expect, it } from 'vitest';
import {
  accuracy,
  argmaxRows,
  balancedAccuracy,
  confusionMatrix,
  formatConfusionText,
  macroF1,
  scoreLabels,
  summarize,
} from '../../src/learn/metrics.js';

// Definitions: balanced accuracy as the mean per-class recall (Brodersen, Ong, Stephan, Buhmann, "The balanced
// accuracy and its posterior distribution", 2010); macro-F1 as the arithmetic mean of per-class F1 scores
// (the "averaged F1" of Opitz & Burst, "Macro F1 and Macro F1", 2019). The matrices below are worked by hand.
describe('metrics on hand-worked confusion matrices', () => {
  // Three classes; rows true, columns predicted.
  //        p0 p1 p2
  //   t0 [  5  1  0 ]   recall 5/6
  //   t1 [  2  3  1 ]   recall 3/6
  //   t2 [  0  0  4 ]   recall 4/4
  const c = [
    [5, 1, 0],
    [2, 3, 1],
    [0, 0, 4],
  ];
  it('accuracy = diagonal / total = 12/16', () => {
    expect(accuracy(c)).toBeCloseTo(0.75, 12);
  });
  it('balanced accuracy = (5/6 + 3/6 + 4/4) / 3', () => {
    expect(balancedAccuracy(c)).toBeCloseTo((5 / 6 + 0.5 + 1) / 3, 12);
  });
  it('macro-F1 = mean of 2TP/(2TP+FP+FN): 10/13, 6/10, 8/9', () => {
    // class 0: TP 5, FP 2, FN 1 → 10/13; class 1: TP 3, FP 1, FN 3 → 6/10; class 2: TP 4, FP 1, FN 0 → 8/9
    expect(macroF1(c)).toBeCloseTo((10 / 13 + 6 / 10 + 8 / 9) / 3, 12);
  });
  it('builds the confusion matrix from truths and predictions', () => {
    const truth = [0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1, 2, 2, 2, 2];
    const pred = [0, 0, 0, 0, 0, 1, 0, 0, 1, 1, 1, 2, 2, 2, 2, 2];
    expect(confusionMatrix(truth, pred, 3)).toEqual(c);
  });
  it('imbalanced: predicting the majority everywhere scores accuracy 0.9 but balanced accuracy 0.5', () => {
    // 90 of class 0, 10 of class 1, everything predicted 0 — the classic case in Brodersen et al. 2010.
    const m = [
      [90, 0],
      [10, 0],
    ];
    expect(accuracy(m)).toBeCloseTo(0.9, 12);
    expect(balancedAccuracy(m)).toBeCloseTo(0.5, 12);
    // F1 class 0 = 180/190, class 1 = 0
    expect(macroF1(m)).toBeCloseTo(180 / 190 / 2, 12);
  });
  it('summarize gives the mean and the n−1 standard deviation', () => {
    const s = summarize([0.8, 0.9, 1.0]);
    expect(s.mean).toBeCloseTo(0.9, 12);
    expect(s.std).toBeCloseTo(0.1, 12);
    expect(summarize([0.7]).std).toBe(0);
  });
  it('argmaxRows breaks ties towards the lower class', () => {
    const p = argmaxRows({ rows: 2, cols: 3, data: Float64Array.from([0.2, 0.5, 0.3, 0.4, 0.2, 0.4]) });
    expect([...p]).toEqual([1, 0]);
  });
});

describe('scoreLabels (predict on labelled samples), worked by hand from the definitions above', () => {
  // Classes a, b, c. Scored samples (label among the classes):
  //   a→a, a→b, b→b, b→b, c→a          → 3 of 5 correct
  // plus one empty label (a sample to predict) and two labels the model does not know (z→c, z→c).
  const labels = ['a', 'a', 'b', 'b', 'c', '', 'z', 'z'];
  const predicted = ['a', 'b', 'b', 'b', 'a', 'c', 'c', 'c'];
  const s = scoreLabels(labels, predicted, ['a', 'b', 'c']);

  it('counts only labels among the classes, rows true and columns predicted', () => {
    expect(s.confusion).toEqual([
      [1, 1, 0],
      [0, 2, 0],
      [1, 0, 0],
    ]);
    expect(s.scored).toBe(5);
    expect(s.correct).toBe(3);
    expect(s.accuracy).toBe(3 / 5);
    // recalls 1/2, 2/2, 0/1
    expect(s.balancedAccuracy).toBeCloseTo((0.5 + 1 + 0) / 3, 12);
  });

  it('keeps unknown labels and unlabelled samples apart', () => {
    expect(s.unlabelled).toBe(1);
    expect(s.unknown).toEqual([{ label: 'z', count: 2, predicted: [0, 0, 2] }]);
  });

  it('gives no accuracy when nothing is labelled', () => {
    const none = scoreLabels(['', ''], ['a', 'b'], ['a', 'b']);
    expect(none.scored).toBe(0);
    expect(Number.isNaN(none.accuracy)).toBe(true);
    expect(none.unlabelled).toBe(2);
  });

  it('prints the matrix with the class names, columns aligned', () => {
    expect(
      formatConfusionText(
        ['a', 'bb'],
        [
          [10, 0],
          [2, 7],
        ],
      ),
    ).toEqual(['true \\ predicted   a  bb', 'a                 10   0', 'bb                 2   7']);
  });
});
