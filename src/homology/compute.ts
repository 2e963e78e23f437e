import { UserError } from '../core/errors.js';
import type { Sample } from '../io/dataset.js';
import { cubicalPersistence } from './cubical.js';
import { type Diagram, type DiagramSet, emptyDiagram } from './diagram.js';
import {
  checkFiltrationApplies,
  cloudFiltrationDiagrams,
  type Filtration,
  matrixFiltrationDiagrams,
  subsampleForFiltration,
} from './filtration.js';
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
  /** Filtration of clouds and distance matrices (default 'rips'); dtm:K and alpha values are radii (filtration.ts). */
  filtration?: Filtration;
  /** Landmarks kept per cloud or matrix before the filtration (default: every point). */
  subsample?: SubsampleSpec;
}

/** The diagrams of one sample, one per requested degree in increasing order. */
export function computeDiagrams(
  sample: Sample,
  options: DiagramOptions,
): DiagramSet & { coveringRadius?: number } {
  const degrees = checkDegrees(options.degrees);
  const maxDegree = degrees[degrees.length - 1];
  let diagrams: Diagram[];
  let coveringRadius: number | undefined;
  if (sample.kind === 'image' || (sample.kind === 'signal' && !options.embed))
    checkFiltrationApplies(sample.kind, options.filtration, sample.id, options.subsample);
  switch (sample.kind) {
    case 'points': {
      const cut = subsampleForFiltration(sample, options.subsample);
      coveringRadius = cut.coveringRadius;
      diagrams = cloudDiagrams(
        cut.sample.coords,
        cut.sample.count,
        cut.sample.dim,
        maxDegree,
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
      const filtration = options.filtration ?? 'rips';
      // The condensed copy and the rank tables are refused before they are allocated (the matrix itself is loaded).
      if (filtration === 'rips') checkRipsFloor(size, { sample: sample.id });
      else checkRipsFloor(size, { sample: sample.id, withVertexValues: true, what: 'DTM' });
      diagrams =
        filtration === 'rips'
          ? ripsPersistence(size, condenseMatrix(matrix, size), {
              maxDegree: maxDegree as 0 | 1 | 2,
              maxScale: options.maxScale,
            })
          : matrixFiltrationDiagrams(matrix, size, {
              filtration,
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
      diagrams = cubicalPersistence(sample.values, sample.shape, {
        superlevel: options.superlevel,
        maxDegree,
      });
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
  return {
    sample: sample.id,
    label: sample.label,
    diagrams: degrees.map((d) => diagrams.find((x) => x.degree === d) ?? emptyDiagram(d)),
    ...(coveringRadius !== undefined ? { coveringRadius } : {}),
  };
}

/** Point clouds (and embedded signals): the filtration branch lives here. */
function cloudDiagrams(
  coords: Float64Array,
  count: number,
  dim: number,
  maxDegree: number,
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
  const filtration = options.filtration ?? 'rips';
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
