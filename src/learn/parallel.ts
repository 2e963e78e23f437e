import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { UserError } from '../core/errors.js';
import {
  type FoldOutcome,
  fitUnit,
  type StudyContext,
  selectUnit,
  serialUnitRunner,
  studySpec,
  type UnitRunner,
} from './evaluate.js';
import type { LearningReply, LearningTask } from './learning-worker.js';
import type { Selection } from './select.js';

/**
 * The units of a study on worker threads. `workers` threads in all: the calling thread runs units too (one
 * per turn of its event loop, so the workers' replies are handled in between) and `workers − 1` worker
 * threads each hold two units at a time, so none waits for the calling thread. Each worker is sent the
 * study once (samples, diagrams, folds, options), loads the models stage itself, and answers per unit;
 * results go back in unit order. Every unit's seeds come from its coordinates, so the result is the same as
 * the serial runner's whatever thread runs which unit. The workers live for one study (both phases) and
 * are terminated after it, or at the first error (a user mistake keeps its one-line message).
 */
export function learningWorkers(
  options: { workers?: number } = {},
): UnitRunner & { stats: { local: number; remote: number } } {
  const stats = { local: 0, remote: 0 };
  const wanted = Math.max(1, Math.floor(options.workers ?? availableParallelism()));
  let pool: Promise<Worker[]> | undefined;
  const close = async () => {
    if (!pool) return;
    const workers = await pool.catch(() => [] as Worker[]);
    pool = undefined;
    await Promise.all(workers.map((w) => w.terminate()));
  };
  const start = (context: StudyContext, count: number): Promise<Worker[]> | undefined => {
    const spec = studySpec(context);
    if (!spec || count < 1) return undefined;
    if (!pool) {
      const make = workerFactory();
      pool = Promise.all(
        Array.from({ length: count }, () => {
          const w = make();
          return new Promise<Worker>((resolve, reject) => {
            const onMessage = (reply: LearningReply) => {
              w.off('error', reject);
              w.off('message', onMessage);
              if ('ready' in reply) resolve(w);
              else if (!reply.ok) reject(replyError(reply));
            };
            w.on('message', onMessage);
            w.once('error', reject);
            w.postMessage({ spec } satisfies LearningTask);
          });
        }),
      );
    }
    return pool;
  };
  return {
    stats,
    async select(context, units, tick) {
      try {
        const workers = start(context, Math.min(wanted, units.length) - 1);
        if (!workers) return await serialUnitRunner.select(context, units, tick);
        return await spread(
          await workers,
          units.length,
          (i) => ({ index: i, phase: 'select', unit: units[i] }),
          (i) => selectUnit(context, units[i]),
          (reply) => reply.selection as Selection,
          tick,
          stats,
        );
      } catch (error) {
        await close();
        throw error;
      }
    },
    async fit(context, units, selections, tick) {
      try {
        const workers = start(context, Math.min(wanted, units.length) - 1);
        if (!workers) return await serialUnitRunner.fit(context, units, selections, tick);
        return await spread(
          await workers,
          units.length,
          (i) => ({ index: i, phase: 'fit', unit: units[i], selection: selections[i] }),
          (i) => fitUnit(context, units[i], selections[i]),
          (reply) => reply.outcome as FoldOutcome,
          tick,
          stats,
        );
      } finally {
        await close();
      }
    },
  };
}

/** Runs tasks 0..count−1 on the workers (two in hand each) and the calling thread; results in task order. */
function spread<T>(
  workers: Worker[],
  count: number,
  task: (i: number) => LearningTask,
  local: (i: number) => Promise<T>,
  value: (reply: Extract<LearningReply, { ok: true }>) => T,
  tick: () => void,
  stats: { local: number; remote: number },
): Promise<T[]> {
  const results: T[] = new Array(count);
  let next = 0;
  let done = 0;
  let failed = false;
  return new Promise<T[]>((resolve, reject) => {
    const fail = (error: unknown) => {
      if (failed) return;
      failed = true;
      for (const w of workers) w.off('message', handlers.get(w) as (r: LearningReply) => void);
      reject(error);
    };
    const finished = () => {
      done++;
      tick();
      if (done === count) {
        for (const w of workers) w.off('message', handlers.get(w) as (r: LearningReply) => void);
        resolve(results);
      }
    };
    const feed = (w: Worker) => {
      if (failed || next >= count) return;
      w.postMessage(task(next++));
    };
    const handlers = new Map<Worker, (reply: LearningReply) => void>();
    for (const w of workers) {
      const handler = (reply: LearningReply) => {
        if (failed || 'ready' in reply) return;
        if (!reply.ok) return fail(replyError(reply));
        results[reply.index] = value(reply);
        stats.remote++;
        finished();
        feed(w);
      };
      handlers.set(w, handler);
      w.on('message', handler);
      w.once('error', fail);
      feed(w);
      feed(w);
    }
    const runLocal = async () => {
      while (!failed && next < count) {
        const i = next++;
        results[i] = await local(i);
        stats.local++;
        finished();
        // Let the workers' replies in before the next unit here.
        await new Promise((r) => setImmediate(r));
      }
    };
    runLocal().catch(fail);
  });
}

function replyError(reply: Extract<LearningReply, { ok: false }>): Error {
  if (reply.user) return new UserError(reply.message, { file: reply.file, line: reply.line });
  const e = new Error(`learning worker: ${reply.message}`);
  if (reply.stack) e.stack = reply.stack;
  return e;
}

/** The compiled learning-worker.js, or — from TypeScript sources — a bootstrap registering tsx first. */
function workerFactory(): () => Worker {
  if (!import.meta.url.endsWith('.ts')) {
    const script = new URL('./learning-worker.js', import.meta.url);
    return () => new Worker(script);
  }
  const tsxRoot = dirname(createRequire(import.meta.url).resolve('tsx/package.json'));
  const api = pathToFileURL(join(tsxRoot, 'dist/esm/api/index.mjs')).href;
  const script = new URL('./learning-worker.ts', import.meta.url).href;
  const boot = `import(${JSON.stringify(api)}).then((m) => { m.register(); return import(${JSON.stringify(script)}); });`;
  return () => new Worker(boot, { eval: true });
}
