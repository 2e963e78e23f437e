import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { UserError } from '../core/errors.js';
import type { Sample } from '../io/dataset.js';
import { computeDiagrams, type DiagramOptions } from './compute.js';
import type { DiagramSet } from './diagram.js';
import type { WorkerReply, WorkerTask } from './worker.js';

export interface ParallelRun {
  /** Worker threads (default: every core). 1 computes in the calling thread. */
  workers?: number;
  onProgress?: (done: number, total: number) => void;
}

/**
 * The diagrams of many samples on worker threads, in the order of `samples`. Each worker takes the next
 * sample as soon as it is free. A user mistake in any sample stops the run with that sample's message.
 * The compiled worker is worker.js beside this file; from TypeScript sources (tests, tsx) the worker runs
 * worker.ts through tsx.
 */
export async function computeDiagramsParallel(
  samples: Sample[],
  options: DiagramOptions,
  run: ParallelRun = {},
): Promise<DiagramSet[]> {
  const total = samples.length;
  const wanted = Math.max(1, Math.floor(run.workers ?? availableParallelism()));
  const workerCount = Math.min(wanted, total);
  if (workerCount <= 1) {
    const out: DiagramSet[] = [];
    for (let i = 0; i < total; i++) {
      out.push(computeDiagrams(samples[i], options));
      run.onProgress?.(i + 1, total);
    }
    return out;
  }
  const spawn = workerFactory();
  const results: Array<DiagramSet | undefined> = new Array(total);
  const workers: Worker[] = [];
  try {
    await new Promise<void>((resolve, reject) => {
      let next = 0;
      let done = 0;
      let failed = false;
      const feed = (w: Worker): void => {
        if (next >= total) return;
        const task: WorkerTask = { index: next, sample: samples[next], options };
        next++;
        w.postMessage(task);
      };
      for (let k = 0; k < workerCount; k++) {
        const w = spawn();
        workers.push(w);
        w.on('message', (reply: WorkerReply) => {
          if (failed) return;
          if (!reply.ok) {
            failed = true;
            const where = `sample '${samples[reply.index].id}'`;
            if (reply.user) {
              const message = reply.message.startsWith('sample ')
                ? reply.message
                : `${where}: ${reply.message}`;
              reject(new UserError(message, { file: reply.file, line: reply.line }));
            } else {
              const e = new Error(`${where}: ${reply.message}`);
              e.stack = reply.stack;
              reject(e);
            }
            return;
          }
          results[reply.index] = reply.set;
          done++;
          run.onProgress?.(done, total);
          if (done === total) resolve();
          else feed(w);
        });
        w.on('error', (error) => {
          if (!failed) {
            failed = true;
            reject(error);
          }
        });
        w.on('exit', (code) => {
          if (!failed && done < total && code !== 0) {
            failed = true;
            reject(new Error(`a diagram worker stopped with code ${code}`));
          }
        });
        feed(w);
      }
    });
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return results as DiagramSet[];
}

/**
 * How to start one worker: the compiled worker.js directly, or — when this module runs from its TypeScript
 * source — a small bootstrap that registers tsx in the worker before importing worker.ts.
 */
function workerFactory(): () => Worker {
  if (!import.meta.url.endsWith('.ts')) {
    const script = new URL('./worker.js', import.meta.url);
    return () => new Worker(script);
  }
  const tsxRoot = dirname(createRequire(import.meta.url).resolve('tsx/package.json'));
  const api = pathToFileURL(join(tsxRoot, 'dist/esm/api/index.mjs')).href;
  const script = new URL('./worker.ts', import.meta.url).href;
  const boot = `import(${JSON.stringify(api)}).then((m) => { m.register(); return import(${JSON.stringify(script)}); });`;
  return () => new Worker(boot, { eval: true });
}
