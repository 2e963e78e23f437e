import { createRequire } from 'node:module';

/**
 * Lazy loader for libsvm-js, the libsvm library compiled to WebAssembly. We load the `wasm` build (not the
 * `asm` one): it trains several times faster here and its module is small. Loading it in Node prints a
 * "streaming compile failed … falling back to ArrayBuffer instantiation" notice (Node's fetch cannot read a
 * file path) and installs a process-wide `unhandledRejection` handler that exits the process; we silence
 * exactly that notice (every other message still reaches the console) and remove that handler.
 *
 * Only this file touches libsvm-js, and only inside `loadLibsvm`, on first use.
 */

/** The part of libsvm-js's SVM class that we use. */
export interface LibsvmInstance {
  train(samples: ArrayLike<number>[], labels: ArrayLike<number>): void;
  predictOne(sample: ArrayLike<number>): number;
  serializeModel(): string;
  getSVIndices(): number[];
  getLabels(): number[];
  free(): void;
}

export interface LibsvmOptions {
  type: string;
  kernel: string;
  cost: number;
  gamma?: number;
  tolerance?: number;
  cacheSize?: number;
  shrinking?: boolean;
  probabilityEstimates?: boolean;
  quiet?: boolean;
}

/** The emscripten module's views of WebAssembly memory (re-read on every use: they change when memory grows). */
export interface LibsvmHeap {
  HEAP32: Int32Array;
  HEAPF64: Float64Array;
}

export interface LibsvmClass {
  new (options: LibsvmOptions): LibsvmInstance;
  SVM_TYPES: { C_SVC: string };
  KERNEL_TYPES: { LINEAR: string; RBF: string };
}

let loading: Promise<LibsvmClass> | undefined;
let heap: LibsvmHeap | undefined;

/** The memory of the loaded libsvm module (after `loadLibsvm` has resolved). */
export function libsvmHeap(): LibsvmHeap | undefined {
  return heap;
}

const NOTICE = /^(wasm streaming compile failed|falling back to ArrayBuffer instantiation)/;

export function loadLibsvm(): Promise<LibsvmClass> {
  if (!loading) loading = load();
  return loading;
}

async function load(): Promise<LibsvmClass> {
  const originalWarn = console.warn;
  const before = new Set(process.listeners('unhandledRejection'));
  // The module binds console.warn once, while it is being evaluated: bind it to this filter.
  console.warn = (...args: unknown[]): void => {
    if (typeof args[0] === 'string' && NOTICE.test(args[0])) return;
    originalWarn.apply(console, args);
  };
  const dropExitHandler = (): void => {
    for (const listener of process.listeners('unhandledRejection')) {
      if (!before.has(listener)) process.removeListener('unhandledRejection', listener);
    }
  };
  try {
    // Loaded with a local require, lazily, inside this function: the module object is a "thenable" (it
    // has a `then` method), and a dynamic import that resolves with it can spin forever in some module
    // runners (the test runner's among them). A plain require never treats it as a promise.
    const require = createRequire(import.meta.url);
    const wasmModule = require('libsvm-js/out/wasm/libsvm.js') as { load(): Promise<unknown> };
    // At once, before any promise of the module can settle: its handler would end the whole process.
    dropExitHandler();
    const loader = require('libsvm-js/src/loadSVM.js') as (module: unknown) => LibsvmClass;
    await wasmModule.load();
    heap = wasmModule as unknown as LibsvmHeap;
    return loader(wasmModule);
  } finally {
    console.warn = originalWarn;
    dropExitHandler();
  }
}
