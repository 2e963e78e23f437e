import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { DiagramSet } from '../core/diagram.js';
import { isUserError, UserError } from '../core/errors.js';
import type { Sample } from '../core/sample.js';
import { computeDiagrams, type DiagramOptions } from './compute.js';
import { kernelModule } from './rips-kernel.js';
import type { WorkerReply, WorkerStart, WorkerTask } from './worker.js';

export interface ParallelRun {
  /**
   * Threads computing samples (default: every core): the calling thread and workers − 1 worker threads.
   * 1 computes in the calling thread alone.
   */
  workers?: number;
  onProgress?: (done: number, total: number) => void;
}

/**
 * Worker threads outlive a run: a thread's engine compiles the hot loops only after running them for a
 * while (a fresh thread's first 20 clouds of 300 points took 0.3–0.5 s more than warm ones, measured), so a
 * second run in the same process reuses the threads of the first, and a command can start them before it
 * loads its data (`startDiagramWorkers`). Threads not in a run are unreferenced: they never keep the
 * process alive.
 */
interface PooledWorker {
  worker: Worker;
  /** Has sent a message (it says 'ready' once its modules are loaded): it can hold two samples at once. */
  started: boolean;
  /** Settles when the worker has said 'ready' or stopped. */
  ready: Promise<void>;
}

const idle: PooledWorker[] = [];

/**
 * Starts worker threads for later runs in this process so that their start-up (about 0.1 s each) overlaps
 * whatever the calling thread does next — typically loading the dataset. Tops the idle pool up to `count`.
 * The promise settles when every idle worker has loaded its modules (or stopped); callers need not wait.
 */
export function startDiagramWorkers(count: number): Promise<void> {
  if (idle.length < count) {
    const spawn = workerFactory();
    while (idle.length < count) {
      const p = pooled(spawn());
      // Referenced until ready, so that a caller awaiting the promise is not left with an empty event loop.
      p.worker.ref();
      idle.push(p);
    }
  }
  return Promise.all(idle.map((p) => p.ready)).then(() => undefined);
}

/** Terminates the idle worker threads (a later run starts new ones). */
export async function stopDiagramWorkers(): Promise<void> {
  const all = idle.splice(0, idle.length);
  await Promise.all(all.map((p) => p.worker.terminate()));
}

function pooled(worker: Worker): PooledWorker {
  let settle = (): void => {};
  const ready = new Promise<void>((resolve) => {
    settle = resolve;
  });
  const p: PooledWorker = { worker, started: false, ready };
  worker.on('message', (m: WorkerReply) => {
    if ('ready' in m) {
      p.started = true;
      // Still waiting in the pool (not taken by a run): unreferenced again.
      if (idle.includes(p)) worker.unref();
      settle();
    }
  });
  // A worker that stops while idle leaves the pool; during a run the run's own listeners report it.
  worker.on('exit', () => {
    settle();
    const at = idle.indexOf(p);
    if (at >= 0) idle.splice(at, 1);
  });
  worker.on('error', () => {});
  // After the listeners: adding a 'message' listener references the worker again.
  worker.unref();
  return p;
}

/** An idle worker, or a new one. */
function takeWorker(): PooledWorker {
  return idle.shift() ?? pooled(workerFactory()());
}

/**
 * The diagrams of many samples on worker threads (from the pool above), in the order of `samples`. Each
 * thread takes the next sample as soon as it is free; every started worker keeps two samples in hand, so
 * that it never waits for the calling thread, which computes samples too (one per turn of its event loop, so
 * that the workers' replies are handled between them): with two cores, the second thread is one worker, and
 * no thread waits for a worker to start. A user mistake in any sample stops the run with that sample's
 * message.
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
  const results: Array<DiagramSet | undefined> = new Array(total);
  const taken: PooledWorker[] = [];
  const detach: Array<() => void> = [];
  let failed = false;
  try {
    await new Promise<void>((resolve, reject) => {
      let next = 0;
      let done = 0;
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
        const p = takeWorker();
        taken.push(p);
        const w = p.worker;
        w.ref();
        const onMessage = (reply: WorkerReply): void => {
          if (failed) return;
          // Started during this run: from now on it holds a second sample.
          if ('ready' in reply) {
            feed(w);
            return;
          }
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
        };
        const onError = (error: Error): void => {
          if (!failed) {
            failed = true;
            reject(error);
          }
        };
        const onExit = (code: number): void => {
          if (!failed && done < total) {
            failed = true;
            reject(new Error(`a diagram worker stopped with code ${code}`));
          }
        };
        w.on('message', onMessage);
        w.on('error', onError);
        w.on('exit', onExit);
        detach.push(() => {
          w.off('message', onMessage);
          w.off('error', onError);
          w.off('exit', onExit);
        });
        feed(w);
        // A worker already started holds its second sample at once.
        if (p.started) feed(w);
      }
      setImmediate(local);
    });
  } finally {
    for (const d of detach) d();
    if (failed) {
      // Workers may still be computing samples of the failed run: stop them rather than reuse them.
      await Promise.all(taken.map((p) => p.worker.terminate()));
    } else {
      const keep = Math.max(0, availableParallelism() - 1 - idle.length);
      for (const p of taken.slice(0, keep)) {
        p.worker.unref();
        idle.push(p);
      }
      await Promise.all(taken.slice(keep).map((p) => p.worker.terminate()));
    }
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
  // The compiled WebAssembly kernel goes to every worker: its compiled code is shared, not compiled again.
  const workerData: WorkerStart = { ripsKernel: kernelModule() };
  if (!import.meta.url.endsWith('.ts')) {
    const script = new URL('./worker.js', import.meta.url);
    return () => new Worker(script, { workerData });
  }
  const tsxRoot = dirname(createRequire(import.meta.url).resolve('tsx/package.json'));
  const api = pathToFileURL(join(tsxRoot, 'dist/esm/api/index.mjs')).href;
  const script = new URL('./worker.ts', import.meta.url).href;
  const boot = `import(${JSON.stringify(api)}).then((m) => { m.register(); return import(${JSON.stringify(script)}); });`;
  return () => new Worker(boot, { eval: true, workerData });
}
