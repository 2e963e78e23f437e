import { classesOf, type Dataset } from '../core/sample.js';

/**
 * What `landform inspect` prints: the kind, the number of samples, the classes with their counts, and the
 * sizes of the samples (points per cloud, matrix sizes, signal lengths, image shapes, pairs per diagram).
 */
export interface SizeRange {
  /** What is counted, e.g. "points per sample". */
  what: string;
  min: number;
  median: number;
  max: number;
}

export interface DatasetSummary {
  source: string;
  kind: Dataset['kind'];
  samples: number;
  classes: Array<{ label: string; count: number }>;
  /** Samples whose label is empty (to be predicted). */
  unlabelled: number;
  sizes: SizeRange[];
  /** Extra facts: dimension, columns, image shapes, degrees, value range. */
  facts: Array<{ name: string; value: string }>;
}

function range(what: string, values: number[]): SizeRange {
  const sorted = [...values].sort((a, b) => a - b);
  const n = sorted.length;
  const median = n === 0 ? 0 : n % 2 === 1 ? sorted[(n - 1) / 2] : (sorted[n / 2 - 1] + sorted[n / 2]) / 2;
  return { what, min: sorted[0] ?? 0, median, max: sorted[n - 1] ?? 0 };
}

function valueRange(arrays: Float64Array[]): string {
  let lo = Infinity;
  let hi = -Infinity;
  for (const a of arrays) {
    // Invariant: lo and hi bound every value seen so far.
    for (let i = 0; i < a.length; i++) {
      if (a[i] < lo) lo = a[i];
      if (a[i] > hi) hi = a[i];
    }
  }
  return lo <= hi ? `${formatShort(lo)} to ${formatShort(hi)}` : 'none';
}

function formatShort(v: number): string {
  return Number.isInteger(v) ? String(v) : v.toPrecision(4);
}

export function summarizeDataset(dataset: Dataset): DatasetSummary {
  const counts = new Map<string, number>();
  for (const s of dataset.samples) counts.set(s.label, (counts.get(s.label) ?? 0) + 1);
  const classes = classesOf(dataset.samples)
    .filter((label) => label !== '')
    .map((label) => ({ label, count: counts.get(label) ?? 0 }));
  const sizes: SizeRange[] = [];
  const facts: Array<{ name: string; value: string }> = [];
  const samples = dataset.samples;
  switch (dataset.kind) {
    case 'points': {
      const s = samples as Array<Extract<(typeof samples)[number], { kind: 'points' }>>;
      facts.push({ name: 'dimensions', value: String(s[0]?.dim ?? 0) });
      sizes.push(
        range(
          'points per sample',
          s.map((x) => x.count),
        ),
      );
      facts.push({ name: 'coordinates', value: valueRange(s.map((x) => x.coords)) });
      break;
    }
    case 'distances': {
      const s = samples as Array<Extract<(typeof samples)[number], { kind: 'distances' }>>;
      sizes.push(
        range(
          'matrix size',
          s.map((x) => x.size),
        ),
      );
      facts.push({ name: 'distances', value: valueRange(s.map((x) => x.matrix)) });
      break;
    }
    case 'signal': {
      const s = samples as Array<Extract<(typeof samples)[number], { kind: 'signal' }>>;
      sizes.push(
        range(
          'values per signal',
          s.map((x) => x.values.length),
        ),
      );
      facts.push({ name: 'values', value: valueRange(s.map((x) => x.values)) });
      break;
    }
    case 'image': {
      const s = samples as Array<Extract<(typeof samples)[number], { kind: 'image' }>>;
      const shapes = [...new Set(s.map((x) => x.shape.join('×')))];
      facts.push({
        name: s[0]?.shape.length === 3 ? 'volume shapes' : 'image shapes',
        value: shapes.slice(0, 5).join(', ') + (shapes.length > 5 ? `, … (${shapes.length})` : ''),
      });
      sizes.push(
        range(
          'pixels per image',
          s.map((x) => x.values.length),
        ),
      );
      facts.push({ name: 'grey levels', value: valueRange(s.map((x) => x.values)) });
      break;
    }
    case 'table': {
      const s = samples as Array<Extract<(typeof samples)[number], { kind: 'table' }>>;
      const columns = dataset.columns ?? [];
      facts.push({
        name: 'columns',
        value: `${columns.length} (${columns.slice(0, 6).join(', ')}${columns.length > 6 ? ', …' : ''})`,
      });
      facts.push({ name: 'values', value: valueRange(s.map((x) => x.values)) });
      break;
    }
    case 'diagrams': {
      const s = samples as Array<Extract<(typeof samples)[number], { kind: 'diagrams' }>>;
      const degrees = [...new Set(s.flatMap((x) => x.diagrams.map((d) => d.degree)))].sort((a, b) => a - b);
      facts.push({ name: 'degrees', value: degrees.map((d) => `H${d}`).join(', ') });
      for (const degree of degrees) {
        sizes.push(
          range(
            `H${degree} pairs per sample`,
            s.map((x) => x.diagrams.find((d) => d.degree === degree)?.births.length ?? 0),
          ),
        );
      }
      let essential = 0;
      for (const x of s)
        for (const d of x.diagrams)
          for (let i = 0; i < d.deaths.length; i++) if (d.deaths[i] === Infinity) essential++;
      facts.push({ name: 'essential classes', value: String(essential) });
      break;
    }
  }
  return {
    source: dataset.source,
    kind: dataset.kind,
    samples: samples.length,
    classes,
    unlabelled: counts.get('') ?? 0,
    sizes,
    facts,
  };
}

/** The summary as aligned text lines. */
export function formatSummary(summary: DatasetSummary): string {
  const rows: Array<[string, string]> = [
    ['dataset', summary.source],
    ['kind', summary.kind],
    ['samples', String(summary.samples)],
    [
      'classes',
      summary.classes.length === 0
        ? 'none (unlabelled)'
        : `${summary.classes.length}: ${summary.classes.map((c) => `${c.label} ${c.count}`).join(', ')}`,
    ],
  ];
  if (summary.unlabelled > 0) rows.push(['unlabelled', String(summary.unlabelled)]);
  for (const f of summary.facts) rows.push([f.name, f.value]);
  for (const s of summary.sizes) rows.push([s.what, `min ${s.min}, median ${s.median}, max ${s.max}`]);
  const width = Math.max(...rows.map((r) => r[0].length));
  const lines = rows.map(([k, v]) => `${k.padEnd(width)}  ${v}`);
  const smallest = summary.classes.reduce((m, c) => Math.min(m, c.count), Infinity);
  if (summary.classes.length === 1)
    lines.push('note: one class only; training and evaluation need at least two');
  else if (smallest < 5 && summary.classes.length > 1)
    lines.push(
      `note: the smallest class has ${smallest} samples; 5-fold cross-validation needs at least 5 per class`,
    );
  return lines.join('\n') + '\n';
}
