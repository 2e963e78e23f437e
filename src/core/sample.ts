import type { Diagram } from './diagram.js';
import { shown } from './text.js';

/**
 * A dataset is a list of labelled samples of one kind. Samples are plain records over typed arrays;
 * every command receives its data through `loadDataset` (io/load.ts) in this shape.
 */
export type SampleKind = 'points' | 'distances' | 'signal' | 'image' | 'table' | 'diagrams';

export const SAMPLE_KINDS: readonly SampleKind[] = [
  'points',
  'distances',
  'signal',
  'image',
  'table',
  'diagrams',
];

interface SampleBase {
  /** The sample id, unique in its dataset. */
  id: string;
  /** The class label; may be '' for unlabelled samples (e.g. new samples to predict). */
  label: string;
}

/** A point cloud: `count` points in `dim` dimensions, row-major in `coords` (length count × dim). */
export interface PointSample extends SampleBase {
  kind: 'points';
  dim: number;
  count: number;
  coords: Float64Array;
}

/** A full symmetric distance matrix of `size` × `size`, row-major. */
export interface DistanceSample extends SampleBase {
  kind: 'distances';
  size: number;
  matrix: Float64Array;
}

/** A 1-D signal in time order. */
export interface SignalSample extends SampleBase {
  kind: 'signal';
  values: Float64Array;
}

/** A grayscale image ([height, width]) or volume ([depth, height, width]), row-major values. */
export interface ImageSample extends SampleBase {
  kind: 'image';
  shape: number[];
  values: Float64Array;
}

/** Ready-made feature values; names are in `Dataset.columns`. */
export interface TableSample extends SampleBase {
  kind: 'table';
  values: Float64Array;
}

/** Persistence diagrams computed elsewhere (or by `landform diagrams`). */
export interface DiagramSample extends SampleBase {
  kind: 'diagrams';
  diagrams: Diagram[];
}

export type Sample = PointSample | DistanceSample | SignalSample | ImageSample | TableSample | DiagramSample;

export interface Dataset<S extends Sample = Sample> {
  kind: S['kind'];
  /** Where it was read from (file or folder), for messages and provenance. */
  source: string;
  samples: S[];
  /** Column names for `table` datasets. */
  columns?: string[];
}

/** The distinct labels of a dataset in sorted order (the class order used everywhere). */
export function classesOf(samples: ReadonlyArray<{ label: string }>): string[] {
  return [...new Set(samples.map((s) => s.label))].sort();
}

/**
 * What a model's features need of a sample's shape, recorded at training time (the manifest's
 * `record.sampleShape`) and checked before predicting: the dimension of points, the axes of images (2-D
 * images or 3-D volumes), the columns of tables, in order. Other kinds have no shape a model depends on.
 */
export interface SampleShape {
  dim?: number;
  axes?: number;
  columns?: string[];
}

/** The shape of a dataset's samples (every sample of a dataset shares it; the loaders check that). */
export function sampleShapeOf(dataset: Dataset): SampleShape {
  const first = dataset.samples[0];
  if (first === undefined) return {};
  if (first.kind === 'points') return { dim: first.dim };
  if (first.kind === 'image') return { axes: first.shape.length };
  if (first.kind === 'table' && dataset.columns) return { columns: [...dataset.columns] };
  return {};
}

/** Why `dataset` cannot be used by a model trained on samples of shape `expected`, or undefined. */
export function sampleShapeProblem(expected: SampleShape, dataset: Dataset): string | undefined {
  const found = sampleShapeOf(dataset);
  if (expected.dim !== undefined && found.dim !== undefined && found.dim !== expected.dim) {
    return `has points in ${found.dim} dimensions, but the model was trained on points in ${expected.dim}; give ${expected.dim}-D points or train a model on these`;
  }
  if (expected.axes !== undefined && found.axes !== undefined && found.axes !== expected.axes) {
    const what = (axes: number): string => (axes === 3 ? '3-D volumes' : `${axes}-D images`);
    return `holds ${what(found.axes)}, but the model was trained on ${what(expected.axes)}; give ${what(expected.axes)} or train a model on these`;
  }
  if (expected.columns !== undefined && found.columns !== undefined) {
    const a = expected.columns;
    const b = found.columns;
    if (a.length !== b.length)
      return `has ${b.length} feature columns, but the model was trained on ${a.length}; give the columns it was trained on`;
    for (let i = 0; i < a.length; i++) {
      if (a[i] !== b[i])
        return `feature column ${i + 1} is '${shown(b[i])}', but the model was trained with '${shown(a[i])}' there; give the columns in the order it was trained on`;
    }
  }
  return undefined;
}

/**
 * The sample shape a model folder's manifest record expects: `sampleShape`, written by train since the shape
 * check was added; for folders written before it, the table columns they recorded (other kinds then go
 * unchecked, so those folders stay readable).
 */
export function recordedSampleShape(record: {
  sampleShape?: SampleShape;
  columns?: string[] | null;
}): SampleShape {
  if (record.sampleShape !== undefined) return record.sampleShape;
  return record.columns ? { columns: record.columns } : {};
}
