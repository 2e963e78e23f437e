import { type Diagram, type DiagramSet, emptyDiagram } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { Sample } from '../core/sample.js';
import { cubicalPersistence } from './cubical.js';
import {
  checkFiltrationApplies,
  cloudFiltrationDiagrams,
  describeSampleFiltration,
  type Filtration,
  filtrationList,
  isImageFiltration,
  matrixFiltrationDiagrams,
  type SampleFiltration,
  subsampleForFiltration,
} from './filtration.js';
import { filteredImage, IMAGE_FILTRATION_CHOICES } from './image-filtration.js';
import { condenseMatrix, type Metric } from './metric.js';
import { checkRipsFloor, cloudRipsPersistence, ripsPersistence } from './rips.js';
import { type DelayEmbedding, delayEmbedding, signalPersistence } from './signal.js';
import type { SubsampleSpec } from './subsample.js';

/** What to compute for each sample. Defaults are written beside each field. */
export interface DiagramOptions {
  /** Homology degrees wanted, each 0–2 (no default: the caller decides; the command uses 0,1). */
  degrees: number[];
  /** Largest filtration value for Rips complexes (default: none, the enclosing radius). */
  maxScale?: number;
  /** Distance between points (default 'euclidean'). */
  metric?: Metric;
  /** Delay embedding that turns a signal into a point cloud (default: none, sublevel H0 of the signal). */
  embed?: DelayEmbedding;
  /** Superlevel instead of sublevel sets for images and signals (default false); reported on the negated scale. */
  superlevel?: boolean;
  /**
   * The filtration, or a list of them (default 'rips' for clouds and matrices, 'grey' for images): cloud
   * filtrations (rips, dtm:K, alpha; values of dtm:K and alpha are radii, filtration.ts) or image filtrations
   * (image-filtration.ts). With two or more, every diagram is tagged with its filtration's canonical text and
   * the set holds, per filtration in the order given, one diagram per degree ascending; with one, diagrams
   * stay untagged.
   */
  filtration?: SampleFiltration | readonly SampleFiltration[];
  /** Images: foreground is value ≥ threshold for the binarised filtrations (default: Otsu's per image). */
  threshold?: number;
  /** Landmarks kept per cloud or matrix before the filtration (default: every point). */
  subsample?: SubsampleSpec;
}

/**
 * The diagrams of one sample, one per requested degree in increasing order — per filtration, tagged, when
 * `options.filtration` lists several (see `DiagramOptions.filtration`).
 */
export function computeDiagrams(
  sample: Sample,
  options: DiagramOptions,
): DiagramSet & { coveringRadius?: number } {
  const degrees = checkDegrees(options.degrees);
  if (sample.kind === 'diagrams') {
    // Given diagrams are used as they are; tagged ones keep every channel of the wanted degrees, in order.
    const tagged = sample.diagrams.some((d) => d.filtration !== undefined);
    const diagrams = tagged
      ? sample.diagrams.filter((d) => degrees.includes(d.degree))
      : degrees.map((d) => sample.diagrams.find((x) => x.degree === d) ?? emptyDiagram(d));
    return { sample: sample.id, label: sample.label, diagrams };
  }
  const list = filtrationList(options.filtration);
  const covering = (r: number | undefined) => (r !== undefined ? { coveringRadius: r } : {});
  if (list.length <= 1) {
    const one = diagramsOf(sample, list[0], false, degrees, options);
    return {
      sample: sample.id,
      label: sample.label,
      diagrams: degrees.map((d) => one.diagrams.find((x) => x.degree === d) ?? emptyDiagram(d)),
      ...covering(one.coveringRadius),
    };
  }
  const diagrams: Diagram[] = [];
  let coveringRadius: number | undefined;
  for (const f of list) {
    const one = diagramsOf(sample, f, true, degrees, options);
    if (one.coveringRadius !== undefined) coveringRadius = Math.max(coveringRadius ?? 0, one.coveringRadius);
    const filtration = describeSampleFiltration(f);
    for (const d of degrees) {
      const found = one.diagrams.find((x) => x.degree === d) ?? emptyDiagram(d);
      diagrams.push({ degree: d, births: found.births, deaths: found.deaths, filtration });
    }
  }
  return { sample: sample.id, label: sample.label, diagrams, ...covering(coveringRadius) };
}

/** One sample under one filtration (`inList`: one of several, where 'rips' does not stand for 'grey'). */
function diagramsOf(
  sample: Sample,
  filtration: SampleFiltration | undefined,
  inList: boolean,
  degrees: number[],
  options: DiagramOptions,
): { diagrams: Diagram[]; coveringRadius?: number } {
  const maxDegree = degrees[degrees.length - 1];
  let diagrams: Diagram[];
  let coveringRadius: number | undefined;
  if (sample.kind === 'signal' && !options.embed)
    checkFiltrationApplies(sample.kind, filtration, sample.id, options.subsample);
  if (sample.kind === 'image') checkFiltrationApplies(sample.kind, undefined, sample.id, options.subsample);
  if (
    filtration !== undefined &&
    isImageFiltration(filtration) &&
    sample.kind !== 'image' &&
    sample.kind !== 'diagrams'
  ) {
    checkFiltrationApplies(sample.kind, filtration, sample.id);
  }
  const cloudFiltration = filtration as Filtration | undefined;
  switch (sample.kind) {
    case 'points': {
      const cut = subsampleForFiltration(sample, options.subsample);
      coveringRadius = cut.coveringRadius;
      diagrams = cloudDiagrams(
        cut.sample.coords,
        cut.sample.count,
        cut.sample.dim,
        maxDegree,
        cloudFiltration,
        options,
        sample.id,
      );
      break;
    }
    case 'distances': {
      checkDistanceMatrix(sample.matrix, sample.size, sample.id);
      const cut = subsampleForFiltration(sample, options.subsample);
      coveringRadius = cut.coveringRadius;
      const { matrix, size } = cut.sample;
      const chosen = cloudFiltration ?? 'rips';
      // The condensed copy and the rank tables are refused before they are allocated (the matrix itself is loaded).
      if (chosen === 'rips') checkRipsFloor(size, { sample: sample.id });
      else checkRipsFloor(size, { sample: sample.id, withVertexValues: true, what: 'DTM' });
      diagrams =
        chosen === 'rips'
          ? ripsPersistence(size, condenseMatrix(matrix, size), {
              maxDegree: maxDegree as 0 | 1 | 2,
              maxScale: options.maxScale,
            })
          : matrixFiltrationDiagrams(matrix, size, {
              filtration: chosen,
              maxDegree,
              maxScale: options.maxScale,
              id: sample.id,
            });
      break;
    }
    case 'signal':
      if (options.embed) {
        const cloud = delayEmbedding(sample.values, options.embed);
        const cut = subsampleForFiltration({ ...sample, kind: 'points', ...cloud }, options.subsample);
        coveringRadius = cut.coveringRadius;
        diagrams = cloudDiagrams(
          cut.sample.coords,
          cut.sample.count,
          cut.sample.dim,
          maxDegree,
          cloudFiltration,
          options,
          sample.id,
        );
      } else {
        if (maxDegree > 0) {
          throw new UserError(
            `sample '${sample.id}': a signal on its own has only degree 0; add --embed DIM:DELAY for loops, or use --degrees 0`,
          );
        }
        diagrams = [signalPersistence(sample.values, { superlevel: options.superlevel })];
      }
      break;
    case 'image': {
      const axes = sample.shape.length;
      if (maxDegree > axes - 1) {
        throw new UserError(
          `sample '${sample.id}': an image with ${axes} axes has degrees 0 to ${axes - 1}; lower --degrees`,
        );
      }
      const chosen: SampleFiltration =
        filtration === undefined || (filtration === 'rips' && !inList) ? { kind: 'grey' } : filtration;
      if (!isImageFiltration(chosen)) {
        throw new UserError(
          `sample '${sample.id}' is an image; --filtration ${describeSampleFiltration(chosen)} applies to point clouds and distance matrices — for images choose ${IMAGE_FILTRATION_CHOICES}`,
        );
      }
      const values = filteredImage(sample.values, sample.shape, chosen, {
        ...(options.threshold !== undefined ? { threshold: options.threshold } : {}),
        ...(options.superlevel ? { superlevel: true } : {}),
      });
      diagrams = cubicalPersistence(values, sample.shape, { maxDegree });
      break;
    }
    case 'diagrams':
      diagrams = sample.diagrams;
      break;
    case 'table':
      throw new UserError(
        `sample '${sample.id}' is a table of features; it has no shape to compute diagrams of`,
      );
  }
  return { diagrams, ...(coveringRadius !== undefined ? { coveringRadius } : {}) };
}

/** Point clouds (and embedded signals): the filtration branch lives here. */
function cloudDiagrams(
  coords: Float64Array,
  count: number,
  dim: number,
  maxDegree: number,
  chosen: Filtration | undefined,
  options: DiagramOptions,
  id = '',
): Diagram[] {
  for (let i = 0; i < coords.length; i++) {
    if (!Number.isFinite(coords[i])) {
      throw new UserError(
        `point ${Math.floor(i / dim) + 1} has coordinate ${coords[i]}; coordinates must be finite numbers`,
      );
    }
  }
  const filtration = chosen ?? 'rips';
  // Refused from the size of the cloud actually built (after any subsample), before the distances exist.
  if (filtration === 'rips') checkRipsFloor(count, { sample: id });
  else if (filtration !== 'alpha') checkRipsFloor(count, { sample: id, withVertexValues: true, what: 'DTM' });
  if (filtration !== 'rips')
    return cloudFiltrationDiagrams(coords, count, dim, {
      filtration,
      maxDegree,
      maxScale: options.maxScale,
      metric: options.metric,
      id,
    });
  return cloudRipsPersistence(coords, count, dim, options.metric ?? 'euclidean', {
    maxDegree: maxDegree as 0 | 1 | 2,
    maxScale: options.maxScale,
  });
}

function checkDegrees(degrees: number[]): number[] {
  if (degrees.length === 0) throw new UserError('no homology degrees requested; pass e.g. --degrees 0,1');
  for (const d of degrees) {
    if (!Number.isInteger(d) || d < 0 || d > 2)
      throw new UserError(`degree ${d} is not computed; choose degrees from 0, 1, 2`);
  }
  return [...new Set(degrees)].sort((a, b) => a - b);
}

function checkDistanceMatrix(m: Float64Array, size: number, id: string): void {
  if (m.length !== size * size)
    throw new UserError(
      `sample '${id}': a ${size} × ${size} matrix needs ${size * size} values, got ${m.length}`,
    );
  for (let i = 0; i < size; i++) {
    if (m[i * size + i] !== 0)
      throw new UserError(
        `sample '${id}': diagonal entry ${i + 1} is ${m[i * size + i]}; a distance matrix has zeros there`,
      );
    for (let j = i + 1; j < size; j++) {
      const a = m[i * size + j];
      const b = m[j * size + i];
      if (!(a >= 0) || a !== b) {
        throw new UserError(
          `sample '${id}': entries (${i + 1}, ${j + 1}) = ${a} and (${j + 1}, ${i + 1}) = ${b}; distances must be equal both ways and ≥ 0`,
        );
      }
    }
  }
}
