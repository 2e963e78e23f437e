import { type Channel, channelName, type Diagram } from '../core/diagram.js';
import type { DiscriminativeMaps } from '../learn/explain.js';
import type { SampledBand } from './bands.js';
import { accuracyCaption, layerList, meanLayersNote, superlevelOf } from './captions.js';
import {
  type AccuracyRow,
  accuracyChart,
  confusionChart,
  DEGREE_COLOURS,
  diagramChart,
  importanceChart,
  meanBandChart,
  meanLayers,
  renderSvg,
  weightMapChart,
} from './charts.js';
import { CHOSEN_ROWS_SHOWN, type ChosenRow } from './chosen.js';
import { type DistanceMap, distanceMapChart } from './distance-map.js';
import { escapeHtml } from './escape.js';
import { type PairedRow, pairedTableHtml } from './paired.js';
import { FONT_STACK, INK, MONO_STACK, MUTED_INK, RULE } from './palette.js';
import { type ContrastTest, type PermutationReach, unreachableSentence } from './permutation.js';
import { type SampleMap, sampleMapChart } from './scatter.js';

export { escapeHtml };

/**
 * The self-contained HTML report: one page, inline CSS, inline SVG charts, no scripts, no fonts or images
 * fetched. Every string that comes from the user's data (dataset names, class labels, sample ids, option
 * values) goes through `escapeHtml`.
 */

/** Rows of the contrast table shown at most (the smallest p values first). */
export const CONTRAST_ROWS_SHOWN = 60;

/** Layers of the class means drawn at most, as panels side by side (more would be too narrow to read). */
export const MEAN_LAYERS_SHOWN = 4;

/** What one dataset's part of the report shows; every field is plain data. */
export interface DatasetReport {
  name: string;
  /** One or two sentences saying what the data is. */
  description?: string;
  summary: {
    kind: string;
    samples: number;
    classes: ReadonlyArray<{ label: string; count: number }>;
    /** Further facts as label → value (e.g. points per sample, image size). */
    facts?: ReadonlyArray<[string, string]>;
  };
  /** The options of the analysis, as shown to the reader. */
  options: Record<string, unknown>;
  accuracy: ReadonlyArray<AccuracyRow & { balancedAccuracy?: number; macroF1?: number }>;
  /** Paired differences against the raw baseline on the same outer folds (shown under the accuracy chart). */
  paired?: readonly PairedRow[];
  confusions: ReadonlyArray<{
    features: string;
    model: string;
    classes: readonly string[];
    matrix: readonly (readonly number[])[];
  }>;
  /** Per degree: each class's mean landscape with its band (all on one grid). */
  means: ReadonlyArray<{
    degree: number;
    /** The filtration of the channel, when samples were filtered several ways. */
    filtration?: string;
    classes: ReadonlyArray<{ label: string; band: SampledBand }>;
  }>;
  /** What the inner cross-validation chose in each outer fold (src/report/chosen.ts). */
  chosen?: readonly ChosenRow[];
  /** Samples on the first two principal components of each feature set (fitted on all samples). */
  sampleMaps?: readonly SampleMap[];
  /** Bottleneck distances between the samples' diagrams of one channel, ordered by class. */
  distanceMap?: DistanceMap;
  contrasts: readonly ContrastTest[];
  /** Contrast settings for the caption. */
  contrastNote?: string;
  /** How far the contrast family can reach with its permutations (the caption says when it cannot). */
  contrastReach?: PermutationReach;
  maps?: DiscriminativeMaps;
  /** One sample per class; with several filtrations, its diagrams under the first one (named in `filtration`). */
  examples: ReadonlyArray<{
    label: string;
    sample: string;
    filtration?: string;
    diagrams: readonly Diagram[];
  }>;
  /** Honest remarks about this dataset's results (e.g. where the raw baseline wins). */
  findings?: readonly string[];
}

export interface ReportInput {
  title: string;
  /** A sentence under the title. */
  lead?: string;
  version: string;
  command: string;
  seed?: number;
  datasets: readonly DatasetReport[];
}

export const CAUTION_TEXT =
  'Cross-validated accuracy is an estimate from the samples at hand, not a guarantee: it can be optimistic when samples are not independent ' +
  '(repeated measurements of one part, one patient, one run). Before these results feed a clinical, safety or quality decision, validate on ' +
  'independent data collected for that purpose and defer to the standards of your field.';

/** A safe fragment id from any text. */
export function slug(text: string): string {
  const base = text
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '');
  return base === '' ? 'x' : base;
}

function fixed(v: number | undefined, digits = 3): string {
  return v === undefined || !Number.isFinite(v) ? '—' : v.toFixed(digits);
}

function pValue(p: number): string {
  if (p < 0.001) return p.toExponential(1);
  return p.toFixed(3);
}

function optionValue(value: unknown): string {
  if (Array.isArray(value)) return value.map(optionValue).join(', ');
  if (value !== null && typeof value === 'object') return JSON.stringify(value);
  return String(value);
}

function figure(svg: string, caption: string, kind: string): string {
  return `<figure class="chart" data-chart="${escapeHtml(kind)}">${svg}<figcaption>${caption}</figcaption></figure>`;
}

function part(id: string, name: string, title: string, intro: string, body: string): string {
  return `<section class="part" id="${id}" data-part="${name}"><h3>${title}</h3><p class="how">${intro}</p>${body}</section>`;
}

/** The hyperparameters chosen per outer fold, one row per distinct choice of each feature set and model. */
function chosenTable(rows: readonly ChosenRow[]): string {
  if (rows.length === 0) return '';
  const shown = rows.slice(0, CHOSEN_ROWS_SHOWN);
  const accuracies = (a: readonly number[]) =>
    a.length <= 6
      ? a.map((v) => fixed(v, 2)).join(', ')
      : `${fixed(a.reduce((x, y) => x + y, 0) / a.length, 2)} (mean of ${a.length})`;
  const body = shown
    .map(
      (r) =>
        `<tr><td>${escapeHtml(r.features)}</td><td>${escapeHtml(r.model)}</td><td>${escapeHtml(r.choice)}</td>` +
        `<td class="num">${escapeHtml(r.folds.join(', '))}</td><td class="num">${accuracies(r.accuracies)}</td></tr>`,
    )
    .join('');
  const more =
    shown.length < rows.length
      ? ` The first ${shown.length} of ${rows.length} rows are shown; metrics.json lists every fold's choice.`
      : '';
  return (
    `<h4 class="sub">Hyperparameters chosen in each outer fold</h4><p class="how">The inner cross-validation of every outer training fold chose these values (landscape depth and grid size, then the model's); folds that chose alike share a row (folds numbered from 1${rows.some((r) => r.folds.some((f) => f.includes('.'))) ? ', as repeat.fold' : ''}). A choice that changes from fold to fold means the data do not pin it down.${more}</p>` +
    `<table class="grid chosen"><tr><th>features</th><th>model</th><th>chosen</th><th class="num">outer folds</th><th class="num">accuracy in those folds</th></tr>${body}</table>`
  );
}

async function datasetSection(ds: DatasetReport, index: number): Promise<string> {
  const id = `d${index + 1}-${slug(ds.name)}`;
  const pieces: string[] = [];

  // Summary and options.
  const classRows = ds.summary.classes
    .map((c) => `<tr><td>${escapeHtml(c.label)}</td><td class="num">${c.count}</td></tr>`)
    .join('');
  const facts = [
    ['sample kind', ds.summary.kind],
    ['samples', String(ds.summary.samples)],
    ['classes', String(ds.summary.classes.length)],
    ...(ds.summary.facts ?? []),
  ]
    .map(([k, v]) => `<tr><th>${escapeHtml(k)}</th><td>${escapeHtml(v)}</td></tr>`)
    .join('');
  const options = Object.entries(ds.options)
    .map(([k, v]) => `<tr><th>${escapeHtml(k)}</th><td><code>${escapeHtml(optionValue(v))}</code></td></tr>`)
    .join('');
  const findings = (ds.findings ?? []).map((f) => `<li>${escapeHtml(f)}</li>`).join('');
  pieces.push(
    part(
      `${id}-summary`,
      'summary',
      'Data and options',
      'What was analysed and how. Every number below can be reproduced from these options and the seed.',
      `<div class="cols"><table class="facts"><caption>Data</caption>${facts}</table>` +
        `<table class="facts"><caption>Samples per class</caption><tr><th>class</th><th class="num">samples</th></tr>${classRows}</table>` +
        `<table class="facts opts"><caption>Options</caption>${options}</table></div>` +
        (findings ? `<div class="findings"><h4>What this run shows</h4><ul>${findings}</ul></div>` : ''),
    ),
  );

  // Accuracy.
  if (ds.accuracy.length > 0) {
    const chance = 1 / Math.max(1, ds.summary.classes.length);
    const best = Math.max(...ds.accuracy.map((r) => r.mean));
    const rows = ds.accuracy
      .map(
        (r) =>
          `<tr${r.mean === best ? ' class="best"' : ''}><td>${escapeHtml(r.features)}</td><td>${escapeHtml(r.model)}</td>` +
          `<td class="num">${fixed(r.mean)} ± ${fixed(r.std)}</td><td class="num">${fixed(r.balancedAccuracy)}</td><td class="num">${fixed(r.macroF1)}</td></tr>`,
      )
      .join('');
    const svg = await renderSvg(accuracyChart(ds.accuracy, chance));
    pieces.push(
      part(
        `${id}-accuracy`,
        'accuracy',
        'Accuracy of every feature set and model',
        `Outer cross-validation folds: the dot is the mean accuracy, the bar ± one standard deviation over folds (clipped to [0, 1]); the dashed line is chance (${fixed(chance, 2)}). Raw-feature baselines sit beside the landscape features so the gain (or its absence) is visible.`,
        figure(svg, accuracyCaption(ds.accuracy), 'accuracy') +
          `<table class="grid"><tr><th>features</th><th>model</th><th class="num">accuracy (mean ± sd)</th><th class="num">balanced accuracy</th><th class="num">macro F1</th></tr>${rows}</table>` +
          pairedTableHtml(ds.paired ?? []) +
          chosenTable(ds.chosen ?? []),
      ),
    );
  }

  // Confusion matrices.
  if (ds.confusions.length > 0) {
    const charts: string[] = [];
    for (const c of ds.confusions) {
      const svg = await renderSvg(confusionChart(c.classes, c.matrix, `${c.features} · ${c.model}`));
      charts.push(
        figure(
          svg,
          `Counts pooled over the outer folds; colour is the share of the true class.`,
          'confusion',
        ),
      );
    }
    pieces.push(
      part(
        `${id}-confusion`,
        'confusion',
        'Confusion matrices',
        'Rows are the true classes, columns the predicted ones; the diagonal holds the correct calls.',
        `<div class="tiles">${charts.join('')}</div>`,
      ),
    );
  }

  // Sample maps: PC1 against PC2 of each feature set.
  if (ds.sampleMaps && ds.sampleMaps.length > 0) {
    const classes = ds.summary.classes.map((c) => c.label);
    const charts: string[] = [];
    for (const m of ds.sampleMaps) {
      const svg = await renderSvg(sampleMapChart(m, classes, `${m.features} features`));
      charts.push(
        figure(
          svg,
          `${escapeHtml(m.features)} features (${m.columns} columns${m.made ? `; ${escapeHtml(m.made)}` : ''}), standardised; the first two components keep ${fixed(100 * (m.explained[0] + m.explained[1]), 0)}% of the variance.`,
          'scatter',
        ),
      );
    }
    pieces.push(
      part(
        `${id}-samples`,
        'samples',
        'The samples in two dimensions',
        `Each point is a sample, placed by the first two principal components of its features; colour and shape give its class. Where a feature set separates the classes, their points form apart. The scaler and the PCA are fitted on all ${ds.summary.samples} samples: this is a picture of the data, not a model, and it says nothing about accuracy on new samples — that is the accuracy part's job. Two dimensions can also hide a separation that more components hold.`,
        `<div class="tiles pair">${charts.join('')}</div>`,
      ),
    );
  }

  // Diagram-distance map.
  if (ds.distanceMap && ds.distanceMap.samples.length > 1) {
    const m = ds.distanceMap;
    const classes = ds.summary.classes.map((c) => c.label);
    const svg = await renderSvg(distanceMapChart(m, classes));
    const drawn =
      m.samples.length < m.total
        ? `${m.samples.length} of ${m.total} samples, at most ${m.perClass} per class drawn evenly per class with seed ${m.seed} so the map renders fast`
        : `all ${m.total} samples`;
    pieces.push(
      part(
        `${id}-distances`,
        'distances',
        'How far apart are the diagrams?',
        `Bottleneck distance between the samples' persistence diagrams (Cohen-Steiner, Edelsbrunner and Harer, 2007), no features and no model in between. Samples are ordered by class (the strip on top gives the class; lines mark where one class ends); dark is close. Dark blocks on the diagonal and light ones off it mean the diagrams alone tell the classes apart.`,
        figure(
          svg,
          `${escapeHtml(m.reason)}. ${drawn}; essential classes treated as for the landscapes.`,
          'distances',
        ),
      ),
    );
  }

  // Class means with bands.
  if (ds.means.length > 0) {
    const charts: string[] = [];
    for (const m of ds.means) {
      const name = escapeHtml(channelName(m));
      if (meanLayers(m.classes, MEAN_LAYERS_SHOWN).shown.length === 0) {
        charts.push(
          `<p class="how" data-empty="mean">${name}: the mean landscape of every class is zero on the whole grid (no sample has a finite ${name} pair of positive length); nothing to draw.</p>`,
        );
        continue;
      }
      const superlevel = superlevelOf(ds.summary.kind, ds.options.diagrams, m.filtration);
      const svg = await renderSvg(
        meanBandChart(m, m.classes, MEAN_LAYERS_SHOWN, superlevel ? { superlevelOf: superlevel } : {}),
      );
      const first = m.classes[0]?.band;
      const caption = first
        ? `${name}: mean landscape per class with a ${Math.round(first.level * 100)}% simultaneous band (multiplier bootstrap, ${first.draws} draws, ${first.scope === 'layer' ? 'one band per layer' : 'one band over all layers'}).`
        : name;
      charts.push(figure(svg, `${caption} ${meanLayersNote(name, m.classes, MEAN_LAYERS_SHOWN)}`, 'mean'));
    }
    pieces.push(
      part(
        `${id}-means`,
        'means',
        'Mean landscape per class',
        'Where the coloured bands separate along the scale axis, the classes differ in that degree at that scale; where they overlap, the data cannot tell them apart there. Bands follow Chazal, Fasy, Lecci, Rinaldo and Wasserman (2015).',
        charts.join(''),
      ),
    );
  }

  // Contrasts.
  if (ds.contrasts.length > 0) {
    // A long family (many classes × filtrations × degrees) is shown by its smallest p values first, capped, so
    // the table stays readable; metrics and `landform contrast` keep every test.
    const shown =
      ds.contrasts.length > CONTRAST_ROWS_SHOWN
        ? [...ds.contrasts]
            .sort((x, y) => x.p - y.p || x.statistic - y.statistic)
            .slice(0, CONTRAST_ROWS_SHOWN)
        : ds.contrasts;
    const unreachable = ds.contrastReach ? unreachableSentence(ds.contrastReach) : undefined;
    const cut =
      shown.length < ds.contrasts.length
        ? ` The table shows the ${shown.length} smallest p values of ${ds.contrasts.length} tests${unreachable ? '' : `, ${ds.contrasts.filter((t) => t.pAdjusted <= 0.05).length} of which differ at 5% after Holm`}; with a family this large, test a few chosen filtrations and classes with landform contrast.`
        : '';
    const verdict = (t: ContrastTest) =>
      t.pAdjusted <= 0.05 ? 'differ' : unreachable ? 'not testable' : 'no evidence';
    const rows = shown
      .map(
        (t) =>
          `<tr${t.pAdjusted <= 0.05 ? ' class="sig"' : ''}><td>${escapeHtml(channelName(t))}</td><td>${escapeHtml(t.a)}</td><td>${escapeHtml(t.b)}</td>` +
          `<td class="num">${t.sizes[0]} / ${t.sizes[1]}</td><td class="num">${fixed(t.statistic, 4)}</td><td class="num">${pValue(t.p)}</td><td class="num">${pValue(t.pAdjusted)}</td>` +
          `<td>${verdict(t)}</td></tr>`,
      )
      .join('');
    pieces.push(
      part(
        `${id}-contrasts`,
        'contrasts',
        'Do the class means differ?',
        `Permutation tests of equal mean landscapes for every pair of classes and degree (Robinson and Turner, 2017), with Holm's correction over the whole family (Holm, 1979). ${escapeHtml(ds.contrastNote ?? '')}${cut}`,
        (unreachable ? `<p class="warn" data-reach="unreachable">${escapeHtml(unreachable)}</p>` : '') +
          `<table class="grid"><tr><th>${ds.contrasts.some((t) => t.filtration !== undefined) ? 'filtration / degree' : 'degree'}</th><th>class a</th><th>class b</th><th class="num">samples</th><th class="num">distance of means</th><th class="num">p</th><th class="num">p (Holm)</th><th>at 5%</th></tr>${rows}</table>`,
      ),
    );
  }

  // Discriminative maps.
  const maps: string[] = [];
  if (ds.maps?.weights && ds.maps.weights.curves.length > 0) {
    // One chart per channel, in the curves' order (filtration-major, then degree).
    const seen = new Set<string>();
    const channels: Channel[] = [];
    for (const c of ds.maps.weights.curves) {
      const key = channelName(c);
      if (seen.has(key)) continue;
      seen.add(key);
      channels.push(
        c.filtration === undefined ? { degree: c.degree } : { degree: c.degree, filtration: c.filtration },
      );
    }
    for (const channel of channels) {
      const superlevel = superlevelOf(ds.summary.kind, ds.options.diagrams, channel.filtration);
      const svg = await renderSvg(
        weightMapChart(
          channel,
          ds.maps.weights.curves,
          'standardised weight',
          undefined,
          superlevel ? { superlevelOf: superlevel } : {},
        ),
      );
      const drawn = [
        ...new Set(
          ds.maps.weights.curves
            .filter((c) => c.degree === channel.degree && c.filtration === channel.filtration)
            .map((c) => c.layer),
        ),
      ].sort((a, b) => a - b);
      maps.push(figure(svg, `${escapeHtml(ds.maps.weights.note)} Curves drawn: ${layerList(drawn)}.`, 'map'));
    }
  }
  if (ds.maps?.importance && ds.maps.importance.rows.length > 0) {
    const svg = await renderSvg(importanceChart(ds.maps.importance.rows));
    maps.push(figure(svg, escapeHtml(ds.maps.importance.note), 'importance'));
  }
  if (maps.length > 0) {
    pieces.push(
      part(
        `${id}-maps`,
        'maps',
        'Discriminative maps',
        'Which parts of the landscape the model leans on: linear weights carried back to the landscape axis, and the drop in held-out accuracy when one degree and layer is shuffled across samples.',
        maps.join(''),
      ),
    );
  }

  // Example diagrams.
  if (ds.examples.length > 0) {
    const charts: string[] = [];
    for (const e of ds.examples) {
      const superlevel = superlevelOf(ds.summary.kind, ds.options.diagrams, e.filtration);
      const svg = await renderSvg(
        diagramChart(e.diagrams, `${e.label}`, superlevel ? { superlevelOf: superlevel } : {}),
      );
      const under = e.filtration === undefined ? '' : ` · ${escapeHtml(e.filtration)}`;
      charts.push(figure(svg, `sample ${escapeHtml(e.sample)}${under}`, 'diagram'));
    }
    // The key names the degrees the example charts hold, and triangles only when some are drawn.
    const shownDegrees = [...new Set(ds.examples.flatMap((e) => e.diagrams.map((d) => d.degree)))]
      .filter((d) => d < DEGREE_COLOURS.length)
      .sort((a, b) => a - b);
    const essential = ds.examples.some((e) => e.diagrams.some((d) => d.deaths.some((v) => v === Infinity)));
    pieces.push(
      part(
        `${id}-examples`,
        'examples',
        'Example diagrams per class',
        `One sample per class: each point is a feature born at one scale and dying at another; far from the dashed diagonal means long-lived. Colours: ${shownDegrees.map((d) => `<span class="key" style="background:${DEGREE_COLOURS[d]}"></span>H${d}`).join(' ')}${essential ? '; triangles on top are classes that never die' : ''}.`,
        `<div class="tiles">${charts.join('')}</div>`,
      ),
    );
  }

  const description = ds.description ? `<p class="lead">${escapeHtml(ds.description)}</p>` : '';
  return `<section class="dataset" id="${id}" data-dataset="${escapeHtml(ds.name)}"><h2>${escapeHtml(ds.name)}</h2>${description}${pieces.join('')}</section>`;
}

const STYLE = `
:root{--ink:${INK};--muted:${MUTED_INK};--rule:${RULE};--paper:#ffffff;--ground:#f3f4f7;--accent:#1f5fa8;--warn:#9a5b00}
*{box-sizing:border-box}
html{background:var(--ground)}
body{margin:0;font:15px/1.55 ${FONT_STACK};color:var(--ink)}
header.top{background:#17233a;color:#eef2f8;padding:28px 0 22px}
header.top .wrap,main,footer{max-width:1180px;margin:0 auto;padding:0 28px}
header.top .kicker{font-size:12px;letter-spacing:.14em;text-transform:uppercase;color:#9fb4d4;margin:0 0 6px}
header.top h1{font-size:28px;line-height:1.2;margin:0 0 8px;font-weight:650}
header.top p{margin:0;color:#cfd9e8;max-width:880px}
header.top .meta{margin-top:12px;font:12.5px/1.5 ${MONO_STACK};color:#9fb4d4}
.caution{margin:22px 0 8px;background:#fff8ec;border:1px solid #f0d7a8;border-left:5px solid #d08a17;border-radius:6px;padding:12px 16px;color:#4a3510}
.caution strong{color:var(--warn)}
nav.toc{margin:14px 0 0;font-size:13.5px;color:var(--muted)}
nav.toc a{color:var(--accent);text-decoration:none;margin-right:14px}
nav.toc a:hover{text-decoration:underline}
section.dataset{background:var(--paper);border:1px solid var(--rule);border-radius:8px;margin:26px 0;padding:6px 28px 22px}
section.dataset>h2{font-size:22px;margin:18px 0 4px;font-weight:650}
p.lead{color:var(--muted);margin:0 0 6px;max-width:900px}
section.part{border-top:1px solid var(--rule);margin-top:18px;padding-top:6px}
section.part h3{font-size:17px;margin:12px 0 2px;font-weight:620}
p.how{color:var(--muted);font-size:13.5px;margin:0 0 12px;max-width:920px}
.cols{display:flex;flex-wrap:wrap;gap:22px;align-items:flex-start}
table{border-collapse:collapse;font-size:13.5px}
table caption{text-align:left;font-weight:600;font-size:12.5px;text-transform:uppercase;letter-spacing:.06em;color:var(--muted);padding-bottom:4px}
table.facts th{text-align:left;font-weight:500;color:var(--muted);padding:2px 14px 2px 0;vertical-align:top}
table.facts td{padding:2px 0}
table.opts code{font:12.5px ${MONO_STACK};word-break:break-word}
table.grid{margin:10px 0 4px;min-width:60%}
table.grid th{text-align:left;font-weight:600;border-bottom:2px solid var(--ink);padding:5px 14px 5px 0}
table.grid .num{text-align:right}
table.grid td{border-bottom:1px solid var(--rule);padding:4px 14px 4px 0}
.num{text-align:right;font-variant-numeric:tabular-nums}
tr.best td{background:#eef4fb;font-weight:600}
tr.sig td{background:#eef4fb}
h4.sub{font-size:14px;margin:16px 0 2px}
p.warn{margin:6px 0 8px;background:#fff8ec;border-left:4px solid #d08a17;padding:6px 12px;border-radius:4px;color:#4a3510;max-width:920px}
.findings{margin-top:14px;background:#f6f8fb;border-left:4px solid var(--accent);padding:8px 16px;border-radius:4px}
.findings h4{margin:4px 0;font-size:14px}
.findings ul{margin:4px 0 6px;padding-left:20px}
figure.chart{margin:8px 0 14px;display:inline-block;vertical-align:top}
figure.chart svg{display:block;max-width:100%;height:auto}
figure.chart figcaption{font-size:12.5px;color:var(--muted);max-width:560px;margin-top:4px}
.tiles{display:flex;flex-wrap:wrap;gap:6px 26px}
.tiles.pair figure.chart figcaption{max-width:440px}
span.key{display:inline-block;width:10px;height:10px;border-radius:50%;margin:0 4px 0 6px;vertical-align:0}
section.glance{background:var(--paper);border:1px solid var(--rule);border-radius:8px;margin:18px 0;padding:6px 28px 16px}
section.glance h2{font-size:18px;margin:14px 0 2px}
section.glance td.say{color:var(--muted);font-size:13px;max-width:520px}
section.glance a{color:var(--accent);text-decoration:none;font-weight:600}
span.sd{color:var(--muted);font-size:12px}
footer{color:var(--muted);font-size:12.5px;padding:8px 28px 40px}
footer h2{font-size:15px;color:var(--ink)}
@media print{html{background:#fff}section.dataset{border:none;padding:0}header.top{background:#fff;color:#000}}
`;

/** Best accuracy per feature set for every dataset, and the first finding: the page at a glance. */
function glance(datasets: readonly DatasetReport[]): string {
  const sets = [...new Set(datasets.flatMap((d) => d.accuracy.map((a) => a.features)))];
  const head = `<tr><th>dataset</th>${sets.map((s) => `<th class="num">${escapeHtml(s)}</th>`).join('')}<th>in a sentence</th></tr>`;
  const rows = datasets
    .map((d, i) => {
      const cells = sets.map((s) => {
        const rows = d.accuracy.filter((a) => a.features === s);
        if (rows.length === 0) return '<td class="num">—</td>';
        const top = rows.reduce((m, r) => (r.mean > m.mean ? r : m));
        return `<td class="num">${fixed(top.mean, 2)} <span class="sd">± ${fixed(top.std, 2)}</span></td>`;
      });
      return `<tr><td><a href="#d${i + 1}-${slug(d.name)}">${escapeHtml(d.name)}</a></td>${cells.join('')}<td class="say">${escapeHtml(d.findings?.[0] ?? '')}</td></tr>`;
    })
    .join('');
  return `<section class="glance" data-part="glance"><h2>At a glance</h2><p class="how">Best cross-validated accuracy per feature set (mean ± sd over outer folds, best model of each set).</p><table class="grid">${head}${rows}</table></section>`;
}

/** Renders the whole report page. */
export async function renderReport(input: ReportInput): Promise<string> {
  const sections: string[] = [];
  for (let i = 0; i < input.datasets.length; i++) sections.push(await datasetSection(input.datasets[i], i));
  const toc = input.datasets
    .map((d, i) => `<a href="#d${i + 1}-${slug(d.name)}">${escapeHtml(d.name)}</a>`)
    .join('');
  const meta = `landform ${escapeHtml(input.version)} · ${escapeHtml(input.command)}${input.seed === undefined ? '' : ` · seed ${input.seed}`}`;
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<title>${escapeHtml(input.title)}</title><style>${STYLE}</style></head>
<body><header class="top"><div class="wrap"><p class="kicker">landform · shape report</p><h1>${escapeHtml(input.title)}</h1>${
    input.lead ? `<p>${escapeHtml(input.lead)}</p>` : ''
  }<div class="meta">${meta}</div></div></header>
<main><div class="caution" role="note" data-part="caution"><strong>Caution.</strong> ${escapeHtml(CAUTION_TEXT)}</div>
${input.datasets.length > 1 ? `<nav class="toc">Datasets: ${toc}</nav>${glance(input.datasets)}` : ''}
${sections.join('\n')}
</main>
<footer><h2>How these numbers were made</h2><p>Persistent homology per sample; persistence landscapes (Chazal, Fasy, Lecci, Rinaldo, Wasserman, 2014) vectorised on a grid learned inside each training fold; models chosen by inner cross-validation and scored on outer folds. Class means use every sample; their bands are simultaneous multiplier-bootstrap bands (Chazal et al., 2015); contrasts are permutation tests (Robinson and Turner, 2017) with Holm's correction (Holm, 1979).</p></footer>
</body></html>
`;
}
