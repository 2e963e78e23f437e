/**
 * The choice of filtration for point clouds and distance matrices, and the landmark step before it:
 *   rips     Vietoris–Rips on distances (the default);
 *   dtm:K    distance-to-measure weighted Rips, p = 1, K neighbours (dtm.ts); values are radii;
 *   alpha    the alpha (= Čech) filtration of planar clouds (alpha.ts); values are radii.
 * `computeDiagrams` (compute.ts) calls in here for anything but plain Rips and for `subsample`.
 *
 * Images have their own filtrations (image-filtration.ts). `--filtration` takes a comma-separated list of
 * either family (`SampleFiltration`); with several, each sample's diagrams are computed once per filtration
 * and tagged with its canonical text (`describeSampleFiltration`).
 */

import { type Diagram, emptyDiagram } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { DistanceSample, PointSample } from '../core/sample.js';
import { alphaDimensionError, alphaPersistence } from './alpha.js';
import { dtmPersistence, dtmPersistenceFromMatrix, dtmProblem } from './dtm.js';
import {
  describeImageFiltration,
  IMAGE_FILTRATION_CHOICES,
  type ImageFiltration,
  parseImageFiltration,
} from './image-filtration.js';
import type { Metric } from './metric.js';
import { type SubsampleSpec, subsampleSample } from './subsample.js';

export type Filtration = 'rips' | { kind: 'dtm'; k: number } | 'alpha';

export const FILTRATION_CHOICES = 'rips, dtm:K (K nearest neighbours, e.g. dtm:10) or alpha (2-D clouds)';

/** Parses `rips`, `dtm:K` or `alpha`; undefined when the text is none of them. */
export function parseFiltration(text: string): Filtration | undefined {
  const t = text.trim();
  if (t === 'rips' || t === 'alpha') return t;
  const m = /^dtm:(\d+)$/.exec(t);
  if (m && Number(m[1]) >= 1) return { kind: 'dtm', k: Number(m[1]) };
  return undefined;
}

export function describeFiltration(f: Filtration): string {
  return typeof f === 'string' ? f : `dtm:${f.k}`;
}

/** A filtration of either family: clouds and matrices (`Filtration`) or images (`ImageFiltration`). */
export type SampleFiltration = Filtration | ImageFiltration;

export function isImageFiltration(f: SampleFiltration): f is ImageFiltration {
  return typeof f === 'object' && f.kind !== 'dtm';
}

/** The canonical text of either family's filtration: the tag of its diagrams. */
export function describeSampleFiltration(f: SampleFiltration): string {
  return isImageFiltration(f) ? describeImageFiltration(f) : describeFiltration(f);
}

/**
 * Parses a comma-separated list of filtrations (`rips`, `dtm:K`, `alpha`, or image filtrations and their
 * presets, which expand in place), in the order given. Throws a UserError for an unknown or repeated item.
 */
export function parseFiltrationList(text: string, option = '--filtration'): SampleFiltration[] {
  const items = text.split(',').map((s) => s.trim());
  const out: SampleFiltration[] = [];
  const seen = new Set<string>();
  for (const item of items) {
    if (item === '')
      throw new UserError(`${option} '${text}' has an empty item; separate filtrations by single commas`);
    const found: SampleFiltration[] | undefined =
      parseImageFiltration(item) ?? ((f) => (f === undefined ? undefined : [f]))(parseFiltration(item));
    if (found === undefined) {
      throw new UserError(
        `${option} '${item}' is not known; choose ${FILTRATION_CHOICES} for clouds and matrices, or for images ${IMAGE_FILTRATION_CHOICES}`,
      );
    }
    for (const f of found) {
      const tag = describeSampleFiltration(f);
      if (seen.has(tag))
        throw new UserError(`${option} '${text}' names ${tag} twice; give each filtration once`);
      seen.add(tag);
      out.push(f);
    }
  }
  return out;
}

/** The filtrations of a `DiagramOptions.filtration` value (one, a list, or none) as a list. */
export function filtrationList(
  spec: SampleFiltration | readonly SampleFiltration[] | undefined,
): SampleFiltration[] {
  if (spec === undefined) return [];
  return Array.isArray(spec) ? [...spec] : [spec as SampleFiltration];
}

export interface FiltrationRun {
  filtration: Filtration;
  maxDegree: number;
  maxScale?: number;
  metric?: Metric;
  /** The sample id, for messages. */
  id: string;
}

/** Diagrams of a cloud under a DTM or alpha filtration (plain Rips stays in compute.ts). */
export function cloudFiltrationDiagrams(
  coords: Float64Array,
  count: number,
  dim: number,
  run: FiltrationRun,
): Diagram[] {
  const { filtration } = run;
  if (filtration === 'alpha') {
    if (dim !== 2) throw withSample(alphaDimensionError(dim), run.id);
    if ((run.metric ?? 'euclidean') !== 'euclidean') {
      throw new UserError(
        `sample '${run.id}': the alpha filtration is Euclidean; drop --metric ${run.metric} or use --filtration rips`,
      );
    }
    const diagrams = alphaPersistence(coords, count, {
      maxDegree: Math.min(run.maxDegree, 1),
      maxScale: run.maxScale,
    });
    // A planar complex has no voids: H2 is empty.
    if (run.maxDegree >= 2) diagrams.push(emptyDiagram(2));
    return diagrams;
  }
  if (filtration === 'rips') throw new Error('plain Rips is computed in compute.ts');
  checkK(filtration.k, count, run.id);
  return dtmPersistence(coords, count, dim, filtration.k, {
    maxDegree: run.maxDegree as 0 | 1 | 2,
    ...(run.maxScale !== undefined ? { maxScale: run.maxScale } : {}),
    ...(run.metric !== undefined ? { metric: run.metric } : {}),
  });
}

/** Diagrams of a distance matrix under a DTM filtration; alpha needs coordinates and is refused. */
export function matrixFiltrationDiagrams(matrix: Float64Array, size: number, run: FiltrationRun): Diagram[] {
  const { filtration } = run;
  if (filtration === 'alpha') {
    throw new UserError(
      `sample '${run.id}' is a distance matrix; the alpha filtration needs 2-D coordinates — use --filtration rips or --filtration dtm:K`,
    );
  }
  if (filtration === 'rips') throw new Error('plain Rips is computed in compute.ts');
  checkK(filtration.k, size, run.id);
  return dtmPersistenceFromMatrix(matrix, size, filtration.k, {
    maxDegree: run.maxDegree as 0 | 1 | 2,
    ...(run.maxScale !== undefined ? { maxScale: run.maxScale } : {}),
  });
}

/**
 * Refuses landmarks for samples that are not clouds or matrices (images, bare signals), and any filtration
 * but Rips for them; image filtrations are checked in compute.ts.
 */
export function checkFiltrationApplies(
  kind: string,
  filtration: SampleFiltration | undefined,
  id: string,
  subsample?: SubsampleSpec,
): void {
  if (subsample !== undefined) {
    throw new UserError(
      `sample '${id}' is a ${kind}; --subsample applies to point clouds (and signals with --embed) and distance matrices only; drop it for this dataset`,
    );
  }
  if (filtration === undefined || filtration === 'rips') return;
  if (isImageFiltration(filtration)) {
    throw new UserError(
      `sample '${id}' is a ${kind}; --filtration ${describeImageFiltration(filtration)} applies to images only; drop it for this dataset`,
    );
  }
  throw new UserError(
    `sample '${id}' is a ${kind}; --filtration ${describeFiltration(filtration)} applies to point clouds (and signals with --embed) and distance matrices only; drop it for this dataset`,
  );
}

/** A cloud or matrix cut down to its landmarks, with their covering radius. */
export function subsampleForFiltration<S extends PointSample | DistanceSample>(
  sample: S,
  spec: SubsampleSpec | undefined,
): { sample: S; coveringRadius?: number } {
  if (spec === undefined) return { sample };
  if (sample.kind === 'points') {
    const coords = (sample as PointSample).coords;
    const dim = (sample as PointSample).dim;
    for (let i = 0; i < coords.length; i++) {
      if (!Number.isFinite(coords[i])) {
        throw new UserError(
          `sample '${sample.id}': point ${Math.floor(i / dim) + 1} has coordinate ${coords[i]}; coordinates must be finite numbers`,
        );
      }
    }
  }
  const { sample: cut, landmarks } = subsampleSample(sample, spec);
  return { sample: cut, coveringRadius: landmarks.coveringRadius };
}

function checkK(k: number, count: number, id: string): void {
  const problem = dtmProblem(k, count);
  if (problem) throw new UserError(`sample '${id}': ${problem}`);
}

function withSample(error: UserError, id: string): UserError {
  return new UserError(`sample '${id}': ${error.message}`, { file: error.file, line: error.line });
}
