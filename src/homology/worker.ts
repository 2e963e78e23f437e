import { parentPort } from 'node:worker_threads';
import { isUserError } from '../core/errors.js';
import type { Sample } from '../io/dataset.js';
import { computeDiagrams, type DiagramOptions } from './compute.js';

/** Worker thread body for computeDiagramsParallel: one message = one sample to compute. */
export interface WorkerTask {
  index: number;
  sample: Sample;
  options: DiagramOptions;
}

export type WorkerReply =
  | { index: number; ok: true; set: ReturnType<typeof computeDiagrams> }
  | {
      index: number;
      ok: false;
      user: boolean;
      message: string;
      file?: string;
      line?: number;
      stack?: string;
    };

const port = parentPort;
if (port) {
  port.on('message', (task: WorkerTask) => {
    try {
      const set = computeDiagrams(task.sample, task.options);
      const transfer: ArrayBuffer[] = [];
      for (const d of set.diagrams) {
        if (d.births.buffer !== d.deaths.buffer)
          transfer.push(d.births.buffer as ArrayBuffer, d.deaths.buffer as ArrayBuffer);
      }
      const reply: WorkerReply = { index: task.index, ok: true, set };
      port.postMessage(reply, task.sample.kind === 'diagrams' ? [] : transfer);
    } catch (error) {
      const e = error instanceof Error ? error : new Error(String(error));
      const reply: WorkerReply = {
        index: task.index,
        ok: false,
        user: isUserError(error),
        message: e.message,
        file: isUserError(error) ? error.file : undefined,
        line: isUserError(error) ? error.line : undefined,
        stack: e.stack,
      };
      port.postMessage(reply);
    }
  });
}
