import type { DiagramSet } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { Dataset, SampleKind } from '../core/sample.js';
import { type ProgressMode, startPhases, startProgress } from './progress.js';
import type { ParsedDiagramOptions } from './shared-options.js';

/**
 * Loads a command's input dataset with a progress bar on a terminal (silent in pipes, in CI and with
 * --quiet). `kind` is the raw `--kind` text, checked here.
 */
export async function loadInput(
  path: string,
  options: { kind?: string; shape?: string; quiet?: boolean; label?: string },
): Promise<Dataset> {
  const { loadDataset, parseShape } = await import('../io/load.js');
  const { parseChoiceOption } = await import('./options.js');
  const { SAMPLE_KINDS } = await import('../core/sample.js');
  const kind: SampleKind | undefined =
    options.kind === undefined ? undefined : parseChoiceOption(options.kind, '--kind', SAMPLE_KINDS);
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

/** Loads a dataset with the parsed diagram options' kind and shape; refuses an empty one or --embed on non-signals. */
export async function loadStudyDataset(
  input: string,
  parsed: Pick<ParsedDiagramOptions, 'kind' | 'shape' | 'diagramOptions'>,
  quiet = false,
): Promise<Dataset> {
  const { loadDataset } = await import('../io/load.js');
  const dataset = await loadDataset(input, {
    ...(parsed.kind === undefined ? {} : { kind: parsed.kind }),
    ...(parsed.shape === undefined ? {} : { shape: parsed.shape }),
    ...noteOption(quiet),
  });
  if (dataset.samples.length === 0) throw new UserError('has no samples; nothing to do', { file: input });
  if (parsed.diagramOptions.embed !== undefined && dataset.kind !== 'signal') {
    throw new UserError(`--embed applies to signals, but this is a ${dataset.kind} dataset; drop --embed`, {
      file: input,
    });
  }
  return dataset;
}

/** The diagrams of every sample (a diagrams dataset is used as it is), with a progress bar. */
export async function diagramsForCommand(
  dataset: Dataset,
  parsed: Pick<ParsedDiagramOptions, 'diagramOptions' | 'workers'>,
  quiet: boolean,
  mode: ProgressMode = 'auto',
): Promise<DiagramSet[]> {
  if (dataset.kind === 'diagrams') {
    return dataset.samples.map((s) => ({
      sample: s.id,
      label: s.label,
      diagrams: s.kind === 'diagrams' ? s.diagrams : [],
    }));
  }
  const { computeDiagramsParallel } = await import('../homology/parallel.js');
  const progress = await startPhases(mode, quiet);
  const total = dataset.samples.length;
  progress.update('diagrams', 0, total);
  try {
    return await computeDiagramsParallel(dataset.samples, parsed.diagramOptions, {
      ...(parsed.workers !== undefined ? { workers: parsed.workers } : {}),
      onProgress: (done) => progress.update('diagrams', done, total),
    });
  } finally {
    progress.stop();
  }
}
