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

/**
 * The rows whose bar (mean ± one sd) reaches past [0, 1] and is drawn cut at the edge: accuracy cannot leave
 * [0, 1], so the bar is clamped there rather than the axis stretched to values no run can have.
 */
export function clippedAccuracyBars(
  rows: readonly AccuracyRow[],
): Array<{ features: string; model: string; at: 0 | 1 | 'both' }> {
  const out: Array<{ features: string; model: string; at: 0 | 1 | 'both' }> = [];
  for (const r of rows) {
    const low = r.mean - r.std < 0;
    const high = r.mean + r.std > 1;
    if (low || high)
      out.push({ features: r.features, model: r.model, at: low && high ? 'both' : low ? 0 : 1 });
  }
  return out;
}

/**
 * Accuracy of every feature set × model: a dot at the mean and a bar of ± one standard deviation over folds.
 * The axis is exactly [0, 1] (clamped, not rounded outwards); bar ends beyond it are clamped to it, which the
 * axis title says and `clippedAccuracyBars` lists for the caption.
 */
export function accuracyChart(rows: readonly AccuracyRow[], chance: number): ChartSpec {
  const values = rows.map((r) => ({
    features: r.features,
    model: r.model,
    mean: round(r.mean),
    low: round(Math.max(0, r.mean - r.std)),
    high: round(Math.min(1, r.mean + r.std)),
  }));
  const y = { field: 'features', type: 'nominal', title: 'feature set', sort: null } as const;
  const scale = { domain: [0, 1], clamp: true, nice: false, zero: true };
  return {
    width: 440,
    height: { step: 26 },
    data: { values },
    layer: [
      {
        data: { values: [{ chance: round(chance) }] },
        mark: { type: 'rule', strokeDash: [4, 3], color: '#9aa0a6' },
        encoding: { x: { field: 'chance', type: 'quantitative', scale } },
      },
      {
        mark: { type: 'rule', strokeWidth: 2 },
        encoding: {
          y,
          yOffset: { field: 'model', type: 'nominal' },
          x: {
            field: 'low',
            type: 'quantitative',
            scale,
            title: 'cross-validated accuracy (mean ± 1 sd over folds, clipped to [0, 1]; dashed: chance)',
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
          x: { field: 'mean', type: 'quantitative', scale },
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

/** The generic title of a filtration-scale axis. */
export const SCALE_TITLE = 'filtration scale t (data units)';

/**
 * The title of a filtration-scale axis. `superlevelOf` names the quantity when the diagrams come from a
 * superlevel-set filtration ('grey level', 'signal value'): those are the sublevel sets of the negated values
 * and are reported on that negated scale, so t = −value and the axis must say so.
 */
export function scaleTitle(superlevelOf?: string): string {
  return superlevelOf === undefined
    ? SCALE_TITLE
    : `filtration value t (superlevel sets: t = −${superlevelOf})`;
}

/** Which layers of a class-means chart hold anything, and which are zero on the whole grid. */
export interface MeanLayers {
  /** Layers computed: the largest depth among the classes. */
  depth: number;
  /** Layers drawn as panels (1-based, ascending): those of the first `layers` where some class mean is non-zero. */
  shown: number[];
  /** Layers of the first `layers` where every class mean is 0 on the whole grid: no panel. */
  zeroForAll: number[];
  /** Per shown layer, the classes whose mean is 0 on the whole grid there: no band and no line for them. */
  zeroFor: Array<{ layer: number; classes: string[] }>;
}

function layerIsZero(band: SampledBand, k: number): boolean {
  if (k >= band.depth) return true;
  const count = band.grid.count;
  for (let j = k * count; j < (k + 1) * count; j++) if (band.mean[j] !== 0) return false;
  return true;
}

/**
 * Sorts the first `layers` layers of a class-means chart into drawn and empty ones. A mean landscape is 0 at
 * every grid point only when every sample's landscape is (landscapes are never negative), i.e. when no sample
 * has k pairs alive at the same scale; such a layer carries nothing to compare, and its band (0 with a
 * per-layer band; the shared half-width with one band over all layers) says nothing about the classes.
 */
export function meanLayers(
  classes: ReadonlyArray<{ label: string; band: SampledBand }>,
  layers: number,
): MeanLayers {
  const depth = Math.max(0, ...classes.map((c) => c.band.depth));
  const shown: number[] = [];
  const zeroForAll: number[] = [];
  const zeroFor: Array<{ layer: number; classes: string[] }> = [];
  for (let k = 0; k < Math.min(layers, depth); k++) {
    const zero = classes.filter((c) => layerIsZero(c.band, k)).map((c) => c.label);
    if (zero.length === classes.length) zeroForAll.push(k + 1);
    else {
      shown.push(k + 1);
      if (zero.length > 0) zeroFor.push({ layer: k + 1, classes: zero });
    }
  }
  return { depth, shown, zeroForAll, zeroFor };
}

export interface MeanBandChartOptions {
  /** Grid points kept per curve (evenly thinned). Default 120. */
  maxPoints?: number;
  /** The quantity of a superlevel-set filtration, for the axis title (see `scaleTitle`). */
  superlevelOf?: string;
}

/** The facet label of layer k (1-based). */
function layerLabel(k: number): string {
  return `λ${k}  (layer ${k})`;
}

/**
 * Per degree: the mean landscape of every class with its simultaneous band, one panel per layer (the first
 * `layers` layers, side by side), classes told apart by colour (the same colour for a class on the whole page).
 * All panels share one y scale, so a layer of small values looks small. Layers that are zero for every class
 * get no panel, and a class whose mean is zero in a layer gets no band or line there (`meanLayers`; the
 * caption says which). The legend comes from the lines, at full colour; the pale bands have none.
 */
export function meanBandChart(
  degree: number | Channel,
  classes: ReadonlyArray<{ label: string; band: SampledBand }>,
  layers = 3,
  options: MeanBandChartOptions = {},
): ChartSpec {
  const maxPoints = options.maxPoints ?? 120;
  const content = meanLayers(classes, layers);
  const skip = new Set(content.zeroFor.flatMap((z) => z.classes.map((label) => `${z.layer}\u0000${label}`)));
  const values: Array<Record<string, unknown>> = [];
  for (const { label, band } of classes) {
    const count = band.grid.count;
    const step = count > 1 ? (band.grid.stop - band.grid.start) / (count - 1) : 0;
    const keep = thinned(count, maxPoints);
    for (const layer of content.shown) {
      const k = layer - 1;
      if (k >= band.depth || skip.has(`${layer}\u0000${label}`)) continue;
      for (const j of keep) {
        values.push({
          class: label,
          layer: layerLabel(layer),
          t: round(band.grid.start + j * step),
          mean: round(band.mean[k * count + j]),
          lower: round(band.lower[k * count + j]),
          upper: round(band.upper[k * count + j]),
        });
      }
    }
  }
  const shown = Math.max(1, content.shown.length);
  const labels = classes.map((c) => c.label);
  const colour = classColour(labels);
  // The scale's title once, under all panels (as the facet's title), not repeated under each narrow panel.
  const x = { field: 't', type: 'quantitative', title: null } as const;
  return {
    title: { text: degreeName(degree) },
    data: { values },
    facet: {
      column: {
        field: 'layer',
        type: 'nominal',
        title: scaleTitle(options.superlevelOf),
        sort: content.shown.map(layerLabel),
        header: {
          labelAnchor: 'start',
          labelFontWeight: 600,
          labelOrient: 'top',
          titleOrient: 'bottom',
          titleFontWeight: 600,
          titleColor: INK,
        },
      },
    },
    // One y scale for every panel (shared is vega-lite's default for facets; written out so it stays so).
    resolve: { scale: { y: 'shared', x: 'shared' } },
    spacing: 18,
    spec: {
      width: shown >= 4 ? 196 : shown === 3 ? 268 : shown === 2 ? 400 : 620,
      height: 180,
      layer: [
        {
          mark: { type: 'area', fillOpacity: 0.2, strokeWidth: 0, interpolate: 'linear' },
          encoding: {
            x,
            y: { field: 'lower', type: 'quantitative', title: 'λ(t)' },
            y2: { field: 'upper' },
            color: { field: 'class', type: 'nominal', scale: colour },
          },
        },
        {
          mark: { type: 'line', strokeWidth: 1.8 },
          encoding: {
            x,
            y: { field: 'mean', type: 'quantitative' },
            color: {
              field: 'class',
              type: 'nominal',
              title: 'class',
              scale: colour,
              legend: { symbolType: 'stroke', symbolStrokeWidth: 3, symbolOpacity: 1 },
            },
          },
        },
      ],
    },
  } as ChartSpec;
}

/**
 * A discriminative map for one degree: signed curves on the landscape's own axis, one per layer (the chart's
 * title names the degree; the x axis is the filtration scale, see `scaleTitle`).
 */
export function weightMapChart(
  degree: number | Channel,
  curves: readonly WeightCurve[],
  yTitle: string,
  title?: string,
  options: { superlevelOf?: string } = {},
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
          x: { field: 't', type: 'quantitative', title: scaleTitle(options.superlevelOf) },
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

/** A group name as `groupsByDegreeLayer` (importance.ts) writes it: "H1 λ2", or "erosion/H1 λ2". */
const GROUP_NAME = /^(?:(.+)\/)?H(\d+) λ(\d+)$/;

/**
 * The fixed order of the importance chart: filtration (in the order first met, untagged first), then degree,
 * then layer as numbers (λ10 after λ9), and any other group (the raw features) last, in the order given.
 * The same order as the class means and weight maps, independent of the fold in which a group first
 * appeared, and of the noisy importances themselves — the bar lengths show those.
 */
export function importanceOrder(groups: readonly string[]): string[] {
  const filtrations = new Map<string, number>();
  const keys = groups.map((group, index) => {
    const m = GROUP_NAME.exec(group);
    if (!m) return { group, index, key: [1, 0, 0, 0] };
    let filtration = 0;
    if (m[1] !== undefined) {
      if (!filtrations.has(m[1])) filtrations.set(m[1], filtrations.size + 1);
      filtration = filtrations.get(m[1]) ?? 0;
    }
    return { group, index, key: [0, filtration, Number(m[2]), Number(m[3])] };
  });
  const compare = (a: (typeof keys)[number], b: (typeof keys)[number]): number => {
    for (let i = 0; i < a.key.length; i++) if (a.key[i] !== b.key[i]) return a.key[i] - b.key[i];
    return a.index - b.index;
  };
  return [...keys].sort(compare).map((k) => k.group);
}

/**
 * Permutation importance per group (degree and layer): mean drop in accuracy ± one standard deviation, in
 * the fixed order of `importanceOrder`, written into the spec so vega-lite cannot reorder the groups.
 */
export function importanceChart(rows: readonly ImportanceRow[], title?: string): ChartSpec {
  const values = rows.map((r) => ({
    group: r.group,
    mean: round(r.mean),
    low: round(r.mean - r.std),
    high: round(r.mean + r.std),
  }));
  const y = {
    field: 'group',
    type: 'nominal',
    sort: importanceOrder(rows.map((r) => r.group)),
    title: 'feature group',
  } as const;
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
 * classes (death = ∞) are drawn as triangles on a line above the largest finite death. `superlevelOf` names
 * the negated quantity of a superlevel-set filtration on both axes.
 */
export function diagramChart(
  diagrams: readonly Diagram[],
  title: string,
  options: { superlevelOf?: string } = {},
): ChartSpec {
  const negated = options.superlevelOf === undefined ? '' : ` (−${options.superlevelOf})`;
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
          x: {
            field: 'birth',
            type: 'quantitative',
            scale: { domain, nice: false },
            title: `birth${negated}`,
          },
          y: {
            field: 'death',
            type: 'quantitative',
            scale: { domain, nice: false },
            title: `death${negated}`,
          },
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
