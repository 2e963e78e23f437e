import { join } from 'node:path';
import type { Sample, SampleKind } from '../../core/sample.js';
import type { LandscapeVectorizerOptions } from '../../features/landscape-vectorizer.js';
import type { RawFeaturesOptions } from '../../features/raw-features.js';
import type { DiagramOptions } from '../../homology/compute.js';
import { formatPgm } from '../../io/image-file.js';
import { formatLabelsCsv, formatPointsCsv, formatSignalCsv } from '../../io/sample-writers.js';
import { FIELD_CLASSES, generateField } from './field.js';
import { generateLattice, LATTICE_CLASSES } from './lattice.js';
import { generatePump, PUMP_CLASSES } from './pump.js';

export type { FieldOptions } from './field.js';
export type { LatticeOptions } from './lattice.js';
export type { PumpOptions } from './pump.js';
export { FIELD_CLASSES, generateField, generateLattice, generatePump, LATTICE_CLASSES, PUMP_CLASSES };

/**
 * The one catalogue of the shipped demo datasets: each a scenario of our own, made by a seeded generator.
 * `landform datasets` writes every one of them (and `datasets/README.md`) byte for byte from these seeds;
 * `landform demo` runs the study below on each and describes it in the report with the same `summary` and
 * `advice`, so the README, the report and the generator cannot tell different stories.
 */
export interface Scenario {
  name: string;
  kind: SampleKind;
  seed: number;
  classes: readonly string[];
  /** The path `loadDataset` is given, relative to the datasets folder. */
  path: string;
  /** One line for the README: what it is, and that it is synthetic. */
  summary: string;
  /** Advice for the pipeline (filtration, embedding), shown in the README. */
  advice: string;
  samples(): Sample[];
  /** The files of the dataset, relative to the datasets folder. */
  files(): Array<{ path: string; data: string | Uint8Array }>;
  /** The options the demo study uses on this dataset. */
  study: ScenarioStudy;
}

/** How the demo studies one scenario: the pipeline that its `advice` describes, as options. */
export interface ScenarioStudy {
  diagram: DiagramOptions;
  landscape: LandscapeVectorizerOptions;
  /** The (K, G) candidates of the inner cross-validation for this set. */
  landscapeCandidates: ReadonlyArray<{ depth: number; gridSize: number }>;
  raw?: RawFeaturesOptions;
}

export const SCENARIOS: readonly Scenario[] = [
  {
    name: 'lattice',
    kind: 'points',
    seed: 4101,
    classes: LATTICE_CLASSES,
    path: 'lattice.csv',
    summary:
      'Synthetic. 2-D point clouds from an invented inspection line of printed lattice panels (2 × 2 square cells): intact, broken-strut (most of one outer strut missing), merged-cells (the four inner walls missing: the block becomes one cell twice as wide); random rotation, position, ±15% scale, 130–180 points, jitter, stray points in about a third of the panels. 25 panels per class.',
    advice:
      'Vietoris–Rips on the points, degrees 0 and 1; the classes differ in the number and size of H1 loops (4 cells, 3 and a short-lived one, 1 twice as wide).',
    samples: () => generateLattice(4101),
    files: () => [{ path: 'lattice.csv', data: formatPointsCsv(generateLattice(4101)) }],
    study: {
      diagram: { degrees: [0, 1] },
      // The classes differ in H1 only (4, 3 or 1 loops). H0 would add 150+ short bars of point spacing and
      // stray points, i.e. noise features. Depth 6 keeps every cell's loop plus short loops of stray points.
      landscape: { degrees: [1] },
      landscapeCandidates: [{ depth: 6, gridSize: 20 }],
    },
  },
  {
    name: 'pump',
    kind: 'signal',
    seed: 4102,
    classes: PUMP_CLASSES,
    path: 'pump.csv',
    summary:
      'Synthetic. Vibration of an invented circulation pump, 400 values a run, about 32 samples per shaft revolution: healthy (shaft frequency and weak harmonics), cavitating (plus decaying impulsive bursts and broadband noise), misaligned (plus a second, incommensurate frequency); random phase, amplitude and frequency per run. 25 runs per class.',
    advice:
      'Delay embedding of dimension 4 with delay 8 (a quarter revolution), stride 2 to thin the points; degrees 0 and 1. A healthy run traces one loop, a misaligned run a torus.',
    samples: () => generatePump(4102),
    files: () => [{ path: 'pump.csv', data: formatSignalCsv(generatePump(4102), 'long') }],
    study: {
      diagram: { degrees: [0, 1], embed: { dimension: 4, delay: 8, stride: 2 } },
      landscape: { degrees: [0, 1] },
      landscapeCandidates: [{ depth: 3, gridSize: 20 }],
      raw: { signalLength: 64 },
    },
  },
  {
    name: 'field',
    kind: 'image',
    seed: 4103,
    classes: FIELD_CLASSES,
    path: 'field',
    summary:
      'Synthetic. 40 × 40 8-bit thermal frames (PGM) of invented buried heating sensors: disc (one warm patch), ring (a warm rim round a cool core), pair (two warm patches), the warm area matched across classes; random position, size, brightness, background gradient and noise. 25 frames per class.',
    advice:
      'Superlevel-set filtration of the grey levels (sublevel sets of the negated image), degrees 0 and 1: a ring adds one H1 class, a pair one long H0 bar.',
    samples: () => generateField(4103),
    files: () => {
      const frames = generateField(4103);
      const files: Array<{ path: string; data: string | Uint8Array }> = [];
      for (const f of frames) {
        files.push({
          path: join('field', `${f.id}.pgm`),
          data: formatPgm([f.shape[0], f.shape[1]], f.values, 255),
        });
      }
      files.push({
        path: join('field', 'labels.csv'),
        data: formatLabelsCsv(frames.map((f) => ({ file: `${f.id}.pgm`, label: f.label }))),
      });
      return files;
    },
    study: {
      diagram: { degrees: [0, 1], superlevel: true },
      landscape: { degrees: [0, 1] },
      landscapeCandidates: [{ depth: 3, gridSize: 15 }],
      raw: { imageSize: 10 },
    },
  },
];

export function scenarioNamed(name: string): Scenario | undefined {
  return SCENARIOS.find((s) => s.name === name);
}

/** The text of `datasets/README.md`, made from the scenarios so it never drifts from them. */
export function datasetsReadme(): string {
  const lines = [
    '# Demo datasets',
    '',
    'Every dataset here is **synthetic**: made by a seeded generator in `src/demo/scenarios/` from a scenario we',
    'invented. None of it is measured data. `npm run datasets` (or `landform datasets --out datasets`) writes',
    'all of them again, byte for byte. They are for trying landform out, not for drawing conclusions: a',
    'cross-validated accuracy on them says nothing about real lattices, pumps or sensors.',
    '',
  ];
  for (const s of SCENARIOS) {
    lines.push(
      `## \`${s.path}\` (${s.kind}, seed ${s.seed}, classes ${s.classes.join(', ')})`,
      '',
      s.summary,
      '',
      `Suggested: ${s.advice}`,
      '',
    );
  }
  return lines.join('\n');
}

/** Every file `landform datasets` writes, relative to the output folder. */
export function datasetFiles(): Array<{ path: string; data: string | Uint8Array }> {
  return [...SCENARIOS.flatMap((s) => s.files()), { path: 'README.md', data: datasetsReadme() }];
}
