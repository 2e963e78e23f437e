import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import { Random } from '../core/random.js';
import { decodeFloat64, type EncodedArray, encodeFloat64 } from './binary.js';
import { type LibsvmClass, type LibsvmInstance, libsvmHeap, loadLibsvm } from './libsvm.js';

export type SvmKernel = 'linear' | 'rbf';

/** Hyperparameters of the support vector classifier. */
export interface SvmOptions {
  /** Kernel: 'linear' K(u,v) = u·v, or 'rbf' K(u,v) = exp(−γ‖u−v‖²). Default 'rbf'. */
  kernel?: SvmKernel;
  /** Cost C of the C-SVC. Default 1. */
  C?: number;
  /** γ of the RBF kernel. Default 1 / (number of input features). */
  gamma?: number;
  /** Folds of the internal cross-validation that calibrates probabilities. Default 5. */
  probabilityFolds?: number;
  /** Seed of that internal split. Default 1. */
  seed?: number;
  /** Stopping tolerance of libsvm's solver. Default 0.001. */
  tolerance?: number;
}

/**
 * What `fit` learned: libsvm's one-vs-one C-SVC in our own form. `m` is the number of classes seen in
 * training, in ascending class index; pairs (a, b), a < b, are in libsvm's order (0,1), (0,2), …, (m−2, m−1).
 */
export interface SvmState {
  features: number;
  classCount: number;
  kernel: SvmKernel;
  gamma: number;
  /** Model class position → class index, ascending (length m). */
  labels: Int32Array;
  /** Support vectors of each model class (length m); the support rows are grouped in this order. */
  counts: Int32Array;
  /** nSV × features: the support vectors, copied exactly from the training rows. */
  support: Matrix;
  /** (m − 1) × nSV dual coefficients y·α in libsvm's layout. */
  coef: Float64Array;
  /** One offset per pair: decision(x) = Σ coef·K(sv, x) − rho. */
  rho: Float64Array;
  /** Platt sigmoid per pair: P(a | a or b, x) = 1 / (1 + exp(A·decision + B)). */
  probA: Float64Array;
  probB: Float64Array;
}

export interface SvmJSON {
  kind: 'landform.svm';
  format: 1;
  options: SvmOptions;
  features: number;
  classCount: number;
  kernel: SvmKernel;
  gamma: number;
  labels: number[];
  counts: number[];
  support: EncodedArray;
  coef: EncodedArray;
  rho: number[];
  probA: number[];
  probB: number[];
}

export interface RawModel {
  labels: Int32Array;
  counts: Int32Array;
  support: Matrix;
  coef: Float64Array;
  rho: Float64Array;
}

/** Lowest pairwise probability used in coupling, as in libsvm (Chang & Lin, "LIBSVM: a library for support vector machines", 2011). */
const MIN_PROBABILITY = 1e-7;

/**
 * C-support vector classification with libsvm (through libsvm-js, WebAssembly build), one-vs-one for
 * several classes, with probability estimates.
 *
 * Training runs in libsvm; what it learned (support vectors, dual coefficients, offsets) is read out of
 * the model at once and the native model freed, so nothing native outlives `fit`. Prediction evaluates the
 * same decision functions in TypeScript, so a saved model reloads from our own exact binary form and never
 * passes through libsvm's text deserialiser (which corrupts models of several MB). The learned numbers are
 * read from libsvm's model in WebAssembly memory (see readModelMemory), with the model text as fallback.
 *
 * Probabilities follow libsvm's method, with our own seeded split so that a seed gives one answer in
 * any process: decision values from an internal stratified k-fold cross-validation, one Platt sigmoid per
 * pair fitted by the Newton method of Lin, Lin & Weng ("A note on Platt's probabilistic outputs for support
 * vector machines", 2007), coupled into class probabilities by the second method of Wu, Lin & Weng
 * ("Probability estimates for multi-class classification by pairwise coupling", 2004).
 */
export class SvmModel {
  readonly options: SvmOptions;
  state: SvmState | undefined;

  constructor(options: SvmOptions = {}) {
    const C = options.C ?? 1;
    if (!(C > 0) || !Number.isFinite(C))
      throw new UserError(`SVM cost C must be a positive number, got ${C}`);
    if (options.gamma !== undefined && !(options.gamma > 0))
      throw new UserError(`SVM gamma must be a positive number, got ${options.gamma}`);
    const kernel = options.kernel ?? 'rbf';
    if (kernel !== 'linear' && kernel !== 'rbf')
      throw new UserError(`SVM kernel must be linear or rbf, got ${String(kernel)}`);
    this.options = {
      kernel,
      C,
      ...(options.gamma === undefined ? {} : { gamma: options.gamma }),
      probabilityFolds: options.probabilityFolds ?? 5,
      seed: options.seed ?? 1,
      tolerance: options.tolerance ?? 1e-3,
    };
  }

  async fit(x: Matrix, y: Int32Array, classCount: number): Promise<this> {
    if (x.rows !== y.length) throw new Error(`SvmModel.fit: ${x.rows} rows but ${y.length} labels`);
    if (x.rows < 1) throw new UserError('cannot train an SVM on zero samples: give training samples');
    const Svm = await loadLibsvm();
    const kernel = this.options.kernel ?? 'rbf';
    const gamma = this.options.gamma ?? 1 / Math.max(1, x.cols);
    const all = Int32Array.from({ length: x.rows }, (_, i) => i);
    const raw = trainRaw(Svm, x, y, all, kernel, this.options.C ?? 1, gamma, this.options.tolerance ?? 1e-3);
    const base: SvmState = {
      features: x.cols,
      classCount,
      kernel,
      gamma,
      ...raw,
      probA: new Float64Array(0),
      probB: new Float64Array(0),
    };
    const m = raw.labels.length;
    const pairCount = (m * (m - 1)) / 2;
    const probA = new Float64Array(pairCount);
    const probB = new Float64Array(pairCount);
    if (pairCount > 0) {
      const { decisions, targets } = this.calibrationData(Svm, x, y, base);
      for (let p = 0; p < pairCount; p++) {
        const ab = sigmoidTrain(Float64Array.from(decisions[p]), Int8Array.from(targets[p]));
        probA[p] = ab[0];
        probB[p] = ab[1];
      }
    }
    this.state = { ...base, probA, probB };
    return this;
  }

  /** Class index pairs (a, b) of the one-vs-one decision functions, in the order of `decisionValues` columns. */
  pairs(): Array<[number, number]> {
    const { labels } = this.fitted();
    const out: Array<[number, number]> = [];
    for (let i = 0; i < labels.length; i++)
      for (let j = i + 1; j < labels.length; j++) out.push([labels[i], labels[j]]);
    return out;
  }

  /** Samples × pairs decision values; positive favours the pair's first class. */
  decisionValues(x: Matrix): Matrix {
    const s = this.fitted();
    this.checkWidth(x);
    const m = s.labels.length;
    const pairCount = (m * (m - 1)) / 2;
    const out = new Float64Array(x.rows * pairCount);
    const kv = new Float64Array(s.support.rows);
    const dec = new Float64Array(pairCount);
    for (let i = 0; i < x.rows; i++) {
      decide(s, x.data, i * x.cols, kv, dec);
      out.set(dec, i * pairCount);
    }
    return { rows: x.rows, cols: pairCount, data: out };
  }

  /** Class indices by one-vs-one voting on the decision values (libsvm's rule without probabilities). */
  predictLabels(x: Matrix): Int32Array {
    const s = this.fitted();
    const m = s.labels.length;
    const out = new Int32Array(x.rows);
    if (m === 1) return out.fill(s.labels[0]);
    const d = this.decisionValues(x);
    const votes = new Int32Array(m);
    for (let r = 0; r < x.rows; r++) {
      votes.fill(0);
      let p = 0;
      for (let i = 0; i < m; i++) {
        for (let j = i + 1; j < m; j++) {
          if (d.data[r * d.cols + p] > 0) votes[i]++;
          else votes[j]++;
          p++;
        }
      }
      let best = 0;
      for (let i = 1; i < m; i++) if (votes[i] > votes[best]) best = i;
      out[r] = s.labels[best];
    }
    return out;
  }

  /** Samples × classCount probabilities; a class absent from training gets 0. */
  predictScores(x: Matrix): Matrix {
    const s = this.fitted();
    this.checkWidth(x);
    const m = s.labels.length;
    const out = new Float64Array(x.rows * s.classCount);
    if (m === 1) {
      for (let r = 0; r < x.rows; r++) out[r * s.classCount + s.labels[0]] = 1;
      return { rows: x.rows, cols: s.classCount, data: out };
    }
    const pairCount = (m * (m - 1)) / 2;
    const kv = new Float64Array(s.support.rows);
    const dec = new Float64Array(pairCount);
    const pairwise = new Float64Array(m * m);
    const prob = new Float64Array(m);
    const scratch = new Float64Array(m * m + m);
    for (let r = 0; r < x.rows; r++) {
      decide(s, x.data, r * x.cols, kv, dec);
      let p = 0;
      for (let i = 0; i < m; i++) {
        for (let j = i + 1; j < m; j++) {
          const v = Math.min(
            Math.max(sigmoidPredict(dec[p], s.probA[p], s.probB[p]), MIN_PROBABILITY),
            1 - MIN_PROBABILITY,
          );
          pairwise[i * m + j] = v;
          pairwise[j * m + i] = 1 - v;
          p++;
        }
      }
      coupleProbabilities(m, pairwise, prob, scratch);
      for (let i = 0; i < m; i++) out[r * s.classCount + s.labels[i]] = prob[i];
    }
    return { rows: x.rows, cols: s.classCount, data: out };
  }

  /**
   * For a linear kernel, each pair's decision as w·x + b in the SVM's input space:
   * w = Σ_k coef_k · sv_k over the support vectors of the pair's two classes, b = −rho. Undefined for RBF.
   */
  linearWeights(): { pairs: Array<[number, number]>; weights: Matrix; bias: Float64Array } | undefined {
    const s = this.fitted();
    if (s.kernel !== 'linear') return undefined;
    const m = s.labels.length;
    const d = s.features;
    const nSv = s.support.rows;
    const pairCount = (m * (m - 1)) / 2;
    const w = new Float64Array(pairCount * d);
    const start = starts(s.counts);
    let p = 0;
    for (let i = 0; i < m; i++) {
      for (let j = i + 1; j < m; j++) {
        const base = p * d;
        // Invariant: w[base..base+d) holds Σ coef·sv over the support vectors of classes i and j visited so far.
        for (let k = start[i]; k < start[i + 1]; k++) {
          const c = s.coef[(j - 1) * nSv + k];
          for (let t = 0; t < d; t++) w[base + t] += c * s.support.data[k * d + t];
        }
        for (let k = start[j]; k < start[j + 1]; k++) {
          const c = s.coef[i * nSv + k];
          for (let t = 0; t < d; t++) w[base + t] += c * s.support.data[k * d + t];
        }
        p++;
      }
    }
    return {
      pairs: this.pairs(),
      weights: { rows: pairCount, cols: d, data: w },
      bias: s.rho.map((r) => -r),
    };
  }

  /** Number of support vectors. */
  supportCount(): number {
    return this.fitted().support.rows;
  }

  toJSON(): SvmJSON {
    const s = this.fitted();
    return {
      kind: 'landform.svm',
      format: 1,
      options: { ...this.options },
      features: s.features,
      classCount: s.classCount,
      kernel: s.kernel,
      gamma: s.gamma,
      labels: Array.from(s.labels),
      counts: Array.from(s.counts),
      support: encodeFloat64(s.support.data),
      coef: encodeFloat64(s.coef),
      rho: Array.from(s.rho),
      probA: Array.from(s.probA),
      probB: Array.from(s.probB),
    };
  }

  static fromJSON(json: unknown): SvmModel {
    const j = json as Partial<SvmJSON> | null;
    if (j?.kind !== 'landform.svm')
      throw new UserError(
        'not a saved SVM (kind tag missing or different): save the model again with this version',
      );
    if (j.format !== 1)
      throw new UserError(
        `saved SVM has format ${String(j.format)}, this version reads format 1: save the model again with this version`,
      );
    const model = new SvmModel(j.options ?? {});
    const labels = Int32Array.from(j.labels ?? []);
    const counts = Int32Array.from(j.counts ?? []);
    const m = labels.length;
    const d = j.features ?? 0;
    const support = decodeFloat64(j.support, 'the support vectors');
    const coef = decodeFloat64(j.coef, 'the dual coefficients');
    const nSv = counts.reduce((a, b) => a + b, 0);
    const pairCount = (m * (m - 1)) / 2;
    if (
      counts.length !== m ||
      support.length !== nSv * d ||
      coef.length !== Math.max(0, m - 1) * nSv ||
      (j.rho ?? []).length !== pairCount
    ) {
      throw new UserError(
        'saved SVM is damaged (support vectors, coefficients and offsets disagree in size): save the model again',
      );
    }
    model.state = {
      features: d,
      classCount: j.classCount ?? m,
      kernel: j.kernel === 'linear' ? 'linear' : 'rbf',
      gamma: j.gamma ?? 1,
      labels,
      counts,
      support: { rows: nSv, cols: d, data: support },
      coef,
      rho: Float64Array.from(j.rho ?? []),
      probA: Float64Array.from(j.probA ?? []),
      probB: Float64Array.from(j.probB ?? []),
    };
    return model;
  }

  /** Held-out decision values per pair from a stratified internal cross-validation (or training values when too few samples). */
  private calibrationData(
    Svm: LibsvmClass,
    x: Matrix,
    y: Int32Array,
    full: SvmState,
  ): { decisions: number[][]; targets: number[][] } {
    const m = full.labels.length;
    const pairCount = (m * (m - 1)) / 2;
    const position = new Int32Array(full.classCount).fill(-1);
    for (let i = 0; i < m; i++) position[full.labels[i]] = i;
    const decisions: number[][] = Array.from({ length: pairCount }, () => []);
    const targets: number[][] = Array.from({ length: pairCount }, () => []);
    let smallest = Number.POSITIVE_INFINITY;
    for (let i = 0; i < m; i++) {
      let n = 0;
      for (let r = 0; r < y.length; r++) if (y[r] === full.labels[i]) n++;
      smallest = Math.min(smallest, n);
    }
    const folds = Math.min(this.options.probabilityFolds ?? 5, smallest);
    const positions = (model: SvmState): Int32Array => {
      const local = new Int32Array(full.classCount).fill(-1);
      for (let i = 0; i < model.labels.length; i++) local[model.labels[i]] = i;
      return local;
    };
    const record = (sample: number, model: SvmState, local: Int32Array, dec: Float64Array): void => {
      const c = position[y[sample]];
      const mm = model.labels.length;
      for (let other = 0; other < m; other++) {
        if (other === c) continue;
        const a = Math.min(c, other);
        const b = Math.max(c, other);
        const p = pairIndex(a, b, m);
        const la = local[full.labels[a]];
        const lb = local[full.labels[b]];
        let v: number;
        if (la >= 0 && lb >= 0) v = dec[pairIndex(la, lb, mm)];
        else if (la >= 0) v = 1;
        else if (lb >= 0) v = -1;
        else v = 0;
        decisions[p].push(v);
        targets[p].push(c === a ? 1 : -1);
      }
    };
    if (folds < 2) {
      const kv = new Float64Array(full.support.rows);
      const dec = new Float64Array(pairCount);
      for (let r = 0; r < x.rows; r++) {
        decide(full, x.data, r * x.cols, kv, dec);
        record(r, full, position, dec);
      }
      return { decisions, targets };
    }
    const fold = new Int32Array(x.rows);
    const random = new Random(this.options.seed ?? 1);
    for (let i = 0; i < m; i++) {
      const members: number[] = [];
      for (let r = 0; r < y.length; r++) if (y[r] === full.labels[i]) members.push(r);
      random.shuffle(members);
      for (let k = 0; k < members.length; k++) fold[members[k]] = k % folds;
    }
    for (let f = 0; f < folds; f++) {
      const train: number[] = [];
      const test: number[] = [];
      for (let r = 0; r < x.rows; r++) (fold[r] === f ? test : train).push(r);
      const raw = trainRaw(
        Svm,
        x,
        y,
        Int32Array.from(train),
        full.kernel,
        this.options.C ?? 1,
        full.gamma,
        this.options.tolerance ?? 1e-3,
      );
      const model: SvmState = { ...full, ...raw };
      const local = positions(model);
      const mm = raw.labels.length;
      const kv = new Float64Array(raw.support.rows);
      const dec = new Float64Array((mm * (mm - 1)) / 2);
      for (const r of test) {
        decide(model, x.data, r * x.cols, kv, dec);
        record(r, model, local, dec);
      }
    }
    return { decisions, targets };
  }

  private checkWidth(x: Matrix): void {
    const s = this.fitted();
    if (x.cols !== s.features)
      throw new UserError(
        `the SVM was trained on ${s.features} features but got ${x.cols}: use vectors made the same way as the training vectors`,
      );
  }

  private fitted(): SvmState {
    if (!this.state) throw new Error('SvmModel: call fit before predicting');
    return this.state;
  }
}

/** Index of pair (a, b), a < b, among m classes in libsvm's order. */
function pairIndex(a: number, b: number, m: number): number {
  return a * m - (a * (a + 1)) / 2 + (b - a - 1);
}

function starts(counts: Int32Array): Int32Array {
  const s = new Int32Array(counts.length + 1);
  for (let i = 0; i < counts.length; i++) s[i + 1] = s[i] + counts[i];
  return s;
}

/**
 * Trains libsvm on the rows `subset` (presented sorted by class, so libsvm's class order is ascending class
 * index), reads the model out and frees it.
 */
function trainRaw(
  Svm: LibsvmClass,
  x: Matrix,
  y: Int32Array,
  subset: Int32Array,
  kernel: SvmKernel,
  C: number,
  gamma: number,
  tolerance: number,
): RawModel {
  const order = Array.from(subset).sort((a, b) => y[a] - y[b] || a - b);
  const d = x.cols;
  const present = [...new Set(order.map((r) => y[r]))];
  if (present.length === 1) {
    return {
      labels: Int32Array.of(present[0]),
      counts: Int32Array.of(0),
      support: { rows: 0, cols: d, data: new Float64Array(0) },
      coef: new Float64Array(0),
      rho: new Float64Array(0),
    };
  }
  const samples = order.map((r) => x.data.subarray(r * d, (r + 1) * d));
  const labels = order.map((r) => y[r]);
  const svm = new Svm({
    type: Svm.SVM_TYPES.C_SVC,
    kernel: kernel === 'linear' ? Svm.KERNEL_TYPES.LINEAR : Svm.KERNEL_TYPES.RBF,
    cost: C,
    gamma,
    tolerance,
    cacheSize: 64,
    shrinking: true,
    probabilityEstimates: false,
    quiet: true,
  });
  try {
    svm.train(samples, labels);
    const svIndices = svm.getSVIndices().map((k) => order[k]);
    return readModelMemory(svm, svIndices, x, C, gamma) ?? parseModelText(svm.serializeModel(), svIndices, x);
  } finally {
    svm.free();
  }
}

/**
 * Reads the trained model straight from libsvm's `struct svm_model` in WebAssembly memory: exact offsets
 * rho (the model text rounds them to 6 digits) and no text round trip (printing the model costs more than
 * training it). The layout is that of libsvm 3.2x compiled for wasm32 (4-byte int and pointer, 8-byte
 * aligned double): svm_parameter occupies bytes 0–95, then nr_class @96, l @100, SV @104, sv_coef @108,
 * rho @112, probA @116, probB @120, sv_indices @124, label @128, nSV @132. The read is used only if every
 * cross-check holds (class count, support count, labels, per-class counts, stored C and γ); otherwise the
 * caller falls back to parsing the model text.
 */
function readModelMemory(
  svm: LibsvmInstance,
  supportRows: number[],
  x: Matrix,
  C: number,
  gamma: number,
): RawModel | undefined {
  const heap = libsvmHeap();
  const pointer = (svm as unknown as { model?: unknown }).model;
  if (!heap || typeof pointer !== 'number' || pointer <= 0 || pointer % 8 !== 0) return undefined;
  const i32 = (address: number): number => heap.HEAP32[address >> 2];
  const f64 = (address: number): number => heap.HEAPF64[address >> 3];
  const m = i32(pointer + 96);
  const total = i32(pointer + 100);
  const labelsNative = svm.getLabels();
  if (
    m !== labelsNative.length ||
    total !== supportRows.length ||
    f64(pointer + 48) !== C ||
    f64(pointer + 16) !== gamma
  )
    return undefined;
  const labelPtr = i32(pointer + 128);
  const countPtr = i32(pointer + 132);
  const rhoPtr = i32(pointer + 112);
  const coefPtr = i32(pointer + 108);
  if (labelPtr % 4 !== 0 || countPtr % 4 !== 0 || rhoPtr % 8 !== 0 || coefPtr % 4 !== 0) return undefined;
  const labels = new Int32Array(m);
  const counts = new Int32Array(m);
  let sum = 0;
  for (let i = 0; i < m; i++) {
    labels[i] = i32(labelPtr + 4 * i);
    counts[i] = i32(countPtr + 4 * i);
    sum += counts[i];
    if (labels[i] !== labelsNative[i]) return undefined;
  }
  if (sum !== total) return undefined;
  const pairCount = (m * (m - 1)) / 2;
  const rho = new Float64Array(pairCount);
  for (let p = 0; p < pairCount; p++) rho[p] = f64(rhoPtr + 8 * p);
  const coef = new Float64Array((m - 1) * total);
  for (let c = 0; c < m - 1; c++) {
    const row = i32(coefPtr + 4 * c);
    if (row % 8 !== 0) return undefined;
    coef.set(heap.HEAPF64.subarray(row >> 3, (row >> 3) + total), c * total);
  }
  if (!rho.every(Number.isFinite) || !coef.every(Number.isFinite)) return undefined;
  const d = x.cols;
  const support = new Float64Array(total * d);
  for (let k = 0; k < total; k++)
    support.set(x.data.subarray(supportRows[k] * d, (supportRows[k] + 1) * d), k * d);
  return { labels, counts, support: { rows: total, cols: d, data: support }, coef, rho };
}

/**
 * Reads class order, counts, offsets and dual coefficients from libsvm's model text (the fallback of
 * readModelMemory; exported for its test); support rows from `x` by their row numbers.
 */
export function parseModelText(text: string, supportRows: number[], x: Matrix): RawModel {
  const header = new Map<string, string[]>();
  let at = 0;
  for (;;) {
    const end = text.indexOf('\n', at);
    if (end < 0) throw new Error('libsvm model text ended before its SV section');
    const line = text.slice(at, end).trim();
    at = end + 1;
    if (line === 'SV') break;
    const parts = line.split(/\s+/);
    header.set(parts[0], parts.slice(1));
  }
  const m = Number(header.get('nr_class')?.[0]);
  const total = Number(header.get('total_sv')?.[0]);
  const labels = Int32Array.from((header.get('label') ?? []).map(Number));
  const counts = Int32Array.from((header.get('nr_sv') ?? []).map(Number));
  const rho = Float64Array.from((header.get('rho') ?? []).map(Number));
  if (
    labels.length !== m ||
    counts.length !== m ||
    rho.length !== (m * (m - 1)) / 2 ||
    total !== supportRows.length
  ) {
    throw new Error(
      `libsvm model text is inconsistent (classes ${m}, support vectors ${total} vs ${supportRows.length})`,
    );
  }
  const coef = new Float64Array((m - 1) * total);
  for (let k = 0; k < total; k++) {
    const end = text.indexOf('\n', at);
    const line = text.slice(at, end < 0 ? text.length : end);
    at = end + 1;
    let pos = 0;
    for (let c = 0; c < m - 1; c++) {
      while (line.charCodeAt(pos) === 32) pos++;
      const next = line.indexOf(' ', pos);
      coef[c * total + k] = Number(line.slice(pos, next < 0 ? line.length : next));
      pos = next;
    }
  }
  const d = x.cols;
  const support = new Float64Array(total * d);
  for (let k = 0; k < total; k++)
    support.set(x.data.subarray(supportRows[k] * d, (supportRows[k] + 1) * d), k * d);
  return { labels, counts, support: { rows: total, cols: d, data: support }, coef, rho };
}

/** Decision values of every pair for the row of `data` starting at `offset` (libsvm's svm_predict_values). */
function decide(s: SvmState, data: Float64Array, offset: number, kv: Float64Array, dec: Float64Array): void {
  const d = s.features;
  const nSv = s.support.rows;
  const sv = s.support.data;
  const rbf = s.kernel === 'rbf';
  // Invariant: kv[k] = K(sv_k, x) for the support vectors visited so far.
  for (let k = 0; k < nSv; k++) {
    let acc = 0;
    const base = k * d;
    if (rbf) {
      for (let t = 0; t < d; t++) {
        const diff = sv[base + t] - data[offset + t];
        acc += diff * diff;
      }
      kv[k] = Math.exp(-s.gamma * acc);
    } else {
      for (let t = 0; t < d; t++) acc += sv[base + t] * data[offset + t];
      kv[k] = acc;
    }
  }
  const m = s.labels.length;
  const c = s.counts;
  let startI = 0;
  let p = 0;
  for (let i = 0; i < m; i++) {
    let startJ = startI + c[i];
    for (let j = i + 1; j < m; j++) {
      let sum = 0;
      // Invariant: sum = Σ coef·kv over the support vectors of class i, then of class j, seen so far.
      for (let k = startI; k < startI + c[i]; k++) sum += s.coef[(j - 1) * nSv + k] * kv[k];
      for (let k = startJ; k < startJ + c[j]; k++) sum += s.coef[i * nSv + k] * kv[k];
      dec[p] = sum - s.rho[p];
      p++;
      startJ += c[j];
    }
    startI += c[i];
  }
}

/** 1 / (1 + exp(A f + B)), computed without overflow. */
export function sigmoidPredict(f: number, A: number, B: number): number {
  const fApB = f * A + B;
  return fApB >= 0 ? Math.exp(-fApB) / (1 + Math.exp(-fApB)) : 1 / (1 + Math.exp(fApB));
}

/**
 * Fits Platt's sigmoid to decision values with targets ±1 (Platt, "Probabilistic outputs for support vector
 * machines", 1999), by the Newton method with backtracking of Lin, Lin & Weng (2007). Returns [A, B].
 */
export function sigmoidTrain(dec: Float64Array, labels: Int8Array): [number, number] {
  const l = dec.length;
  let prior1 = 0;
  for (let i = 0; i < l; i++) if (labels[i] > 0) prior1++;
  const prior0 = l - prior1;
  const maxIter = 100;
  const minStep = 1e-10;
  const sigma = 1e-12;
  const eps = 1e-5;
  const hiTarget = (prior1 + 1) / (prior1 + 2);
  const loTarget = 1 / (prior0 + 2);
  const t = new Float64Array(l);
  for (let i = 0; i < l; i++) t[i] = labels[i] > 0 ? hiTarget : loTarget;
  let A = 0;
  let B = Math.log((prior0 + 1) / (prior1 + 1));
  const objective = (a: number, b: number): number => {
    let f = 0;
    for (let i = 0; i < l; i++) {
      const fApB = dec[i] * a + b;
      f +=
        fApB >= 0
          ? t[i] * fApB + Math.log1p(Math.exp(-fApB))
          : (t[i] - 1) * fApB + Math.log1p(Math.exp(fApB));
    }
    return f;
  };
  let fval = objective(A, B);
  for (let iter = 0; iter < maxIter; iter++) {
    let h11 = sigma;
    let h22 = sigma;
    let h21 = 0;
    let g1 = 0;
    let g2 = 0;
    // Invariant: h and g hold the Hessian and gradient of the objective over points 0..i-1.
    for (let i = 0; i < l; i++) {
      const fApB = dec[i] * A + B;
      let p: number;
      let q: number;
      if (fApB >= 0) {
        p = Math.exp(-fApB) / (1 + Math.exp(-fApB));
        q = 1 / (1 + Math.exp(-fApB));
      } else {
        p = 1 / (1 + Math.exp(fApB));
        q = Math.exp(fApB) / (1 + Math.exp(fApB));
      }
      const d2 = p * q;
      h11 += dec[i] * dec[i] * d2;
      h22 += d2;
      h21 += dec[i] * d2;
      const d1 = t[i] - p;
      g1 += dec[i] * d1;
      g2 += d1;
    }
    if (Math.abs(g1) < eps && Math.abs(g2) < eps) break;
    const det = h11 * h22 - h21 * h21;
    const dA = -(h22 * g1 - h21 * g2) / det;
    const dB = -(-h21 * g1 + h11 * g2) / det;
    const gd = g1 * dA + g2 * dB;
    let step = 1;
    while (step >= minStep) {
      const newA = A + step * dA;
      const newB = B + step * dB;
      const newF = objective(newA, newB);
      if (newF < fval + 0.0001 * step * gd) {
        A = newA;
        B = newB;
        fval = newF;
        break;
      }
      step /= 2;
    }
    if (step < minStep) break;
  }
  return [A, B];
}

/**
 * Class probabilities from pairwise ones r[i·m + j] = P(i | i or j), by the second method of Wu, Lin &
 * Weng (2004), as libsvm's multiclass_probability. Writes `p` (length m); `scratch` holds m·m + m numbers.
 */
export function coupleProbabilities(
  m: number,
  r: Float64Array,
  p: Float64Array,
  scratch: Float64Array,
): void {
  const Q = scratch.subarray(0, m * m);
  const Qp = scratch.subarray(m * m, m * m + m);
  const maxIter = Math.max(100, m);
  const eps = 0.005 / m;
  for (let t = 0; t < m; t++) {
    p[t] = 1 / m;
    Q[t * m + t] = 0;
    for (let j = 0; j < t; j++) {
      Q[t * m + t] += r[j * m + t] * r[j * m + t];
      Q[t * m + j] = Q[j * m + t];
    }
    for (let j = t + 1; j < m; j++) {
      Q[t * m + t] += r[j * m + t] * r[j * m + t];
      Q[t * m + j] = -r[j * m + t] * r[t * m + j];
    }
  }
  for (let iter = 0; iter < maxIter; iter++) {
    let pQp = 0;
    for (let t = 0; t < m; t++) {
      Qp[t] = 0;
      for (let j = 0; j < m; j++) Qp[t] += Q[t * m + j] * p[j];
      pQp += p[t] * Qp[t];
    }
    let maxError = 0;
    for (let t = 0; t < m; t++) maxError = Math.max(maxError, Math.abs(Qp[t] - pQp));
    if (maxError < eps) break;
    for (let t = 0; t < m; t++) {
      const diff = (-Qp[t] + pQp) / Q[t * m + t];
      p[t] += diff;
      pQp = (pQp + diff * (diff * Q[t * m + t] + 2 * Qp[t])) / (1 + diff) / (1 + diff);
      for (let j = 0; j < m; j++) {
        Qp[j] = (Qp[j] + diff * Q[t * m + j]) / (1 + diff);
        p[j] /= 1 + diff;
      }
    }
  }
}
