import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import { Random } from '../core/random.js';
import type { Classifier, Hyperparameters } from './classifier.js';
import { StandardScaler } from './scaler.js';
import { loadTf, type Tf } from './tf-backend.js';

// Only types come from tfjs at module level; the library itself is loaded inside functions (loadTf).
type LayersModel = import('@tensorflow/tfjs').LayersModel;
type Tensor = import('@tensorflow/tfjs').Tensor;
type ModelArtifacts = import('@tensorflow/tfjs').io.ModelArtifacts;
type WeightsManifestEntry = import('@tensorflow/tfjs').io.WeightsManifestEntry;

/** Hyperparameters of the dense network. */
export interface DenseOptions {
  /** Units of the one hidden ReLU layer. Default 32. */
  hidden?: number;
  /** Most passes over the training rows. Default 80. */
  epochs?: number;
  /** Stop after this many epochs without a lower validation loss. Default 8. */
  patience?: number;
  /** Rows per Adam step. Default 128 (small studies then take one step per epoch, which keeps training fast). */
  batchSize?: number;
  /** Adam's step size (Kingma & Ba, "Adam: a method for stochastic optimization", 2015). Default 0.02. */
  learningRate?: number;
  /** Dropout rate after the hidden layer, 0 = none. Default 0. */
  dropout?: number;
  /** L2 penalty on the two weight matrices. Default 0 (early stopping regularises; the penalty costs ~40% of the training time). */
  l2?: number;
  /** Share of the training rows held out (stratified) for early stopping. Default 0.2. */
  validationShare?: number;
  /** Seed of the initial weights, the validation split and the batch order. Default 1. */
  seed?: number;
}

const DEFAULTS: Required<DenseOptions> = {
  hidden: 32,
  epochs: 80,
  patience: 8,
  batchSize: 128,
  learningRate: 0.02,
  dropout: 0,
  l2: 0,
  validationShare: 0.2,
  seed: 1,
};

/** What `fit` learned: the network and how training went. */
export interface DenseState {
  model: LayersModel;
  features: number;
  classCount: number;
  /** Epochs run, and the epoch whose weights were kept (lowest validation loss). */
  epochsRun: number;
  bestEpoch: number;
  backend: string;
}

export interface DenseJSON {
  kind: 'landform.dense';
  format: 1;
  options: Required<DenseOptions>;
  features: number;
  classCount: number;
  epochsRun: number;
  bestEpoch: number;
  backend: string;
  /** TensorFlow.js model artifacts, captured through an IO handler (no file system, no native binding). */
  topology: unknown;
  weightSpecs: WeightsManifestEntry[];
  weights: string;
}

/**
 * A small CPU-only network in TensorFlow.js: inputs → dense ReLU (hidden units) → [dropout in training] → dense
 * softmax over the classes, trained with Adam on softmax cross-entropy + L2, with early stopping on a
 * stratified inner validation split (the weights of the best validation epoch are kept). Initial weights
 * come from seeded He-normal / Glorot-uniform initialisers (He et al., "Delving deep into rectifiers", 2015;
 * Glorot & Bengio, "Understanding the difficulty of training deep feedforward neural networks", 2010) and
 * batches are ordered by our seeded Random, so a seed gives one result on one backend.
 * Inputs should be standardised (the `dense` classifier does it).
 */
export class DenseNetwork {
  readonly options: Required<DenseOptions>;
  state: DenseState | undefined;

  constructor(options: DenseOptions = {}) {
    const o = { ...DEFAULTS, ...definedOnly(options) };
    const whole = (v: number, name: string, min: number): void => {
      if (!(Number.isInteger(v) && v >= min))
        throw new UserError(`dense ${name} must be a whole number ≥ ${min}, got ${v}`);
    };
    whole(o.hidden, 'hidden units', 1);
    whole(o.epochs, 'epochs', 1);
    whole(o.patience, 'patience', 1);
    whole(o.batchSize, 'batch size', 1);
    if (!(o.learningRate > 0))
      throw new UserError(`dense learning rate must be positive, got ${o.learningRate}`);
    if (!(o.dropout >= 0 && o.dropout < 1))
      throw new UserError(`dense dropout must lie in [0, 1), got ${o.dropout}`);
    if (!(o.l2 >= 0)) throw new UserError(`dense l2 must be ≥ 0, got ${o.l2}`);
    if (!(o.validationShare >= 0 && o.validationShare < 1))
      throw new UserError(`dense validation share must lie in [0, 1), got ${o.validationShare}`);
    this.options = o;
  }

  async fit(x: Matrix, y: Int32Array, classCount: number): Promise<this> {
    if (x.rows !== y.length) throw new Error(`DenseNetwork.fit: ${x.rows} rows but ${y.length} labels`);
    if (x.rows < 1)
      throw new UserError('cannot train a dense network on zero samples: give training samples');
    const { tf, backend } = await loadTf();
    this.dispose();
    const o = this.options;
    const random = new Random(o.seed);
    const { train, validation } = validationSplit(y, o.validationShare, random);
    const model = buildModel(tf, x.cols, classCount, o);
    const xAll = tf.tensor2d(Float32Array.from(x.data), [x.rows, x.cols]);
    const yAll = tf.tidy(() => tf.oneHot(tf.tensor1d(y, 'int32'), classCount).toFloat());
    const trainIdx = tf.tensor1d(train, 'int32');
    const xTrain = tf.gather(xAll, trainIdx);
    const yTrain = tf.gather(yAll, trainIdx);
    trainIdx.dispose();
    let xVal: Tensor | undefined;
    let yVal: Tensor | undefined;
    if (validation.length > 0) {
      const valIdx = tf.tensor1d(validation, 'int32');
      xVal = tf.gather(xAll, valIdx);
      yVal = tf.gather(yAll, valIdx);
      valIdx.dispose();
    }
    xAll.dispose();
    yAll.dispose();
    const optimizer = tf.train.adam(o.learningRate);
    const kernels = model.trainableWeights.filter((w) => w.name.includes('kernel')).map((w) => w.read());
    const [hiddenLayer, outputLayer] = model.layers;
    // Dropout is applied here, with a fresh seed from our Random at every step (a seeded dropout layer
    // would draw the same mask at every step); the saved model has no dropout layer, as inference needs none.
    let dropoutSeed = 0;
    const lossOf = (xs: Tensor, ys: Tensor, training: boolean): import('@tensorflow/tfjs').Scalar =>
      tf.tidy(() => {
        let hidden = hiddenLayer.apply(xs) as Tensor;
        if (training && o.dropout > 0) hidden = tf.dropout(hidden, o.dropout, undefined, dropoutSeed);
        const logits = outputLayer.apply(hidden) as Tensor;
        let loss = tf.losses.softmaxCrossEntropy(ys, logits);
        if (o.l2 > 0) for (const k of kernels) loss = loss.add(tf.sum(tf.square(k)).mul(o.l2));
        return loss as import('@tensorflow/tfjs').Scalar;
      });
    const n = train.length;
    const order = Int32Array.from({ length: n }, (_, i) => i);
    let best = Number.POSITIVE_INFINITY;
    let bestEpoch = 0;
    let snapshot: Tensor[] | undefined;
    let epoch = 0;
    try {
      for (epoch = 1; epoch <= o.epochs; epoch++) {
        random.shuffle(order);
        // Invariant: every training row appears once per epoch, in the seeded order.
        for (let start = 0; start < n; start += o.batchSize) {
          const end = Math.min(n, start + o.batchSize);
          dropoutSeed = random.nextUint32();
          tf.tidy(() => {
            const idx = tf.tensor1d(order.subarray(start, end), 'int32');
            const xb = tf.gather(xTrain, idx);
            const yb = tf.gather(yTrain, idx);
            optimizer.minimize(() => lossOf(xb, yb, true), false);
          });
        }
        if (!xVal || !yVal) continue;
        const valLoss = tf.tidy(() => lossOf(xVal as Tensor, yVal as Tensor, false).dataSync()[0]);
        if (valLoss < best - 1e-6) {
          best = valLoss;
          bestEpoch = epoch;
          if (snapshot) for (const t of snapshot) t.dispose();
          snapshot = model.getWeights().map((w) => w.clone());
        } else if (epoch - bestEpoch >= o.patience) {
          break;
        }
      }
      if (snapshot) model.setWeights(snapshot);
    } catch (error) {
      model.dispose();
      throw error;
    } finally {
      if (snapshot) for (const t of snapshot) t.dispose();
      optimizer.dispose();
      for (const t of [xTrain, yTrain, xVal, yVal]) t?.dispose();
    }
    const epochsRun = Math.min(epoch, o.epochs);
    this.state = {
      model,
      features: x.cols,
      classCount,
      epochsRun,
      bestEpoch: snapshot ? bestEpoch : epochsRun,
      backend,
    };
    return this;
  }

  /** Samples × classCount softmax probabilities. */
  async predictScores(x: Matrix): Promise<Matrix> {
    const s = this.fitted();
    if (x.cols !== s.features)
      throw new UserError(
        `the dense network was trained on ${s.features} features but got ${x.cols}: use vectors made the same way as the training vectors`,
      );
    const { tf } = await loadTf();
    const values = tf.tidy(() => {
      const logits = s.model.predict(tf.tensor2d(Float32Array.from(x.data), [x.rows, x.cols])) as Tensor;
      return tf.softmax(logits).dataSync();
    });
    return { rows: x.rows, cols: s.classCount, data: Float64Array.from(values) };
  }

  async toJSON(): Promise<DenseJSON> {
    const s = this.fitted();
    const { tf } = await loadTf();
    let artifacts: ModelArtifacts | undefined;
    await s.model.save(
      tf.io.withSaveHandler(async (a) => {
        artifacts = a;
        return { modelArtifactsInfo: { dateSaved: new Date(0), modelTopologyType: 'JSON' } };
      }),
    );
    if (!artifacts?.weightData || !artifacts.weightSpecs)
      throw new Error('dense network: the save handler received no weights');
    const data = artifacts.weightData;
    const buffers = Array.isArray(data) ? data : [data];
    const bytes = Buffer.concat(buffers.map((b) => Buffer.from(b)));
    return {
      kind: 'landform.dense',
      format: 1,
      options: { ...this.options },
      features: s.features,
      classCount: s.classCount,
      epochsRun: s.epochsRun,
      bestEpoch: s.bestEpoch,
      backend: s.backend,
      topology: artifacts.modelTopology,
      weightSpecs: artifacts.weightSpecs,
      weights: bytes.toString('base64'),
    };
  }

  static async fromJSON(json: unknown): Promise<DenseNetwork> {
    const j = json as Partial<DenseJSON> | null;
    if (j?.kind !== 'landform.dense')
      throw new UserError(
        'not a saved dense network (kind tag missing or different): save the model again with this version',
      );
    if (j.format !== 1)
      throw new UserError(
        `saved dense network has format ${String(j.format)}, this version reads format 1: train and save the model again`,
      );
    if (typeof j.weights !== 'string' || !Array.isArray(j.weightSpecs) || typeof j.topology !== 'object') {
      throw new UserError(
        'saved dense network is damaged (topology or weights missing): train and save the model again',
      );
    }
    const { tf, backend } = await loadTf();
    const bytes = Buffer.from(j.weights, 'base64');
    const weightData = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength);
    const model = await tf.loadLayersModel(
      tf.io.fromMemory({ modelTopology: j.topology as object, weightSpecs: j.weightSpecs, weightData }),
    );
    const net = new DenseNetwork(j.options ?? {});
    net.state = {
      model,
      features: j.features ?? 0,
      classCount: j.classCount ?? 0,
      epochsRun: j.epochsRun ?? 0,
      bestEpoch: j.bestEpoch ?? 0,
      backend,
    };
    return net;
  }

  dispose(): void {
    if (this.state) {
      this.state.model.dispose();
      this.state = undefined;
    }
  }

  private fitted(): DenseState {
    if (!this.state) throw new Error('DenseNetwork: call fit before predicting');
    return this.state;
  }
}

function definedOnly(o: DenseOptions): DenseOptions {
  const out: Record<string, number> = {};
  for (const [k, v] of Object.entries(o)) if (v !== undefined) out[k] = v as number;
  return out as DenseOptions;
}

function buildModel(tf: Tf, features: number, classCount: number, o: Required<DenseOptions>): LayersModel {
  const model = tf.sequential();
  model.add(
    tf.layers.dense({
      units: o.hidden,
      activation: 'relu',
      inputShape: [features],
      kernelInitializer: tf.initializers.heNormal({ seed: o.seed }),
      biasInitializer: 'zeros',
    }),
  );
  // Linear output: the softmax is applied in the loss (softmax cross-entropy on logits) and in prediction.
  model.add(
    tf.layers.dense({
      units: classCount,
      kernelInitializer: tf.initializers.glorotUniform({ seed: o.seed + 1 }),
      biasInitializer: 'zeros',
    }),
  );
  return model;
}

/** Stratified hold-out: from each class with at least 2 rows, round(share × count) rows (at least 1). */
function validationSplit(
  y: Int32Array,
  share: number,
  random: Random,
): { train: Int32Array; validation: Int32Array } {
  const byClass = new Map<number, number[]>();
  for (let i = 0; i < y.length; i++) {
    const list = byClass.get(y[i]) ?? [];
    list.push(i);
    byClass.set(y[i], list);
  }
  const train: number[] = [];
  const validation: number[] = [];
  const classes = [...byClass.keys()].sort((a, b) => a - b);
  const enough = share > 0 && y.length >= 10;
  for (const c of classes) {
    const rows = byClass.get(c) ?? [];
    random.shuffle(rows);
    const take = enough && rows.length >= 2 ? Math.max(1, Math.round(share * rows.length)) : 0;
    validation.push(...rows.slice(0, take));
    train.push(...rows.slice(take));
  }
  train.sort((a, b) => a - b);
  validation.sort((a, b) => a - b);
  return { train: Int32Array.from(train), validation: Int32Array.from(validation) };
}

/**
 * The `dense` classifier: StandardScaler → DenseNetwork. Hyperparameters: hidden, epochs, patience,
 * batchSize, learningRate, dropout, l2, validationShare (defaults in DenseOptions).
 */
export class DenseClassifier implements Classifier {
  readonly name = 'dense' as const;
  readonly hyperparameters: Hyperparameters;
  readonly seed: number;
  state: { scaler: StandardScaler; network: DenseNetwork } | undefined;

  constructor(hyperparameters: Hyperparameters, seed: number) {
    this.hyperparameters = { ...hyperparameters };
    this.seed = seed;
    this.networkOptions(); // fail early on a bad value
  }

  async fit(x: Matrix, y: Int32Array, classCount: number): Promise<void> {
    this.dispose();
    const scaler = new StandardScaler().fit(x);
    const network = await new DenseNetwork(this.networkOptions()).fit(scaler.transform(x), y, classCount);
    this.state = { scaler, network };
  }

  async predictScores(x: Matrix): Promise<Matrix> {
    const s = this.fitted();
    return s.network.predictScores(s.scaler.transform(x));
  }

  /** The fitted parts, for inspection (epochs run, best epoch, backend). */
  parts(): { scaler: StandardScaler; network: DenseNetwork } {
    return this.fitted();
  }

  async toJSON(): Promise<DenseClassifierJSON> {
    const s = this.fitted();
    return {
      kind: 'landform.classifier',
      model: 'dense',
      format: 1,
      hyperparameters: { ...this.hyperparameters },
      seed: this.seed,
      scaler: s.scaler.toJSON(),
      network: await s.network.toJSON(),
    };
  }

  static async fromJSON(json: unknown): Promise<DenseClassifier> {
    const j = json as Partial<DenseClassifierJSON> | null;
    if (j?.kind !== 'landform.classifier' || j.model !== 'dense')
      throw new UserError('not a saved dense classifier: train and save the model again');
    if (j.format !== 1)
      throw new UserError(
        `saved dense classifier has format ${String(j.format)}, this version reads format 1: train and save the model again`,
      );
    const out = new DenseClassifier(j.hyperparameters ?? {}, j.seed ?? 1);
    out.state = {
      scaler: StandardScaler.fromJSON(j.scaler),
      network: await DenseNetwork.fromJSON(j.network),
    };
    return out;
  }

  dispose(): void {
    this.state?.network.dispose();
    this.state = undefined;
  }

  private networkOptions(): DenseOptions {
    const known: Array<keyof DenseOptions> = [
      'hidden',
      'epochs',
      'patience',
      'batchSize',
      'learningRate',
      'dropout',
      'l2',
      'validationShare',
    ];
    const out: DenseOptions = { seed: this.seed };
    for (const [key, value] of Object.entries(this.hyperparameters)) {
      if (!known.includes(key as keyof DenseOptions))
        throw new UserError(`dense has no hyperparameter '${key}': use ${known.join(', ')}`);
      const n = typeof value === 'number' ? value : Number(value);
      if (!Number.isFinite(n)) throw new UserError(`dense ${key} must be a number, got '${String(value)}'`);
      out[key as keyof DenseOptions] = n;
    }
    return new DenseNetwork(out).options;
  }

  private fitted(): NonNullable<DenseClassifier['state']> {
    if (!this.state) throw new Error('dense: call fit before predicting');
    return this.state;
  }
}

export interface DenseClassifierJSON {
  kind: 'landform.classifier';
  model: 'dense';
  format: 1;
  hyperparameters: Hyperparameters;
  seed: number;
  scaler: unknown;
  network: unknown;
}
