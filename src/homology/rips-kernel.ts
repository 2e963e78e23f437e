import { setFlagsFromString } from 'node:v8';
import type { Diagram } from '../core/diagram.js';
import type { Metric } from './metric.js';
import { RIPS_KERNEL_BASE64 } from './rips-kernel-bytes.js';

/**
 * The WebAssembly engine of Vietoris–Rips persistence in degrees 0–2 (wasm/rips-low.ts, the same algorithm
 * as ripsPersistence's TypeScript engine — for degree 2 with the edge collapse — pair for pair and in the
 * same order).
 *
 * Why a second engine: a thread's JavaScript engine compiles hot code for itself, so every worker thread
 * spent ~0.35 s compiling and ran its first samples slowly, which kept two threads on two cores well short of
 * twice one thread (README, performance). A WebAssembly module compiled once is shared by all threads of the
 * process: workers get the module from the thread that started them (`kernelModule`, `adoptKernelModule`).
 */
interface KernelExports {
  memory: { buffer: ArrayBuffer };
  prepare(n: number): number;
  vertexValues(): number;
  compute(n: number, hasVertexValues: number, maxScale: number, maxDegree: number): number;
  preparePoints(n: number, dim: number): number;
  computePoints(n: number, dim: number, metric: number, maxScale: number, maxDegree: number): number;
  pairCount(degree: number): number;
  birthsOf(degree: number): number;
  deathsOf(degree: number): number;
}

/** A compiled WebAssembly module (opaque here; it can be posted to worker threads). */
export type KernelModule = object;

/** The two constructors used, typed here: the project's TypeScript library settings do not declare them. */
interface WebAssemblyApi {
  Module: new (bytes: Uint8Array) => KernelModule;
  Instance: new (module: KernelModule, imports: object) => { exports: unknown };
  RuntimeError: new () => Error;
}
const wasm = (globalThis as unknown as { WebAssembly: WebAssemblyApi }).WebAssembly;

let compiled: KernelModule | undefined;
let kernel: KernelExports | undefined;

/** The compiled kernel module of this process (compiled on first use). */
export function kernelModule(): KernelModule {
  if (compiled === undefined) {
    // Compiled with the optimising compiler at once. With the engine's default (a quick compile first, hot
    // functions optimised later, counted per thread) a second thread ran 30% slower than the first: two
    // threads gave 1.5–1.6× one instead of 1.9–2.0× (measured on 200 clouds of 300 points). The setting is
    // read when a module is compiled, so it is put back at once for any other module of the process.
    setFlagsFromString('--no-wasm-dynamic-tiering');
    try {
      compiled = new wasm.Module(Buffer.from(RIPS_KERNEL_BASE64, 'base64'));
    } finally {
      setFlagsFromString('--wasm-dynamic-tiering');
    }
  }
  return compiled;
}

/** Uses a module compiled by another thread (its compiled code is shared, not compiled again). */
export function adoptKernelModule(module: KernelModule): void {
  if (compiled === undefined) compiled = module;
}

function instance(): KernelExports {
  kernel ??= new wasm.Instance(kernelModule(), {}).exports as unknown as KernelExports;
  return kernel;
}

/**
 * Whether the kernel takes a cloud of n points: its working memory (about 4n² + 80 bytes per edge, and for
 * degree 2 one bit per triangle and 4n² more) must stay well inside the 4 GiB a 32-bit WebAssembly memory can
 * address. Larger clouds run on the TypeScript engine.
 */
export function kernelFits(n: number, maxDegree = 1): boolean {
  const edges = (n * (n - 1)) / 2;
  // Degree 2: the collapse's passes each list the edges again (about 130 bytes an edge in all), the tables
  // are copied to 16 bits, and cleared triangles take a bit each.
  const more = maxDegree >= 2 ? 130 * edges + 4 * n * n + (n * (n - 1) * (n - 2)) / 6 / 8 : 0;
  return 4 * n * n + 80 * edges + more <= 2 ** 31;
}

/**
 * Degrees 0..maxDegree of the flag filtration with these condensed edge values (degree 2 always with the
 * edge collapse); undefined when an edge value is not a number ≥ 0 (the caller's own checks word that error).
 */
export function kernelRips(
  n: number,
  edgeValues: Float64Array,
  maxDegree: 0 | 1 | 2,
  maxScale: number,
  vertexValues: Float64Array | undefined,
): Diagram[] | undefined {
  const k = instance();
  return trapped(() => {
    const at = k.prepare(n);
    new Float64Array(k.memory.buffer, at, edgeValues.length).set(edgeValues);
    if (vertexValues !== undefined) new Float64Array(k.memory.buffer, k.vertexValues(), n).set(vertexValues);
    if (k.compute(n, vertexValues === undefined ? 0 : 1, maxScale, maxDegree) !== 0) return undefined;
    return results(k, maxDegree);
  });
}

/**
 * Runs `work` on the kernel; when the kernel traps — its memory could not grow (beyond 4 GiB, or the
 * system refused) — drops the instance and returns undefined, so that the TypeScript engine takes the sample.
 */
function trapped(work: () => Diagram[] | undefined): Diagram[] | undefined {
  try {
    return work();
  } catch (error) {
    if (!(error instanceof wasm.RuntimeError)) throw error;
    kernel = undefined;
    return undefined;
  }
}

const METRIC_CODES: Record<Metric, number> = { euclidean: 0, manhattan: 1, chebyshev: 2 };

/**
 * kernelRips of a point cloud (row-major coordinates, finite), its distances computed in the kernel as
 * pairwiseDistances computes them (the same doubles); undefined when the kernel does not take the cloud.
 */
export function kernelCloudRips(
  coords: Float64Array,
  n: number,
  dim: number,
  metric: Metric,
  maxDegree: 0 | 1,
  maxScale: number,
): Diagram[] | undefined {
  if (!kernelFits(n) || coords.length !== n * dim) return undefined;
  const k = instance();
  return trapped(() => {
    const at = k.preparePoints(n, dim);
    new Float64Array(k.memory.buffer, at, coords.length).set(coords);
    if (k.computePoints(n, dim, METRIC_CODES[metric], maxScale, maxDegree) !== 0) return undefined;
    return results(k, maxDegree);
  });
}

/**
 * A WebAssembly memory only grows: after a cloud that needed over 128 MB the instance is dropped (the next
 * sample gets a new one from the same compiled module, in about a millisecond), so that its memory is given
 * back.
 */
const KEEP_BYTES = 128 * 2 ** 20;

function results(k: KernelExports, maxDegree: 0 | 1 | 2): Diagram[] {
  if (k.memory.buffer.byteLength > KEEP_BYTES) kernel = undefined;
  const diagrams: Diagram[] = [];
  for (let degree = 0; degree <= maxDegree; degree++) {
    const count = k.pairCount(degree);
    // Views of the memory as it is now (computing may have grown it), copied out.
    const buffer = k.memory.buffer;
    diagrams.push({
      degree,
      births: new Float64Array(buffer, k.birthsOf(degree), count).slice(),
      deaths: new Float64Array(buffer, k.deathsOf(degree), count).slice(),
    });
  }
  return diagrams;
}

/** Bytes of memory the kernel instance of this thread holds (0 when there is none). */
export function kernelMemoryBytes(): number {
  return kernel === undefined ? 0 : kernel.memory.buffer.byteLength;
}

/**
 * Runs the kernel once on a small fixed cloud and drops the answer: a worker thread does this while it
 * starts, so that its first sample does not pay for the first touch of the kernel's memory and the first
 * compile of its functions (about 20 ms for the first cloud of 300 points against 3.5 ms later, measured).
 * The compiled functions are shared, so the thread that started the worker gains too.
 */
export function warmKernel(): void {
  const n = 160;
  const coords = new Float64Array(3 * n);
  let state = 12345;
  for (let i = 0; i < coords.length; i++) {
    state = (Math.imul(state, 1103515245) + 12345) >>> 0;
    coords[i] = state / 2 ** 32;
  }
  kernelCloudRips(coords, n, 3, 'euclidean', 1, Infinity);
}
