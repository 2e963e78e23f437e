import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';

/**
 * Loads TensorFlow.js for the dense network, once per process, only when a dense model is used.
 *
 * Order of preference:
 * 1. `@tensorflow/tfjs-node` (native TensorFlow), used only if its import succeeds (it is optional and not
 *    installed by default);
 * 2. `@tensorflow/tfjs` on the WebAssembly backend (`@tensorflow/tfjs-backend-wasm`, about 5× the pure
 *    JavaScript backend for our small networks; single-threaded in Node). Its .wasm files are read from
 *    node_modules through `setWasmPaths` with a file path (no network);
 * 3. the pure JavaScript `cpu` backend, if `setBackend('wasm')` fails — `note` then says so.
 * Results are deterministic for a seed on one backend; different backends may differ in the last digits.
 */
export type Tf = typeof import('@tensorflow/tfjs');

export interface TfRuntime {
  tf: Tf;
  /** The backend in use: 'tensorflow', 'wasm' or 'cpu'. */
  backend: string;
  /** Set when the preferred backend could not be used. */
  note: string | undefined;
}

let loading: Promise<TfRuntime> | undefined;

/** The Node greeting that recommends the native backend, printed when tfjs runs on cpu in Node. */
const GREETING = /running TensorFlow\.js in Node\.js/;

function quiet(original: (...args: unknown[]) => void): (...args: unknown[]) => void {
  return (...args: unknown[]): void => {
    if (typeof args[0] === 'string' && GREETING.test(args[0])) return;
    original.apply(console, args);
  };
}

/** Runs one tiny op, so that a backend's first-use greeting is printed now, inside the filter. */
function touch(tf: Tf): void {
  tf.tidy(() => tf.scalar(0).dataSync());
}

export function loadTf(): Promise<TfRuntime> {
  if (!loading) loading = load();
  return loading;
}

/** Switches backend (the benchmark compares wasm with cpu); returns whether it worked. */
export async function useBackend(name: 'wasm' | 'cpu' | 'tensorflow'): Promise<boolean> {
  const runtime = await loadTf();
  const originalWarn = console.warn;
  const originalLog = console.log;
  console.warn = quiet(originalWarn);
  console.log = quiet(originalLog);
  try {
    const ok = await runtime.tf.setBackend(name);
    if (ok) {
      runtime.backend = name;
      touch(runtime.tf);
    }
    return ok;
  } finally {
    console.warn = originalWarn;
    console.log = originalLog;
  }
}

async function load(): Promise<TfRuntime> {
  const originalWarn = console.warn;
  const originalLog = console.log;
  console.warn = quiet(originalWarn);
  console.log = quiet(originalLog);
  try {
    const nativeName = '@tensorflow/tfjs-node';
    try {
      await import(nativeName);
      const tf = (await import('@tensorflow/tfjs')) as Tf;
      if (await tf.setBackend('tensorflow')) return { tf, backend: 'tensorflow', note: undefined };
    } catch {
      // Not installed (the usual case): use WebAssembly.
    }
    const tf = (await import('@tensorflow/tfjs')) as Tf;
    let note: string | undefined;
    try {
      const wasm = await import('@tensorflow/tfjs-backend-wasm');
      const require = createRequire(import.meta.url);
      const folder = join(dirname(require.resolve('@tensorflow/tfjs-backend-wasm/package.json')), 'dist');
      wasm.setWasmPaths(`${folder}/`);
      if (await tf.setBackend('wasm')) return { tf, backend: 'wasm', note: undefined };
      note = 'the WebAssembly backend of TensorFlow.js did not start; using the slower JavaScript backend';
    } catch (error) {
      note = `the WebAssembly backend of TensorFlow.js could not be loaded (${(error as Error).message}); using the slower JavaScript backend`;
    }
    await tf.setBackend('cpu');
    await tf.ready();
    touch(tf);
    return { tf, backend: 'cpu', note };
  } finally {
    console.warn = originalWarn;
    console.log = originalLog;
  }
}
