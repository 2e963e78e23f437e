import type { Dataset, SampleKind } from '../core/sample.js';
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
      ...noteOption(options.quiet === true),
    });
  } finally {
    progress.stop();
  }
}

/** Loader notes as one stderr line each (`landform: note: …`), or nothing with --quiet. */
export function noteOption(quiet: boolean): { onNote?: (message: string) => void } {
  if (quiet) return {};
  return { onNote: (message) => process.stderr.write(`landform: ${message.replace(/\r?\n/g, ' ')}\n`) };
}
