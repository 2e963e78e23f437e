import * as vegaLite from 'vega-lite';
import { describe, expect, it } from 'vitest';
import { type DiagramSet, makeDiagram } from '../../src/core/diagram.js';
import { multiplierBand } from '../../src/report/bands.js';
import {
  accuracyChart,
  type ChartSpec,
  chartConfig,
  clippedAccuracyBars,
  confusionChart,
  diagramChart,
  importanceChart,
  importanceOrder,
  meanBandChart,
  meanLayers,
  renderSvg,
  SCALE_TITLE,
  scaleTitle,
  weightMapChart,
} from '../../src/report/charts.js';
import { classMeans } from '../../src/report/means.js';
import { CATEGORY_COLOURS } from '../../src/report/palette.js';

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

  it('keeps the accuracy axis at exactly [0, 1] and draws a bar that reaches past 1 up to the right edge', async () => {
    const rows = [
      { features: 'landscape', model: 'pca-svm', mean: 0.97, std: 0.05 },
      { features: 'raw', model: 'pca-svm', mean: 0.1, std: 0.2 },
      { features: 'combined', model: 'pca-svm', mean: 0.5, std: 0.1 },
    ];
    const spec = accuracyChart(rows, 0.5) as unknown as {
      layer: Array<{ encoding: { x: { scale?: { domain: number[]; clamp: boolean; nice: boolean } } } }>;
    };
    // Every layer pins the same scale, so no layer can widen or round the shared axis outwards.
    for (const layer of spec.layer)
      expect(layer.encoding.x.scale).toMatchObject({ domain: [0, 1], clamp: true, nice: false });
    expect(clippedAccuracyBars(rows)).toEqual([
      { features: 'landscape', model: 'pca-svm', at: 1 },
      { features: 'raw', model: 'pca-svm', at: 0 },
    ]);
    expect(clippedAccuracyBars([{ features: 'f', model: 'm', mean: 0.5, std: 0.6 }])[0].at).toBe('both');
    const svg = await renderSvg(accuracyChart(rows, 0.5));
    // The bars are <line transform="translate(x,y)" x2="length">; the plot is 440 wide.
    const layer = /class="mark-rule role-mark layer_1_marks"[^>]*>(.*?)<\/g>/s.exec(svg)?.[1] ?? '';
    const bars = [
      ...layer.matchAll(
        /aria-roledescription="rule mark" transform="translate\(([\d.]+),[\d.]+\)" x2="([\d.]+)"/g,
      ),
    ].map((m) => [Number(m[1]), Number(m[1]) + Number(m[2])]);
    expect(bars).toHaveLength(3);
    expect(bars[0][0]).toBeCloseTo(0.92 * 440, 6);
    expect(bars[0][1]).toBeCloseTo(440, 6); // 0.97 + 0.05 clipped to 1: the right edge, not beyond
    expect(bars[1][0]).toBe(0); // 0.1 − 0.2 clipped to 0
    expect(bars[1][1]).toBeCloseTo(0.3 * 440, 6);
    expect(textsOf(svg)).toContain(
      'cross-validated accuracy (mean ± 1 sd over folds, clipped to [0, 1]; dashed: chance)',
    );
    const ticks = textsOf(svg).filter((t) => /^\d\.\d$/.test(t));
    expect(ticks[0]).toBe('0.0');
    expect(ticks[ticks.length - 1]).toBe('1.0');
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

/** Samples with `pairs` H1 pairs each (nested, so `pairs` are alive at once), `n` per class. */
function setsOf(label: string, pairs: number, n: number, shift: number): DiagramSet[] {
  return Array.from({ length: n }, (_, i) => ({
    sample: `${label}-${i}`,
    label,
    diagrams: [
      makeDiagram(
        1,
        Array.from({ length: pairs }, (_, p): [number, number] => [
          p * 0.1 + shift * i,
          2 - p * 0.1 + shift * i,
        ]),
      ),
    ],
  }));
}

/** The compiled vega spec of a vega-lite spec, with our config. */
function compiled(spec: ChartSpec): {
  scales?: Array<{ name: string }>;
  legends?: unknown[];
  marks?: unknown[];
} {
  return vegaLite.compile({ ...spec, config: chartConfig() } as never).spec as never;
}

/** Every scale and legend of a compiled vega spec, at any depth of its groups. */
function scalesAndLegends(node: {
  scales?: Array<{ name: string }>;
  legends?: unknown[];
  marks?: unknown[];
}): {
  scales: string[];
  legends: Array<Record<string, unknown>>;
} {
  const scales = (node.scales ?? []).map((s) => s.name);
  const legends = [...((node.legends ?? []) as Array<Record<string, unknown>>)];
  for (const m of (node.marks ?? []) as Array<{ type: string }>) {
    if (m.type !== 'group') continue;
    const inner = scalesAndLegends(m as never);
    scales.push(...inner.scales);
    legends.push(...inner.legends);
  }
  return { scales, legends };
}

describe('class-mean charts', () => {
  // 'two' samples hold two H1 pairs alive at once, 'one' samples one: λ2 is zero for 'one', λ3 for both.
  const means = classMeans([...setsOf('two', 2, 6, 0.02), ...setsOf('one', 1, 6, 0.03)], {
    degrees: [1],
    depth: 3,
    gridSize: 40,
    exact: false,
    band: { draws: 50 },
  })[0];

  it('leaves out a layer that is zero for every class and a class that is zero in a layer', async () => {
    const content = meanLayers(means.classes, 4);
    expect(content).toEqual({
      depth: 3,
      shown: [1, 2],
      zeroForAll: [3],
      zeroFor: [{ layer: 2, classes: ['one'] }],
    });
    const spec = meanBandChart(1, means.classes, 4) as unknown as {
      data: { values: Array<{ class: string; layer: string }> };
      facet: { column: { sort: string[] } };
    };
    const rows = spec.data.values;
    expect(new Set(rows.map((r) => r.layer))).toEqual(new Set(['λ1  (layer 1)', 'λ2  (layer 2)']));
    expect(rows.filter((r) => r.class === 'one' && r.layer === 'λ2  (layer 2)')).toHaveLength(0);
    expect(rows.filter((r) => r.class === 'two' && r.layer === 'λ2  (layer 2)')).toHaveLength(40);
    expect(spec.facet.column.sort).toEqual(['λ1  (layer 1)', 'λ2  (layer 2)']);
    const texts = textsOf(await renderSvg(meanBandChart(1, means.classes, 4)));
    expect(texts).toContain('λ2  (layer 2)');
    expect(texts).not.toContain('λ3  (layer 3)');
  });

  it('drops a zero layer also when one band over all layers gives it a non-zero upper edge', () => {
    const all = classMeans([...setsOf('two', 2, 6, 0.02), ...setsOf('one', 1, 6, 0.03)], {
      degrees: [1],
      depth: 3,
      gridSize: 40,
      exact: false,
      band: { draws: 50, scope: 'all' },
    })[0].classes;
    const count = all[0].band.grid.count;
    expect(Math.max(...all[0].band.upper.subarray(2 * count, 3 * count))).toBeGreaterThan(0);
    expect(meanLayers(all, 4).zeroForAll).toEqual([3]);
  });

  it('has one legend, drawn from the lines at full colour, not from the pale bands', async () => {
    const spec = meanBandChart(1, means.classes, 4);
    const { legends } = scalesAndLegends(compiled(spec));
    expect(legends).toHaveLength(1);
    expect(legends[0]).toMatchObject({ title: 'class', symbolType: 'stroke', symbolOpacity: 1 });
    // No encode block carries the band's opacity into the legend symbols.
    expect(JSON.stringify(legends[0])).not.toContain('0.2');
    const svg = await renderSvg(spec);
    const symbols = [
      ...svg.matchAll(/role-legend-symbol[^>]*><path [^>]*stroke="([^"]+)"[^>]*opacity="([^"]+)"/g),
    ];
    expect(symbols.map((m) => m[1])).toEqual([CATEGORY_COLOURS[0], CATEGORY_COLOURS[1]]);
    expect(symbols.map((m) => m[2])).toEqual(['1', '1']);
  });

  it('puts every layer panel on one y scale, so a layer of tiny values looks tiny', async () => {
    // λ1 of height about 1, λ2 about 0.01 (every sample has a short second pair).
    const sets: DiagramSet[] = Array.from({ length: 6 }, (_, i) => ({
      sample: `s${i}`,
      label: 'x',
      diagrams: [
        makeDiagram(1, [
          [0, 2 + 0.1 * i],
          [1, 1.02 + 0.001 * i],
        ]),
      ],
    }));
    const tiny = classMeans(sets, {
      degrees: [1],
      depth: 2,
      gridSize: 400,
      exact: false,
      band: { draws: 50 },
    })[0];
    const spec = meanBandChart(1, tiny.classes, 4);
    expect((spec as { resolve?: { scale?: { y?: string } } }).resolve?.scale?.y).toBe('shared');
    const { scales } = scalesAndLegends(compiled(spec));
    expect(scales.filter((n) => n === 'y' || n.endsWith('_y'))).toEqual(['y']);
    // One y axis, on the first panel: its top tick is about λ1's height, which the λ2 panel shares.
    const texts = textsOf(await renderSvg(spec));
    expect(texts.filter((t) => t === 'λ(t)')).toHaveLength(1);
    const yTicks = texts
      .slice(0, texts.indexOf('λ(t)'))
      .filter((t) => /^[\d.]+$/.test(t))
      .map(Number);
    expect(Math.max(...yTicks)).toBeGreaterThan(0.9);
  });

  it('says on the scale axis when diagrams come from superlevel sets, and names the generic scale otherwise', async () => {
    expect(scaleTitle()).toBe(SCALE_TITLE);
    expect(scaleTitle('grey level')).toBe('filtration value t (superlevel sets: t = −grey level)');
    const plain = textsOf(await renderSvg(meanBandChart(1, means.classes, 4)));
    expect(plain.filter((t) => t === 'filtration scale t (data units)')).toHaveLength(1);
    const negated = textsOf(
      await renderSvg(meanBandChart(1, means.classes, 4, { superlevelOf: 'grey level' })),
    );
    expect(negated).toContain('filtration value t (superlevel sets: t = −grey level)');
    expect(negated).not.toContain('filtration scale t (data units)');
    const curves = [{ degree: 1, layer: 1, t: [-200, -100, 0], value: [0, 1, 0] }];
    const map = textsOf(
      await renderSvg(weightMapChart(1, curves, 'weight', undefined, { superlevelOf: 'grey level' })),
    );
    expect(map).toContain('filtration value t (superlevel sets: t = −grey level)');
    const plainMap = textsOf(await renderSvg(weightMapChart({ degree: 1 }, curves, 'weight')));
    expect(plainMap).toContain(SCALE_TITLE);
    expect(plainMap.join(' ')).not.toContain('object');
    const diagram = textsOf(
      await renderSvg(diagramChart([makeDiagram(0, [[-200, -50]])], 'frame', { superlevelOf: 'grey level' })),
    );
    expect(diagram).toContain('birth (−grey level)');
    expect(diagram).toContain('death (−grey level)');
  });
});

describe('importance chart', () => {
  it('orders groups by filtration, degree and layer as numbers, the raw features last', async () => {
    const given = ['H1 λ2', 'raw features', 'H0 λ10', 'erosion/H0 λ1', 'H0 λ2', 'H1 λ1'];
    const expected = ['H0 λ2', 'H0 λ10', 'H1 λ1', 'H1 λ2', 'erosion/H0 λ1', 'raw features'];
    expect(importanceOrder(given)).toEqual(expected);
    const spec = importanceChart(given.map((group, i) => ({ group, mean: 0.01 * (i + 1), std: 0.005 })));
    for (const layer of (spec as { layer: Array<{ encoding: { y: { sort: unknown } } }> }).layer)
      expect(layer.encoding.y.sort).toEqual(expected);
    // Drawn top to bottom in that order (an alphabetical axis would put 'H0 λ10' before 'H0 λ2').
    const texts = textsOf(await renderSvg(spec));
    const shown = texts.filter((t) => given.includes(t));
    expect(shown).toEqual(expected);
  });
});
