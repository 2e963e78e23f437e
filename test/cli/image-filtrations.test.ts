import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseDiagramCsv } from '../../src/io/diagram-csv.js';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';
import { imageTableCsv, mnistDigits } from '../helpers/mnist.js';

/** `perClass` 0s and 1s of the open MNIST set (LeCun, Bottou, Bengio & Haffner, 1998) as an image table. */
function digitTable(perClass: number): string {
  return imageTableCsv(mnistDigits(perClass, { classes: [0, 1], label: (d) => `digit-${d}` }));
}

describe('landform diagrams on an image table with several filtrations', () => {
  it('writes tagged rows, filtration by filtration, the same on one thread and two, and records the list', () => {
    const dir = tempDir();
    const input = join(dir, 'digits.csv');
    writeFileSync(input, digitTable(4));
    const run = (out: string, workers: string) =>
      runCli([
        'diagrams',
        input,
        '--shape',
        '28x28',
        '--filtration',
        'height:1:0,radials:2,erosion',
        '--workers',
        workers,
        '--out',
        out,
      ]);
    const one = join(dir, 'one.csv');
    const two = join(dir, 'two.csv');
    const r1 = run(one, '1');
    expect(withoutCompletion(r1.stderr)).toBe('');
    expect(r1.code).toBe(0);
    expect(run(two, '2').code).toBe(0);
    const text = readFileSync(one, 'utf8');
    // Reproducible: the same bytes whatever the threads.
    expect(readFileSync(two, 'utf8')).toBe(text);
    expect(text.split('\n')[0]).toBe('sample,label,filtration,degree,birth,death');
    const sets = parseDiagramCsv(text, one);
    const tags = ['height:1:0', 'radial:33.3333%:33.3333%', 'radial:33.3333%:66.6667%'];
    tags.push('radial:66.6667%:33.3333%', 'radial:66.6667%:66.6667%', 'erosion');
    expect(sets[0].diagrams.map((d) => `${d.filtration}/H${d.degree}`)).toEqual(
      tags.flatMap((t) => [`${t}/H0`, `${t}/H1`]),
    );
    // Rows come filtration by filtration in the order asked for.
    const firstSample = text
      .split('\n')
      .slice(1)
      .filter((l) => l.startsWith('d0-0,'))
      .map((l) => l.split(',')[2]);
    expect([...new Set(firstSample)]).toEqual(tags);
    const prov = JSON.parse(readFileSync(`${one}.provenance.json`, 'utf8'));
    expect(prov.options.filtration).toBe(tags.join(','));
    expect(prov.options.threshold).toBe('otsu');
    expect(prov.options.shape).toEqual([28, 28]);
    // A 0 written by hand closes a loop under the downward height filtration; a 1 does not.
    const h1 = (id: string) => sets.find((s) => s.sample === id)!.diagrams[1];
    expect(h1('d0-0').births.length).toBeGreaterThan(0);
    expect(h1('d1-0').births.length).toBe(0);
  }, 60000);

  it('runs one image filtration untagged in diagrams, and evaluate reads a tagged diagrams file', () => {
    const dir = tempDir();
    const input = join(dir, 'digits.csv');
    writeFileSync(input, digitTable(6));
    const single = join(dir, 'single.csv');
    const r = runCli([
      'diagrams',
      input,
      '--shape',
      '28x28',
      '--filtration',
      'height:1:0',
      '--threshold',
      '0.5',
      '--workers',
      '1',
      '--out',
      single,
    ]);
    expect(withoutCompletion(r.stderr)).toBe('');
    expect(r.code).toBe(0);
    expect(readFileSync(single, 'utf8').split('\n')[0]).toBe('sample,label,degree,birth,death');
    expect(JSON.parse(readFileSync(`${single}.provenance.json`, 'utf8')).options.threshold).toBe(0.5);
    const tagged = join(dir, 'tagged.csv');
    const t = runCli([
      'diagrams',
      input,
      '--shape',
      '28x28',
      '--filtration',
      'height:1:0,distance',
      '--workers',
      '1',
      '--out',
      tagged,
    ]);
    expect(t.code).toBe(0);
    const e = runCli([
      'evaluate',
      tagged,
      '--folds',
      '2',
      '--inner-folds',
      '2',
      '--models',
      'pca-svm',
      '--depths',
      '2',
      '--grid-sizes',
      '10',
      '--workers',
      '1',
      '--quiet',
      '--out',
      join(dir, 'study'),
    ]);
    expect(withoutCompletion(e.stderr)).toBe('');
    expect(e.code).toBe(0);
    expect(e.stdout).toMatch(/landscape\s+pca-svm\s+accuracy/);
  }, 120000);

  it('refuses a cloud filtration on images and a direction of the wrong length, on one line with exit 2', () => {
    const dir = tempDir();
    const input = join(dir, 'digits.csv');
    writeFileSync(input, digitTable(1));
    const r = runCli([
      'diagrams',
      input,
      '--shape',
      '28x28',
      '--filtration',
      'alpha',
      '--out',
      join(dir, 'x.csv'),
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/is an image; --filtration alpha applies to point clouds/);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    const bad = runCli([
      'diagrams',
      input,
      '--shape',
      '28x28',
      '--filtration',
      'height:1',
      '--out',
      join(dir, 'y.csv'),
    ]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/height:1' has 1 component, the image has 2 axes/);
  }, 60000);
});
