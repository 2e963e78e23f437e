import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import { multiplierBand } from '../../src/report/bands.js';
import {
  accuracyChart,
  confusionChart,
  diagramChart,
  meanBandChart,
  renderSvg,
} from '../../src/report/charts.js';

function textsOf(svg: string): string[] {
  return [...svg.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]);
}

describe('charts', () => {
  it('writes every confusion count into its cell and names both axes', async () => {
    const svg = await renderSvg(
      confusionChart(
        ['a', 'b'],
        [
          [7, 1],
          [2, 9],
        ],
        'landscape · pca-svm',
      ),
    );
    const texts = textsOf(svg);
    for (const count of ['7', '1', '2', '9']) expect(texts).toContain(count);
    expect(texts).toContain('true class');
    expect(texts).toContain('predicted class');
    expect(svg.startsWith('<svg')).toBe(true);
  });

  it('draws one dot per feature set × model on a 0–1 accuracy axis', async () => {
    const spec = accuracyChart(
      [
        { features: 'landscape', model: 'pca-svm', mean: 0.9, std: 0.05 },
        { features: 'raw', model: 'pca-svm', mean: 0.6, std: 0.1 },
        { features: 'raw', model: 'dense', mean: 0.55, std: 0.5 },
      ],
      1 / 3,
    );
    const svg = await renderSvg(spec);
    // Three symbols in the point layer: vega writes each as a <path> inside a mark-symbol group.
    const symbols = /<g class="mark-symbol[^"]*"[^>]*>(.*?)<\/g>/s.exec(svg)?.[1] ?? '';
    expect(symbols.match(/<path/g)?.length).toBe(3);
    // Error bars are clipped to [0, 1]: 0.55 + 0.5 is drawn to 1.
    const values = (spec as { data: { values: Array<{ high: number; low: number }> } }).data.values;
    expect(values[2].high).toBe(1);
    expect(values[2].low).toBeCloseTo(0.05, 12);
    expect(textsOf(svg)).toContain('1.0');
  });

  it('gives ids unique to each chart so several can share one page', async () => {
    const band = multiplierBand(
      {
        samples: 3,
        depth: 2,
        grid: { start: 0, stop: 1, count: 5 },
        values: Float64Array.from({ length: 30 }, (_, i) => i % 7),
      },
      { draws: 20 },
    );
    const a = await renderSvg(meanBandChart(1, [{ label: 'x', band }], 2));
    const b = await renderSvg(meanBandChart(1, [{ label: 'x', band }], 2));
    const ids = (svg: string) => [...svg.matchAll(/\bid="([^"]+)"/g)].map((m) => m[1]);
    for (const id of ids(a)) expect(ids(b)).not.toContain(id);
  });

  it('refuses to fetch data from anywhere', async () => {
    await expect(
      renderSvg({ data: { url: 'https://example.org/data.json' }, mark: 'point' } as never),
    ).rejects.toThrow();
  });

  it('places essential classes above the largest finite death', () => {
    const spec = diagramChart(
      [
        makeDiagram(0, [
          [0, 1],
          [0, Infinity],
        ]),
        makeDiagram(1, [[0.5, 2]]),
      ],
      'one sample',
    );
    const points = (
      spec as { layer: Array<{ data: { values: Array<{ degree: string; death: number; kind?: string }> } }> }
    ).layer[1].data.values;
    const essential = points.find((p) => p.kind === 'essential (∞)');
    expect(essential?.death).toBeGreaterThan(2);
    expect(points.filter((p) => p.degree === 'H1')).toHaveLength(1);
  });
});
