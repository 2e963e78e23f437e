import { describe, expect, it } from 'vitest';
import {
  type Dataset,
  recordedSampleShape,
  sampleShapeOf,
  sampleShapeProblem,
} from '../../src/core/sample.js';

const points = (dim: number): Dataset => ({
  kind: 'points',
  source: 'p.csv',
  samples: [{ kind: 'points', id: 'a', label: '', dim, count: 1, coords: new Float64Array(dim) }],
});
const images = (shape: number[]): Dataset => ({
  kind: 'image',
  source: 'imgs',
  samples: [
    { kind: 'image', id: 'a', label: '', shape, values: new Float64Array(shape.reduce((x, y) => x * y)) },
  ],
});
const table = (columns: string[]): Dataset => ({
  kind: 'table',
  source: 't.csv',
  columns,
  samples: [{ kind: 'table', id: 'a', label: '', values: new Float64Array(columns.length) }],
});

describe('sample shapes a model depends on', () => {
  it('records the dimension of points, the axes of images and the columns of tables', () => {
    expect(sampleShapeOf(points(2))).toEqual({ dim: 2 });
    expect(sampleShapeOf(images([4, 5]))).toEqual({ axes: 2 });
    expect(sampleShapeOf(images([3, 4, 5]))).toEqual({ axes: 3 });
    expect(sampleShapeOf(table(['a', 'b']))).toEqual({ columns: ['a', 'b'] });
  });

  it('refuses another dimension, another number of axes, and columns that differ in count, name or order', () => {
    expect(sampleShapeProblem({ dim: 2 }, points(3))).toMatch(/points in 3 dimensions, but .* points in 2/);
    expect(sampleShapeProblem({ dim: 2 }, points(2))).toBeUndefined();
    expect(sampleShapeProblem({ axes: 2 }, images([3, 4, 5]))).toMatch(
      /holds 3-D volumes, but .* 2-D images/,
    );
    // Image size does not matter to landscapes or to the raw features (downsampled to a fixed side).
    expect(sampleShapeProblem({ axes: 2 }, images([40, 50]))).toBeUndefined();
    expect(sampleShapeProblem({ columns: ['a', 'b'] }, table(['a', 'b', 'c']))).toMatch(
      /has 3 feature columns, but the model was trained on 2/,
    );
    expect(sampleShapeProblem({ columns: ['a', 'b'] }, table(['b', 'a']))).toMatch(
      /feature column 1 is 'b', but the model was trained with 'a' there/,
    );
    expect(sampleShapeProblem({ columns: ['a', 'b'] }, table(['a', 'b']))).toBeUndefined();
  });

  it('reads model folders written before the shape was recorded: their table columns, nothing else', () => {
    expect(recordedSampleShape({})).toEqual({});
    expect(recordedSampleShape({ columns: null })).toEqual({});
    expect(recordedSampleShape({ columns: ['a'] })).toEqual({ columns: ['a'] });
    expect(recordedSampleShape({ sampleShape: { dim: 3 }, columns: null })).toEqual({ dim: 3 });
    expect(sampleShapeProblem(recordedSampleShape({}), points(5))).toBeUndefined();
  });
});
