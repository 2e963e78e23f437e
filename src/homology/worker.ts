import { parentPort, workerData } from 'node:worker_threads';
import { isUserError } from '../core/errors.js';
import type { Sample } from '../core/sample.js';
import { computeDiagrams, type DiagramOptions } from './compute.js';
import { adoptKernelModule, type KernelModule, warmKernel } from './rips-kernel.js';

/** What a worker is started with: the process's compiled Rips kernel (see rips-kernel.ts). */
export interface WorkerStart {
  ripsKernel: KernelModule;
}

/** Worker thread body for computeDiagramsParallel: one message = one sample to compute; says 'ready' once loaded. */
export interface WorkerTask {
  index: number;
  sample: Sample;
  options: DiagramOptions;
}

export type WorkerReply =
  | { ready: true }
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
  const start = workerData as WorkerStart | undefined;
  if (start?.ripsKernel !== undefined) adoptKernelModule(start.ripsKernel);
  warmKernel();
  // Modules loaded: the pool may now hand this thread two samples at once (see parallel.ts).
  port.postMessage({ ready: true } satisfies WorkerReply);
  port.on('message', (task: WorkerTask) => {
    try {
      const set = computeDiagrams(task.sample, task.options);
      const reply: WorkerReply = { index: task.index, ok: true, set };
      // Copied, not transferred: diagrams are small, and with transferred buffers 200 clouds of 300 points
      // took 15–30% longer on 2 workers (most likely because a detached buffer makes the engine's compiled
      // typed-array loops in this thread guard every access from then on).
      port.postMessage(reply);
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
