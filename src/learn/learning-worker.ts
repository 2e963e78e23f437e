import { parentPort } from 'node:worker_threads';
import { isUserError } from '../core/errors.js';
import type { FeatureData } from '../features/combined.js';
import {
  defaultModelFactory,
  type FoldOutcome,
  fitUnit,
  type StudyContext,
  type StudySpec,
  type StudyUnit,
  selectUnit,
  withCandidates,
  withFixed,
} from './evaluate.js';
import type { Selection } from './select.js';

/**
 * Worker thread body of `learningWorkers` (parallel.ts). The first message is the study (samples, diagrams,
 * folds, options: a `StudySpec`); each later one is a unit of a phase. The worker answers `{ready: true}`
 * once the study is loaded, then one reply per unit, in any order (the pool puts them back in unit order).
 */
export type LearningTask =
  | { spec: StudySpec }
  | { index: number; phase: 'select'; unit: StudyUnit }
  | { index: number; phase: 'fit'; unit: StudyUnit; selection: Selection };

export type LearningReply =
  | { ready: true }
  | { index: number; ok: true; selection?: Selection; outcome?: FoldOutcome }
  | {
      index: number;
      ok: false;
      user: boolean;
      message: string;
      file?: string;
      line?: number;
      stack?: string;
    };

async function contextOf(spec: StudySpec): Promise<StudyContext> {
  const data: FeatureData = {
    samples: spec.samples,
    ...(spec.diagrams ? { diagrams: spec.diagrams } : {}),
    ...(spec.columns ? { columns: spec.columns } : {}),
  };
  const { samples: _s, diagrams: _d, columns: _c, modelCandidates, fixed, ...rest } = spec;
  return {
    ...rest,
    data,
    factory: withFixed(withCandidates(await defaultModelFactory(), modelCandidates), fixed),
  };
}

const port = parentPort;
if (port) {
  let context: Promise<StudyContext> | undefined;
  // Units run one after another in this thread, in the order they arrive.
  let queue: Promise<void> = Promise.resolve();
  port.on('message', (task: LearningTask) => {
    if ('spec' in task) {
      context = contextOf(task.spec);
      context.then(
        () => port.postMessage({ ready: true } satisfies LearningReply),
        (error: unknown) => port.postMessage(failure(-1, error)),
      );
      return;
    }
    queue = queue.then(async () => {
      try {
        const c = await (context as Promise<StudyContext>);
        if (task.phase === 'select') {
          const selection = await selectUnit(c, task.unit);
          port.postMessage({ index: task.index, ok: true, selection } satisfies LearningReply);
        } else {
          const outcome = await fitUnit(c, task.unit, task.selection);
          port.postMessage({ index: task.index, ok: true, outcome } satisfies LearningReply);
        }
      } catch (error) {
        port.postMessage(failure(task.index, error));
      }
    });
  });
}

function failure(index: number, error: unknown): LearningReply {
  const e = error instanceof Error ? error : new Error(String(error));
  return {
    index,
    ok: false,
    user: isUserError(error),
    message: e.message,
    ...(isUserError(error) && error.file !== undefined ? { file: error.file } : {}),
    ...(isUserError(error) && error.line !== undefined ? { line: error.line } : {}),
    ...(e.stack ? { stack: e.stack } : {}),
  };
}
