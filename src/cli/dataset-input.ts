import type { Dataset, SampleKind } from '../io/dataset.js';
import { startProgress } from './progress.js';

/**
 * Loads a command's input dataset with a progress bar on a terminal (silent in pipes, in CI and with
 * --quiet). `kind` is the raw `--kind` text, checked here.
 */
export async function loadInput(
  path: string,
  options: { kind?: string; shape?: string; quiet?: boolean; label?: string },
): Promise<Dataset> {
  const { loadDataset, parseKind, parseShape } = await import('../io/load.js');
  const kind: SampleKind | undefined = options.kind === undefined ? undefined : parseKind(options.kind);
  const shape = options.shape === undefined ? undefined : parseShape(options.shape);
  const progress = await startProgress(options.label ?? 'loading', 1, options.quiet === true);
  try {
    return await loadDataset(path, {
      kind,
      ...(shape !== undefined ? { shape } : {}),
      onProgress: (done, total) => progress.update(done, total),
    });
  } finally {
    progress.stop();
  }
}
