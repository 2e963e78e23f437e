import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import type { Dataset } from '../../src/core/sample.js';
import { formatSummary, summarizeDataset } from '../../src/io/summary.js';

describe('dataset summary', () => {
  it('counts classes, unlabelled samples and the median size', () => {
    const d: Dataset = {
      kind: 'points',
      source: 'x.csv',
      samples: [
        { kind: 'points', id: 'a', label: 'u', dim: 2, count: 1, coords: Float64Array.from([0, 1]) },
        {
          kind: 'points',
          id: 'b',
          label: 'u',
          dim: 2,
          count: 3,
          coords: Float64Array.from([0, 1, 2, 3, -4, 5]),
        },
        { kind: 'points', id: 'c', label: 'v', dim: 2, count: 2, coords: Float64Array.from([0, 1, 2, 3]) },
        {
          kind: 'points',
          id: 'd',
          label: '',
          dim: 2,
          count: 4,
          coords: Float64Array.from([0, 1, 2, 3, 4, 5, 6, 7.5]),
        },
      ],
    };
    const s = summarizeDataset(d);
    expect(s.classes).toEqual([
      { label: 'u', count: 2 },
      { label: 'v', count: 1 },
    ]);
    expect(s.unlabelled).toBe(1);
    // Median of an even count is the mean of the middle two: (2 + 3) / 2.
    expect(s.sizes).toEqual([{ what: 'points per sample', min: 1, median: 2.5, max: 4 }]);
    expect(s.facts).toContainEqual({ name: 'coordinates', value: '-4 to 7.500' });
    const text = formatSummary(s);
    expect(text).toMatch(/^classes\s+2: u 2, v 1$/m);
    expect(text).toMatch(/^unlabelled\s+1$/m);
    expect(text).toMatch(/smallest class has 1 samples/);
  });

  it('reports degrees, pairs and essential classes of diagram datasets', () => {
    const d: Dataset = {
      kind: 'diagrams',
      source: 'd.csv',
      samples: [
        {
          kind: 'diagrams',
          id: 'a',
          label: 'x',
          diagrams: [
            makeDiagram(0, [
              [0, Infinity],
              [0, 1],
            ]),
            makeDiagram(1, [[0.5, 0.7]]),
          ],
        },
        {
          kind: 'diagrams',
          id: 'b',
          label: 'x',
          diagrams: [makeDiagram(0, [[0, Infinity]]), makeDiagram(1, [])],
        },
      ],
    };
    const s = summarizeDataset(d);
    expect(s.facts).toContainEqual({ name: 'degrees', value: 'H0, H1' });
    expect(s.facts).toContainEqual({ name: 'essential classes', value: '2' });
    expect(s.sizes.map((r) => [r.what, r.min, r.max])).toEqual([
      ['H0 pairs per sample', 1, 2],
      ['H1 pairs per sample', 0, 1],
    ]);
    expect(formatSummary(s)).toMatch(/one class only/);
  });
});
