import type { Diagram } from '../homology/diagram.js';

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
