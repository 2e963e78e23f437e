import type { TopLevelSpec } from 'vega-lite';
import { asChannel, type Channel, type Diagram } from '../core/diagram.js';
import type { WeightCurve } from '../learn/importance.js';
import type { SampledBand } from './bands.js';
import {
  CATEGORY_COLOURS,
  DIVERGING_COLOURS,
  FONT_STACK,
  INK,
  MUTED_INK,
  RULE,
  SEQUENTIAL_RAMP,
} from './palette.js';
import { findActiveContent } from './svg-check.js';

export type { WeightCurve };

/**
 * The report's charts: each is a vega-lite spec built from plain data, compiled to vega and rendered to an
 * SVG string in Node with `View.toSVG()` on the headless renderer (`renderer: 'none'`). vega and vega-lite
 * are loaded lazily, only when a chart is rendered. Text in the SVG (class names, sample ids) is escaped by
 * vega's SVG writer; `renderSvg` also refuses anything that is not plain SVG.
 */
export type ChartSpec = TopLevelSpec;

const AXIS = {
  labelColor: MUTED_INK,
  titleColor: INK,
  domainColor: '#8a919c',
  tickColor: '#8a919c',
  gridColor: '#eceef2',
  labelFontSize: 11,
  titleFontSize: 12,
  titleFontWeight: 600,
  labelFont: FONT_STACK,
  titleFont: FONT_STACK,
} as const;

/** The shared config: our fonts, axes and palette. */
export function chartConfig(): Record<string, unknown> {
  return {
    font: FONT_STACK,
    background: '#ffffff',
    view: { stroke: RULE, strokeWidth: 1 },
    axis: AXIS,
    legend: {
      labelColor: INK,
      titleColor: INK,
      labelFontSize: 11,
      titleFontSize: 12,
      titleFontWeight: 600,
      labelLimit: 220,
    },
    header: { labelColor: INK, titleColor: INK, labelFontSize: 12, labelFontWeight: 600, titleFontSize: 12 },
    title: { color: INK, fontSize: 13, fontWeight: 600, anchor: 'start', offset: 8 },
    range: { category: [...CATEGORY_COLOURS] },
  };
}

let idCounter = 0;

/** Compiles a vega-lite spec and renders it to SVG text. */
export async function renderSvg(spec: ChartSpec): Promise<string> {
  const [vl, vega] = await Promise.all([import('vega-lite'), import('vega')]);
  const compiled = vl.compile({
    ...spec,
    config: { ...chartConfig(), ...(spec.config ?? {}) },
  } as TopLevelSpec).spec;
  // A loader that refuses every external resource: the charts are built from inline data only.
  // vega only logs a failed load and draws the chart empty, so the refusal is remembered and raised below.
  const loader = vega.loader();
  let refused: string | undefined;
  loader.load = async (uri: string) => {
    refused ??= uri;
    throw new Error(`charts: refusing to load ${uri}; charts use inline data only`);
  };
  const view = new vega.View(vega.parse(compiled), { renderer: 'none', loader, logLevel: vega.None });
  try {
    let svg = await view.toSVG();
    if (refused !== undefined)
      throw new Error(`charts: refusing to load ${refused}; charts use inline data only`);
    const active = findActiveContent(svg);
    if (active !== undefined) throw new Error(`charts: rendered SVG contains active content (${active})`);
    // Give clip paths and gradients ids unique to this chart so many charts can live on one page.
    const prefix = `c${++idCounter}-`;
    svg = svg.replace(/\bid="([^"]+)"/g, `id="${prefix}$1"`).replace(/url\(#([^)]+)\)/g, `url(#${prefix}$1)`);
    return svg;
  } finally {
    view.finalize();
  }
}

/** Keeps at most `max` evenly spaced indices of 0..n−1 (always the first and last): smaller SVGs. */
function thinned(n: number, max: number): number[] {
  if (n <= max) return Array.from({ length: n }, (_, i) => i);
  const out: number[] = [];
  for (let k = 0; k < max; k++) out.push(Math.round((k * (n - 1)) / (max - 1)));
  return [...new Set(out)];
}

function round(v: number, digits = 5): number {
  return Number.isFinite(v) ? Number(v.toPrecision(digits)) : v;
}

/** Colours of H0, H1, H2 in the diagram charts (also used for the key in the page text). */
export const DEGREE_COLOURS: readonly string[] = [
  CATEGORY_COLOURS[6],
  CATEGORY_COLOURS[0],
  CATEGORY_COLOURS[1],
];

export interface AccuracyRow {
  features: string;
  model: string;
  mean: number;
  std: number;
}

/** Accuracy of every feature set × model: a dot at the mean and a bar of ± one standard deviation over folds. */
export function accuracyChart(rows: readonly AccuracyRow[], chance: number): ChartSpec {
  const values = rows.map((r) => ({
    features: r.features,
    model: r.model,
    mean: round(r.mean),
    low: round(Math.max(0, r.mean - r.std)),
    high: round(Math.min(1, r.mean + r.std)),
  }));
  const y = { field: 'features', type: 'nominal', title: 'feature set', sort: null } as const;
  return {
    width: 440,
    height: { step: 26 },
    data: { values },
    layer: [
      {
        data: { values: [{ chance: round(chance) }] },
        mark: { type: 'rule', strokeDash: [4, 3], color: '#9aa0a6' },
        encoding: { x: { field: 'chance', type: 'quantitative' } },
      },
      {
        mark: { type: 'rule', strokeWidth: 2 },
        encoding: {
          y,
          yOffset: { field: 'model', type: 'nominal' },
          x: {
            field: 'low',
            type: 'quantitative',
            scale: { domain: [0, 1] },
            title: 'cross-validated accuracy (mean ± 1 sd over folds; dashed: chance)',
          },
          x2: { field: 'high' },
          color: { field: 'model', type: 'nominal', title: 'model' },
        },
      },
      {
        mark: { type: 'point', filled: true, size: 60 },
        encoding: {
          y,
          yOffset: { field: 'model', type: 'nominal' },
          x: { field: 'mean', type: 'quantitative' },
          color: { field: 'model', type: 'nominal', title: 'model' },
          shape: { field: 'model', type: 'nominal', title: 'model' },
        },
      },
    ],
  } as ChartSpec;
}

/** A confusion matrix as a heat map of row-normalised rates with the counts written in each cell. */
export function confusionChart(
  classes: readonly string[],
  matrix: readonly (readonly number[])[],
  title: string,
): ChartSpec {
  const values: Array<Record<string, unknown>> = [];
  for (let i = 0; i < classes.length; i++) {
    const total = matrix[i].reduce((s, v) => s + v, 0);
    for (let j = 0; j < classes.length; j++) {
      values.push({
        truth: classes[i],
        predicted: classes[j],
        count: matrix[i][j],
        rate: total > 0 ? round(matrix[i][j] / total, 4) : 0,
      });
    }
  }
  const size = Math.max(90, Math.min(220, 48 * classes.length));
  const order = [...classes];
  return {
    title: { text: title },
    width: size,
    height: size,
    data: { values },
    encoding: {
      x: {
        field: 'predicted',
        type: 'nominal',
        sort: order,
        title: 'predicted class',
        axis: { labelAngle: -30, labelLimit: 110 },
      },
      y: { field: 'truth', type: 'nominal', sort: order, title: 'true class', axis: { labelLimit: 110 } },
    },
    layer: [
      {
        mark: { type: 'rect', stroke: '#ffffff', strokeWidth: 1 },
        encoding: {
          color: {
            field: 'rate',
            type: 'quantitative',
            scale: { domain: [0, 1], range: [...SEQUENTIAL_RAMP] },
            legend: null,
          },
        },
      },
      {
        mark: { type: 'text', fontSize: 12, fontWeight: 600 },
        encoding: {
          text: { field: 'count', type: 'quantitative' },
          color: { condition: { test: 'datum.rate > 0.55', value: '#ffffff' }, value: INK },
        },
      },
    ],
  } as ChartSpec;
}

/** The degree's (or channel's) name in words, for titles: 'H1 · loops', 'erosion · H1 · loops'. */
export function degreeName(slot: number | Channel): string {
  const { degree, filtration } = asChannel(slot);
  const words =
    degree === 0
      ? 'H0 · connected pieces'
      : degree === 1
        ? 'H1 · loops'
        : degree === 2
          ? 'H2 · voids'
          : `H${degree}`;
  return filtration === undefined ? words : `${filtration} · ${words}`;
}

/** A colour scale that gives each class the same colour in every chart of the page. */
export function classColour(classes: readonly string[]): Record<string, unknown> {
  return {
    domain: [...classes],
    range: classes.map((_, i) => CATEGORY_COLOURS[i % CATEGORY_COLOURS.length]),
  };
}

/**
 * Per degree: the mean landscape of every class with its simultaneous band, one panel per layer (the first
 * `layers` layers, side by side), classes told apart by colour (the same colour for a class on the whole page).
 */
export function meanBandChart(
  degree: number | Channel,
  classes: ReadonlyArray<{ label: string; band: SampledBand }>,
  layers = 3,
  maxPoints = 120,
): ChartSpec {
  const values: Array<Record<string, unknown>> = [];
  for (const { label, band } of classes) {
    const count = band.grid.count;
    const step = count > 1 ? (band.grid.stop - band.grid.start) / (count - 1) : 0;
    const keep = thinned(count, maxPoints);
    for (let k = 0; k < Math.min(layers, band.depth); k++) {
      for (const j of keep) {
        values.push({
          class: label,
          layer: `λ${k + 1}  (layer ${k + 1})`,
          t: round(band.grid.start + j * step),
          mean: round(band.mean[k * count + j]),
          lower: round(band.lower[k * count + j]),
          upper: round(band.upper[k * count + j]),
        });
      }
    }
  }
  const shown = Math.min(layers, Math.max(1, ...classes.map((c) => c.band.depth)));
  const labels = classes.map((c) => c.label);
  return {
    title: { text: degreeName(degree) },
    data: { values },
    facet: {
      column: {
        field: 'layer',
        type: 'nominal',
        title: null,
        header: { labelAnchor: 'start', labelFontWeight: 600 },
      },
    },
    resolve: { scale: { y: 'independent' } },
    spacing: 18,
    spec: {
      width: shown >= 4 ? 196 : shown === 3 ? 268 : shown === 2 ? 400 : 620,
      height: 180,
      layer: [
        {
          mark: { type: 'area', opacity: 0.2, interpolate: 'linear' },
          encoding: {
            x: { field: 't', type: 'quantitative', title: 'filtration scale t (data units)' },
            y: { field: 'lower', type: 'quantitative', title: 'λ(t)' },
            y2: { field: 'upper' },
            color: { field: 'class', type: 'nominal', title: 'class', scale: classColour(labels) },
          },
        },
        {
          mark: { type: 'line', strokeWidth: 1.8 },
          encoding: {
            x: { field: 't', type: 'quantitative' },
            y: { field: 'mean', type: 'quantitative' },
            color: { field: 'class', type: 'nominal', scale: classColour(labels) },
          },
        },
      ],
    },
  } as ChartSpec;
}

/** A discriminative map for one degree: signed curves on the landscape's own axis, one per layer. */
export function weightMapChart(
  degree: number | Channel,
  curves: readonly WeightCurve[],
  yTitle: string,
  title?: string,
): ChartSpec {
  const channel = asChannel(degree);
  const mine = curves.filter((c) => c.degree === channel.degree && c.filtration === channel.filtration);
  const layers = [...new Set(mine.map((c) => `λ${c.layer}`))];
  const values: Array<Record<string, unknown>> = [];
  for (const c of mine) {
    const keep = thinned(c.t.length, 160);
    for (const j of keep) values.push({ layer: `λ${c.layer}`, t: round(c.t[j]), value: round(c.value[j]) });
  }
  return {
    title: { text: title ?? degreeName(degree) },
    width: 620,
    height: 170,
    data: { values },
    layer: [
      {
        data: { values: [{ zero: 0 }] },
        mark: { type: 'rule', color: DIVERGING_COLOURS.zero },
        encoding: { y: { field: 'zero', type: 'quantitative' } },
      },
      {
        mark: { type: 'line', strokeWidth: 1.6 },
        encoding: {
          x: { field: 't', type: 'quantitative', title: `filtration scale t (data units) — H${degree}` },
          y: { field: 'value', type: 'quantitative', title: yTitle },
          color: { field: 'layer', type: 'nominal', title: 'layer', scale: classColour(layers) },
          strokeDash: {
            field: 'layer',
            type: 'nominal',
            title: 'layer',
            scale: {
              domain: layers,
              range: [
                [1, 0],
                [6, 3],
                [2, 2],
                [8, 3, 2, 3],
              ],
            },
          },
        },
      },
    ],
  } as ChartSpec;
}

export interface ImportanceRow {
  group: string;
  mean: number;
  std: number;
}

/** Permutation importance per group (degree and layer): mean drop in accuracy ± one standard deviation. */
export function importanceChart(rows: readonly ImportanceRow[], title?: string): ChartSpec {
  const values = rows.map((r) => ({
    group: r.group,
    mean: round(r.mean),
    low: round(r.mean - r.std),
    high: round(r.mean + r.std),
  }));
  const y = { field: 'group', type: 'nominal', sort: null, title: 'feature group' } as const;
  return {
    ...(title ? { title: { text: title } } : {}),
    width: 420,
    height: { step: 20 },
    data: { values },
    layer: [
      {
        mark: { type: 'bar', color: CATEGORY_COLOURS[0], opacity: 0.85 },
        encoding: {
          y,
          x: { field: 'mean', type: 'quantitative', title: 'drop in accuracy when the group is shuffled' },
        },
      },
      {
        mark: { type: 'rule', color: INK },
        encoding: { y, x: { field: 'low', type: 'quantitative' }, x2: { field: 'high' } },
      },
    ],
  } as ChartSpec;
}

/**
 * One sample's persistence diagrams (all degrees) as birth–death points above the diagonal. Essential
 * classes (death = ∞) are drawn as triangles on a line above the largest finite death.
 */
export function diagramChart(diagrams: readonly Diagram[], title: string): ChartSpec {
  let top = 0;
  let low = Infinity;
  for (const d of diagrams) {
    for (let i = 0; i < d.births.length; i++) {
      if (Number.isFinite(d.deaths[i])) top = Math.max(top, d.deaths[i]);
      top = Math.max(top, d.births[i]);
      low = Math.min(low, d.births[i]);
    }
  }
  if (!Number.isFinite(low)) low = 0;
  low = Math.min(0, low);
  if (!(top > low)) top = low + 1;
  const ceiling = top + 0.08 * (top - low);
  // A little room below and left so points born at the lowest value do not sit on the axis.
  low -= 0.04 * (top - low);
  const values: Array<Record<string, unknown>> = [];
  for (const d of diagrams) {
    for (let i = 0; i < d.births.length; i++) {
      const essential = !Number.isFinite(d.deaths[i]);
      values.push({
        degree: `H${d.degree}`,
        birth: round(d.births[i]),
        death: round(essential ? ceiling : d.deaths[i]),
        kind: essential ? 'essential (∞)' : 'finite',
      });
    }
  }
  const domain = [round(low), round(ceiling)];
  return {
    title: { text: title, fontSize: 12 },
    width: 170,
    height: 170,
    layer: [
      {
        data: { values: [{ a: domain[0], b: domain[1] }] },
        mark: { type: 'rule', color: '#9aa0a6', strokeDash: [3, 3] },
        encoding: {
          x: { field: 'a', type: 'quantitative' },
          y: { field: 'a', type: 'quantitative' },
          x2: { field: 'b' },
          y2: { field: 'b' },
        },
      },
      {
        data: { values },
        mark: { type: 'point', filled: true, size: 26, opacity: 0.8 },
        encoding: {
          x: { field: 'birth', type: 'quantitative', scale: { domain, nice: false }, title: 'birth' },
          y: { field: 'death', type: 'quantitative', scale: { domain, nice: false }, title: 'death' },
          color: {
            field: 'degree',
            type: 'nominal',
            legend: null,
            scale: { domain: ['H0', 'H1', 'H2'], range: [...DEGREE_COLOURS] },
          },
          shape: {
            field: 'kind',
            type: 'nominal',
            title: null,
            scale: { domain: ['finite', 'essential (∞)'], range: ['circle', 'triangle-up'] },
            legend: null,
          },
        },
      },
    ],
  } as ChartSpec;
}
