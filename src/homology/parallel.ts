import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { isUserError, UserError } from '../core/errors.js';
import type { Sample } from '../io/dataset.js';
import { computeDiagrams, type DiagramOptions } from './compute.js';
import type { DiagramSet } from './diagram.js';
import type { WorkerReply, WorkerTask } from './worker.js';

export interface ParallelRun {
  /**
   * Threads computing samples (default: every core): the calling thread and workers − 1 worker threads.
   * 1 computes in the calling thread alone.
   */
  workers?: number;
  onProgress?: (done: number, total: number) => void;
}

/**
 * The diagrams of many samples on worker threads, in the order of `samples`. Each thread takes the next
 * sample as soon as it is free; every started worker keeps two samples in hand, so that it never waits for
 * the calling thread, which computes samples too (one per turn of its event loop, so that the workers' replies
 * are handled between them): with two cores, the second thread is one worker, and no thread waits for a
 * worker to start. A user mistake in any sample stops the run with that sample's message.
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
        if (failed || next >= total) return;
        const task: WorkerTask = { index: next, sample: samples[next], options };
        next++;
        w.postMessage(task);
      };
      const local = (): void => {
        if (failed || next >= total) return;
        const index = next++;
        try {
          results[index] = computeDiagrams(samples[index], options);
        } catch (error) {
          failed = true;
          reject(sampleError(samples[index].id, error));
          return;
        }
        done++;
        run.onProgress?.(done, total);
        if (done === total) resolve();
        else setImmediate(local);
      };
      for (let k = 0; k < workerCount - 1; k++) {
        const w = spawn();
        workers.push(w);
        let started = false;
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
          // The first reply shows the worker has started: from then on it holds a second sample.
          if (!started) {
            started = true;
            feed(w);
          }
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
      setImmediate(local);
    });
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return results as DiagramSet[];
}

/** A sample's error from the calling thread, worded as a worker's reply would be. */
function sampleError(id: string, error: unknown): Error {
  const where = `sample '${id}'`;
  if (isUserError(error)) {
    const message = error.message.startsWith('sample ') ? error.message : `${where}: ${error.message}`;
    return new UserError(message, { file: error.file, line: error.line });
  }
  const e = error instanceof Error ? error : new Error(String(error));
  const wrapped = new Error(`${where}: ${e.message}`);
  wrapped.stack = e.stack;
  return wrapped;
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
