import { availableParallelism, freemem } from 'node:os';
import { UserError } from './errors.js';

/**
 * Resource budgets: every limit that refuses (or caps) a run before it allocates lives here, with its reason.
 * A guard estimates what a run would build from sizes alone (counts, shapes, options) — never by allocating
 * — and throws a `UserError` giving the number needed and the limit, so that a run that cannot fit stops in
 * milliseconds with one line instead of exhausting the machine's memory.
 */

/**
 * The smallest memory budget (1 GiB): below that, free memory is mostly the page cache the system gives back
 * on demand, so a small run is never refused for it (common practice, no source).
 */
export const MIN_MEMORY_BUDGET = 2 ** 30;

/**
 * Share of the available memory one computation may plan to use (80 %): the rest is left to the JavaScript
 * heap, the other threads' samples and the system (common practice, no source).
 */
export const MEMORY_SHARE = 0.8;

/** Environment variable that sets the memory budget in bytes (a suffix K, M or G counts binary units). */
export const MEMORY_LIMIT_VARIABLE = 'LANDFORM_MEMORY_LIMIT';

/**
 * Pixels of one decoded image (2^26 ≈ 67 million, e.g. 8192 × 8192). A pixel costs 4–8 bytes in the PNG
 * decoder, 8 as our grey level and about 40 more in the cubical complex (cells, ranks, union-find), so the
 * budget keeps one image near 4 GB at worst; camera and microscope images are well below it
 * (common practice, no source).
 */
export const IMAGE_PIXEL_BUDGET = 2 ** 26;

/**
 * Feature columns of one vectorised sample (degrees × depth × grid points): 200,000. Landscapes sampled
 * finer than a few hundred points per layer add no information a classifier can use on the sample sizes
 * this tool is for, and every column is stored per sample several times over (common practice, no source).
 */
export const FEATURE_COLUMN_BUDGET = 200_000;

/**
 * Copies of the feature matrix (samples × columns float64) a study holds at once: the features, the scaled
 * copy, a fold's training rows and the PCA input (counted from src/learn/evaluate.ts and pca-svm.ts).
 */
export const FEATURE_MATRIX_COPIES = 4;

/**
 * Values one `landform landscape` run may produce (samples × depth × grid points): 5 million. The whole
 * output is built as text before it is written, about 20 bytes a value (60 a CSV row), so this is 100–300 MB
 * of JSON or CSV with the numbers and their pieces alive beside it; a study's landscapes (hundreds of samples
 * × a few layers × a few hundred points) are far below (common practice, no source).
 */
export const LANDSCAPE_VALUE_BUDGET = 5_000_000;

/** The memory limit from the environment variable, or undefined when it is not set. */
export function memoryLimitFromEnvironment(
  env: Record<string, string | undefined> = process.env,
): number | undefined {
  const text = env[MEMORY_LIMIT_VARIABLE];
  if (text === undefined || text.trim() === '') return undefined;
  const m = /^\s*(\d+(?:\.\d+)?)\s*([KMG]?)i?B?\s*$/i.exec(text);
  if (!m) {
    throw new UserError(
      `${MEMORY_LIMIT_VARIABLE}='${text.slice(0, 40)}' is not a number of bytes; give e.g. 4G or 4294967296`,
    );
  }
  const unit = { '': 1, K: 2 ** 10, M: 2 ** 20, G: 2 ** 30 }[m[2].toUpperCase() as '' | 'K' | 'M' | 'G'];
  const bytes = Number(m[1]) * unit;
  if (!(bytes >= 1)) throw new UserError(`${MEMORY_LIMIT_VARIABLE}='${text}' must be at least 1 byte`);
  return bytes;
}

/**
 * The memory a computation may plan to use: `limit` when given, else the environment variable, else
 * MEMORY_SHARE of the available memory (free memory, or the container's limit when lower) and at least
 * MIN_MEMORY_BUDGET.
 */
export function memoryBudget(limit?: number): number {
  if (limit !== undefined) return limit;
  const fromEnvironment = memoryLimitFromEnvironment();
  if (fromEnvironment !== undefined) return fromEnvironment;
  let available = freemem();
  const constrained = process.constrainedMemory?.() ?? 0;
  if (constrained > 0 && constrained < available) available = constrained;
  return Math.max(MIN_MEMORY_BUDGET, MEMORY_SHARE * available);
}

/**
 * Whether `bytes` fit the budget. Within MIN_MEMORY_BUDGET and with no limit set, it does not ask the system
 * for free memory (a system call: 2 % of the time of a cloud of 300 points).
 */
export function fitsMemory(bytes: number, limit?: number): boolean {
  if (limit === undefined && bytes <= MIN_MEMORY_BUDGET && process.env[MEMORY_LIMIT_VARIABLE] === undefined)
    return true;
  return bytes <= memoryBudget(limit);
}

/** Bytes for a message: MB below 10 GB, GB above, one decimal for GB. */
export function formatBytes(bytes: number): string {
  if (bytes < 10 * 2 ** 30) return `${Math.max(1, Math.round(bytes / 2 ** 20))} MB`;
  return `${(bytes / 2 ** 30).toFixed(1)} GB`;
}

/** Throws the one-line refusal when `bytes` exceed the memory budget. `what` says what would be built. */
export function checkMemory(bytes: number, what: string, advice: string, limit?: number): void {
  if (fitsMemory(bytes, limit)) return;
  const budget = memoryBudget(limit);
  throw new UserError(
    `${what} needs about ${formatBytes(bytes)} of memory (limit ${formatBytes(budget)}, set by ${
      limit !== undefined
        ? 'the caller'
        : memoryLimitFromEnvironment() !== undefined
          ? MEMORY_LIMIT_VARIABLE
          : 'free memory'
    }); ${advice}`,
  );
}

/** The threads worth starting on this machine (os.availableParallelism()). */
export function coreCount(): number {
  return availableParallelism();
}

/**
 * Refuses landscape features of `columns` columns (degrees × depth × grid points) above FEATURE_COLUMN_BUDGET,
 * and, when the sample count is known, a feature matrix whose FEATURE_MATRIX_COPIES copies exceed the memory
 * budget. `options` names the options that set the columns, for the message.
 */
export function checkFeatureColumns(
  columns: number,
  options: string,
  samples?: number,
  limit?: number,
): void {
  if (columns > FEATURE_COLUMN_BUDGET) {
    throw new UserError(
      `${options} make ${columns} feature columns a sample, above the limit of ${FEATURE_COLUMN_BUDGET}; use fewer layers or grid points`,
    );
  }
  if (samples === undefined) return;
  checkMemory(
    samples * columns * 8 * FEATURE_MATRIX_COPIES,
    `a feature matrix of ${samples} samples × ${columns} columns (${FEATURE_MATRIX_COPIES} copies of float64)`,
    'use fewer layers or grid points',
    limit,
  );
}

/** Refuses a `landform landscape` run that would produce more than LANDSCAPE_VALUE_BUDGET values. */
export function checkLandscapeValues(samples: number, depth: number, gridPoints: number): void {
  const values = samples * depth * gridPoints;
  if (values > LANDSCAPE_VALUE_BUDGET) {
    throw new UserError(
      `${samples} sample${samples === 1 ? '' : 's'} × ${depth} layers × ${gridPoints} grid points make ${values} values, above the limit of ${LANDSCAPE_VALUE_BUDGET}; use a coarser --grid, a smaller --depth or one --sample`,
    );
  }
}
