import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type DiagramSet, makeDiagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { multiplierBand } from '../../src/report/bands.js';
import { diagramDistanceMap } from '../../src/report/distance-map.js';
import {
  CAUTION_TEXT,
  CONTRAST_ROWS_SHOWN,
  type DatasetReport,
  escapeHtml,
  MEAN_LAYERS_SHOWN,
  renderReport,
  slug,
} from '../../src/report/html.js';
import { classMeans } from '../../src/report/means.js';
import { contrastAll, permutationReach } from '../../src/report/permutation.js';
import { sampleMap } from '../../src/report/scatter.js';
import { type GridSpec, stackLandscapes } from '../../src/report/stack.js';
import { tempDir, testOutput } from '../helpers/cli.js';

const HOSTILE = '<script>alert(1)</script>';

describe('escapeHtml', () => {
  it('escapes the five HTML special characters and nothing else', () => {
    // WHATWG HTML Living Standard, "Escaping a string": &, <, > (and " ' inside attributes).
    expect(escapeHtml(`a<b>&"c'd`)).toBe('a&lt;b&gt;&amp;&quot;c&#39;d');
    expect(escapeHtml('λ₁ · H1')).toBe('λ₁ · H1');
    expect(escapeHtml(HOSTILE)).not.toContain('<');
  });
  it('makes fragment ids from any text', () => {
    expect(slug('Pump (raw)')).toBe('pump-raw');
    expect(slug('<>')).toBe('x');
  });
});

/** A report built from data made here: three classes of random diagrams, one class with a hostile name. */
async function buildReport(): Promise<{ html: string; dataset: DatasetReport }> {
  const random = new Random(17);
  const grid: GridSpec = { start: 0, stop: 2.5, count: 60 };
  const depth = 3;
  const labels = ['ring', 'disc', HOSTILE];
  const means: DatasetReport['means'][number][] = [];
  const stacksByDegree: Array<{
    degree: number;
    classes: Array<{ label: string; stack: ReturnType<typeof stackLandscapes> }>;
  }> = [];
  const examples: DatasetReport['examples'][number][] = [];
  const sets: DiagramSet[] = [];
  const features: number[] = [];
  for (const degree of [0, 1]) {
    const classes = labels.map((label, c) => {
      const rows: Float64Array[] = [];
      for (let i = 0; i < 20; i++) {
        const pairs: Array<[number, number]> = [];
        for (let p = 0; p < 4; p++) {
          const b = random.uniform(0, 0.8);
          pairs.push([b, b + random.uniform(0.2, 0.6) * (1 + c * 0.5)]);
        }
        if (degree === 1) {
          sets.push({ sample: `${label}-${i}`, label, diagrams: [makeDiagram(1, pairs)] });
          features.push(...pairs.flat());
        }
        if (degree === 1 && i === 0)
          examples.push({
            label,
            sample: `${label}-${i}`,
            diagrams: [makeDiagram(0, [...pairs, [0, Infinity]]), makeDiagram(1, pairs.slice(0, 2))],
          });
        const out = new Float64Array(depth * grid.count);
        for (let j = 0; j < grid.count; j++) {
          const t = grid.start + (j * (grid.stop - grid.start)) / (grid.count - 1);
          const tents = pairs.map(([b, d]) => Math.max(0, Math.min(t - b, d - t))).sort((x, y) => y - x);
          for (let k = 0; k < depth; k++) out[k * grid.count + j] = tents[k] ?? 0;
        }
        rows.push(out);
      }
      return { label, stack: stackLandscapes(rows, grid, depth) };
    });
    stacksByDegree.push({ degree, classes });
    means.push({
      degree,
      classes: classes.map((c) => ({ label: c.label, band: multiplierBand(c.stack, { draws: 200 }) })),
    });
  }
  const contrasts = contrastAll(stacksByDegree, { permutations: 99 });
  const ids = sets.map((x) => ({ id: x.sample, label: x.label }));
  const matrix = { rows: sets.length, cols: 8, data: Float64Array.from(features) };
  const sampleMaps = [
    await sampleMap(matrix, ids, 'landscape', 'depth 3, grid 60'),
    await sampleMap({ ...matrix, data: matrix.data.map((v, k) => v * ((k % 3) + 1)) }, ids, 'raw'),
  ];
  const distanceMap = diagramDistanceMap(
    sets,
    { degree: 1 },
    { perClass: 12, seed: 1, infinite: { mode: 'drop' }, reason: 'H1 was asked for' },
  );
  const t = Array.from({ length: 40 }, (_, j) => (j * 2.5) / 39);
  const dataset: DatasetReport = {
    name: `rings & ${HOSTILE}`,
    description: 'Built inside the test from random diagrams.',
    summary: { kind: 'diagrams', samples: 60, classes: labels.map((label) => ({ label, count: 20 })) },
    options: { degrees: [0, 1], folds: 5, note: HOSTILE },
    accuracy: [
      { features: 'landscape', model: 'pca-svm', mean: 0.9, std: 0.05, balancedAccuracy: 0.9, macroF1: 0.89 },
      { features: 'raw', model: 'pca-svm', mean: 0.6, std: 0.1 },
      { features: 'landscape', model: 'dense', mean: 0.85, std: 0.07 },
      { features: 'raw', model: 'dense', mean: 0.55, std: 0.12 },
    ],
    confusions: [
      {
        features: 'landscape',
        model: 'pca-svm',
        classes: labels,
        matrix: [
          [18, 2, 0],
          [1, 19, 0],
          [0, 3, 17],
        ],
      },
      {
        features: 'raw',
        model: 'pca-svm',
        classes: labels,
        matrix: [
          [12, 6, 2],
          [5, 11, 4],
          [3, 4, 13],
        ],
      },
    ],
    chosen: [
      {
        features: 'landscape',
        model: 'pca-svm',
        choice: 'depth 3 · grid 60 · C 1 · kernel linear',
        folds: ['1', '2', '4'],
        accuracies: [0.9, 0.95, 0.85],
      },
      {
        features: 'landscape',
        model: 'pca-svm',
        choice: `kernel ${HOSTILE}`,
        folds: ['3', '5'],
        accuracies: [0.9, 0.9],
      },
      {
        features: 'raw',
        model: 'pca-svm',
        choice: 'C 1 · kernel linear',
        folds: ['1', '2', '3', '4', '5'],
        accuracies: [0.6, 0.6, 0.5, 0.7, 0.6],
      },
    ],
    sampleMaps,
    distanceMap,
    means,
    contrasts,
    contrastNote: '99 permutations, L2 distance.',
    contrastReach: permutationReach(contrasts.length, 99),
    maps: {
      weights: {
        curves: [0, 1].flatMap((degree) =>
          [1, 2].map((layer) => ({ degree, layer, t, value: t.map((x) => Math.sin(x * layer + degree)) })),
        ),
        note: 'Linear weights.',
      },
      importance: {
        rows: [
          { group: 'H0 λ1', mean: 0.1, std: 0.02 },
          { group: 'H1 λ1', mean: 0.3, std: 0.05 },
        ],
        note: 'Permutation importance.',
      },
    },
    examples,
    findings: [`The class ${HOSTILE} is the most spread out.`],
  };
  const html = await renderReport({
    title: 'Report test',
    lead: 'Charts from data made in the test.',
    version: '0.0.0',
    command: 'test',
    seed: 1,
    datasets: [dataset],
  });
  return { html, dataset };
}

describe('renderReport', () => {
  let html = '';
  let dir = '';
  let file = '';
  beforeAll(async () => {
    html = (await buildReport()).html;
    dir = tempDir();
    file = join(dir, 'report.html');
    writeFileSync(file, html);
  }, 60_000);
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('is one self-contained page with the caution and no active content', () => {
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).toContain(escapeHtml(CAUTION_TEXT));
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/\b(src|href)="(https?:)?\/\//i);
    expect(html).not.toMatch(/@import|@font-face|url\(\s*['"]?https?:/i);
    expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
  });

  it('renders in a real browser with no console errors, no network requests and every chart in place', async () => {
    const { chromium } = await import('playwright-core');
    const profile = tempDir('landform-chromium-');
    const context = await chromium.launchPersistentContext(profile, {
      executablePath: '/usr/bin/chromium',
      headless: true,
      viewport: { width: 1280, height: 800 },
      args: [
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    });
    const foreign: string[] = [];
    const errors: string[] = [];
    const dialogs: string[] = [];
    try {
      await context.route('**/*', (route) => {
        const url = route.request().url();
        if (url.startsWith('file:')) return route.continue();
        foreign.push(url);
        return route.abort();
      });
      context.on('request', (request) => {
        if (!request.url().startsWith('file:')) foreign.push(request.url());
      });
      const page = context.pages()[0] ?? (await context.newPage());
      page.on('console', (message) => {
        if (message.type() === 'error') errors.push(message.text());
      });
      page.on('pageerror', (error) => errors.push(error.message));
      page.on('dialog', (dialog) => {
        dialogs.push(dialog.message());
        void dialog.dismiss();
      });
      await page.goto(pathToFileURL(file).href, { waitUntil: 'load' });

      const count = (part: string) => page.locator(`section[data-part="${part}"] figure.chart svg`).count();
      expect(await count('accuracy')).toBe(1);
      expect(await page.locator('section[data-part="accuracy"] table.chosen tr').count()).toBe(1 + 3); // header + choices
      expect(await count('samples')).toBe(2); // landscape and raw sample maps
      expect(await count('distances')).toBe(1);
      expect(await count('confusion')).toBe(2);
      expect(await count('means')).toBe(2); // one chart per degree
      expect(await count('maps')).toBe(3); // weights for H0 and H1, plus importance
      expect(await count('examples')).toBe(3); // one per class
      expect(await page.locator('section[data-part="contrasts"] table tr').count()).toBe(1 + 2 * 3); // header + pairs × degrees

      // The hostile class name is shown as text, never run.
      expect(await page.getByText(HOSTILE, { exact: true }).count()).toBeGreaterThan(0);
      expect(await page.locator('script').count()).toBe(0);
      expect(dialogs).toEqual([]);
      expect(await page.locator('[data-part="caution"]').isVisible()).toBe(true);

      mkdirSync(testOutput, { recursive: true });
      writeFileSync(join(testOutput, 'report-test.html'), html);
      await page.screenshot({ path: join(testOutput, 'report-test.png') });
      await page.screenshot({ path: join(testOutput, 'report-test-full.png'), fullPage: true });
    } finally {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    }
    expect(foreign).toEqual([]);
    expect(errors).toEqual([]);
  }, 90_000);
});

describe('renderReport: a long contrast family', () => {
  it('shows the smallest p values first, at most CONTRAST_ROWS_SHOWN rows, and says how many tests there were', async () => {
    const { dataset } = await buildReport();
    const tests = Array.from({ length: 70 }, (_, i) => ({
      a: 'x',
      b: 'y',
      degree: i % 2,
      filtration: `height:${i}:1`,
      statistic: 1 / (i + 1),
      p: (70 - i) / 1000,
      pAdjusted: Math.min(1, ((70 - i) / 1000) * 70),
      sizes: [10, 10] as [number, number],
    }));
    const html = await renderReport({
      title: 'Long family',
      lead: 'Contrasts only.',
      version: '0.0.0',
      command: 'test',
      seed: 1,
      datasets: [{ ...dataset, means: [], maps: undefined, examples: [], confusions: [], contrasts: tests }],
    });
    const table = html.slice(html.indexOf('Do the class means differ?'));
    const rows = table.match(/<tr[^>]*><td>height:/g) ?? [];
    expect(rows).toHaveLength(CONTRAST_ROWS_SHOWN);
    // The smallest p (test 69, p = 0.001) comes first; the largest ten (tests 0–9) are left out.
    expect(table.indexOf('height:69:1/H1')).toBeLessThan(table.indexOf('height:68:1/H0'));
    expect(table).not.toContain('height:0:1/H0');
    expect(table).toContain('The table shows the 60 smallest p values of 70 tests');
    expect(table).toContain('<th>filtration / degree</th>');
  }, 60_000);
});

/** Samples with `pairs` nested H1 pairs each (so `pairs` are alive at once) and one finite H0 pair. */
function nestedSets(label: string, pairs: number, n: number): DiagramSet[] {
  return Array.from({ length: n }, (_, i) => ({
    sample: `${label}-${i}`,
    label,
    diagrams: [
      makeDiagram(0, [[0, 0.5 + 0.05 * i]]),
      makeDiagram(
        1,
        Array.from({ length: pairs }, (_, p): [number, number] => [
          p * 0.1 + 0.02 * i,
          2 - p * 0.1 + 0.02 * i,
        ]),
      ),
    ],
  }));
}

describe('renderReport: counts in captions come from the data shown', () => {
  /** A depth-3 report of images filtered by superlevel sets: two H1 pairs per 'pair' sample, one per 'disc'. */
  async function depthThree(): Promise<string> {
    const { dataset } = await buildReport();
    const sets = [...nestedSets('pair', 2, 6), ...nestedSets('disc', 1, 6)];
    const means = classMeans(sets, {
      degrees: [0, 1],
      depth: 3,
      gridSize: 40,
      exact: false,
      band: { draws: 50 },
    });
    const t = Array.from({ length: 10 }, (_, j) => j / 9);
    return renderReport({
      title: 'Depth three',
      version: '0.0.0',
      command: 'test',
      datasets: [
        {
          ...dataset,
          name: 'frames',
          summary: {
            kind: 'image',
            samples: 12,
            classes: [
              { label: 'disc', count: 6 },
              { label: 'pair', count: 6 },
            ],
          },
          options: { diagrams: { degrees: [0, 1], superlevel: true } },
          accuracy: [
            { features: 'landscape', model: 'pca-svm', mean: 0.7, std: 0.1 },
            { features: 'raw', model: 'dense', mean: 0.95, std: 0.1 },
          ],
          confusions: [],
          means: means.map((m) => ({ degree: m.degree, classes: m.classes })),
          contrasts: [],
          maps: {
            weights: {
              curves: [1, 2, 3].map((layer) => ({ degree: 1, layer, t, value: t.map((x) => x * layer) })),
              note: 'Weights.',
            },
          },
          examples: [
            { label: 'pair', sample: 'pair-0', diagrams: sets[0].diagrams.filter((d) => d.degree === 1) },
          ],
        },
      ],
    });
  }

  it('names the layers drawn, the zero layers left out, the curves drawn, the clipped bars and the degrees in the key', async () => {
    expect(MEAN_LAYERS_SHOWN).toBe(4);
    const html = await depthThree();
    const means = html.slice(html.indexOf('data-part="means"'), html.indexOf('data-part="maps"'));
    const captions = [...means.matchAll(/<figcaption>(.*?)<\/figcaption>/g)].map((m) => m[1]);
    expect(captions).toHaveLength(2);
    // H0: one pair per sample, so only λ1 holds anything.
    expect(captions[0]).toContain('Panels: λ1 of the 3 layers computed, on one shared y axis.');
    expect(captions[0]).toContain(
      'λ2 and λ3 are zero for every class (no sample has 2 H0 pairs alive at the same scale), so they have no panel.',
    );
    expect(captions[1]).toContain('Panels: λ1 and λ2 of the 3 layers computed, on one shared y axis.');
    expect(captions[1]).toContain(
      'λ3 is zero for every class (no sample has 3 H1 pairs alive at the same scale), so it has no panel.',
    );
    expect(captions[1]).toContain(
      'In λ2 the mean of disc is zero (no sample of that class has 2 H1 pairs alive at the same scale): no band or line drawn.',
    );
    // Nothing names a fourth layer or a word count: the depth is 3.
    expect(means).not.toMatch(/λ4|\bfour\b/);
    expect(means).not.toContain('layer 3)');
    // Superlevel sets of images: the scale axis says t is the negated grey level, in every scale-axis chart.
    expect(means).toContain('filtration value t (superlevel sets: t = −grey level)');
    expect(means).not.toContain('filtration scale t (data units)');
    const maps = html.slice(html.indexOf('data-part="maps"'));
    expect(maps).toContain('Weights. Curves drawn: λ1–λ3.');
    expect(maps).toContain('filtration value t (superlevel sets: t = −grey level)');
    // The accuracy caption says which bar was clipped, and where.
    expect(html).toContain('Clipped here: raw · dense (at 1).');
    // The example key lists H1 only (the only degree drawn) and no triangles (no essential class).
    const examples = html.slice(html.indexOf('data-part="examples"'));
    expect(examples).toMatch(/Colours: <span class="key" style="background:#[0-9a-f]{6}"><\/span>H1\./);
    expect(examples).not.toContain('triangles');
    expect(examples).toContain('birth (−grey level)');
  }, 60_000);

  it('draws no chart for a channel whose class means are zero everywhere, and says why', async () => {
    const { dataset } = await buildReport();
    // Only essential H1 classes (dropped before landscapes): every H1 landscape is zero.
    const sets: DiagramSet[] = ['a', 'b'].flatMap((label) =>
      Array.from({ length: 4 }, (_, i) => ({
        sample: `${label}-${i}`,
        label,
        diagrams: [makeDiagram(0, [[0, 1 + i * 0.1]]), makeDiagram(1, [[0.5, Infinity]])],
      })),
    );
    const means = classMeans(sets, {
      degrees: [0, 1],
      depth: 2,
      gridSize: 20,
      exact: false,
      band: { draws: 20 },
    });
    const html = await renderReport({
      title: 'Empty H1',
      version: '0.0.0',
      command: 'test',
      datasets: [
        {
          ...dataset,
          accuracy: [],
          confusions: [],
          contrasts: [],
          maps: undefined,
          examples: [],
          means: means.map((m) => ({ degree: m.degree, classes: m.classes })),
        },
      ],
    });
    const part = html.slice(html.indexOf('data-part="means"'));
    expect(part.match(/<figure class="chart"/g)).toHaveLength(1);
    expect(part).toContain('<p class="how" data-empty="mean">H1: the mean landscape of every class is zero');
  }, 60_000);
});
