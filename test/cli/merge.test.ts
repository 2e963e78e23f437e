import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import { main } from '../../src/cli/main.js';
import { Random } from '../../src/core/random.js';
import type { DiagramSample } from '../../src/core/sample.js';
import { provenance } from '../../src/core/version.js';
import { writeDiagramsOutput } from '../../src/io/outputs.js';
import { planShard, resolveShard } from '../../src/io/shard.js';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';

/** Made-up diagrams for the file mechanics of the command (demo data, no numeric claim). */
function demoSamples(count = 21): DiagramSample[] {
  const rng = new Random(17);
  return Array.from({ length: count }, (_, i): DiagramSample => {
    const b = rng.uniform(0, 0.4);
    return {
      kind: 'diagrams',
      id: `pump-window-${i}`,
      label: i % 2 === 0 ? 'healthy' : 'cavitating',
      diagrams: [
        { degree: 0, births: Float64Array.of(0, 0), deaths: Float64Array.of(rng.uniform(0.1, 1), Infinity) },
        { degree: 1, births: Float64Array.of(b), deaths: Float64Array.of(b + rng.uniform(0.05, 0.5)) },
      ],
    };
  });
}

async function writeShards(dir: string, n: number): Promise<{ files: string[]; whole: string }> {
  const samples = demoSamples();
  const prov = provenance('diagrams', { degrees: [0, 1], out: 'd.csv' });
  const sets = (list: DiagramSample[]) =>
    list.map((s) => ({ sample: s.id, label: s.label, diagrams: s.diagrams }));
  const whole = join(dir, 'whole.csv');
  await writeDiagramsOutput(whole, sets(samples), prov);
  const files: string[] = [];
  for (let i = 1; i <= n; i++) {
    const plan = planShard({
      samples,
      out: join(dir, 'out', 'd.csv'),
      shard: resolveShard(`${i}/${n}`, {}),
      output: 'diagrams',
      settings: prov.options,
    });
    await writeDiagramsOutput(plan.out, sets(plan.samples), plan.stamp(prov));
    files.push(plan.out);
  }
  return { files, whole };
}

describe('landform merge', () => {
  it('merges shard outputs into the unsharded file and says what it did', async () => {
    const dir = tempDir();
    const { files, whole } = await writeShards(dir, 3);
    const out = join(dir, 'merged.csv');
    const r = runCli(['merge', ...files, '--out', out]);
    expect(r.stderr).toMatch(
      /^landform merge: wrote .*merged\.csv \(diagrams merged from 3 shards, 21 samples, \d+\.\d s\)\n$/,
    );
    expect(r.code).toBe(0);
    expect(readFileSync(out).equals(readFileSync(whole))).toBe(true);
  });

  it('refuses a missing shard with one line, exit 2, and writes nothing', async () => {
    const dir = tempDir();
    const { files } = await writeShards(dir, 3);
    const out = join(dir, 'merged.csv');
    const r = runCli(['merge', files[0], files[2], '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(
      /^landform: shard 2\/3 is missing \(got 2 of 3\); run it with --shard 2\/3 and merge again/,
    );
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(dir).sort()).toEqual(['out', 'whole.csv', 'whole.csv.provenance.json']);
  });

  it('refuses a shard given twice, and a missing --out', async () => {
    const dir = tempDir();
    const { files } = await writeShards(dir, 2);
    const twice = runCli(['merge', files[0], files[1], files[1], '--out', join(dir, 'm.csv')]);
    expect(twice.code).toBe(2);
    expect(twice.stderr).toMatch(/is shard 2\/2 again .* give each shard once/);
    const noOut = runCli(['merge', ...files]);
    expect(noOut.code).toBe(2);
    expect(noOut.stderr).toMatch(/--out FILE is required/);
  });

  it('refuses a shard truncated after it was written (whole rows cut off), one line, nothing written', async () => {
    const dir = tempDir();
    const { files } = await writeShards(dir, 3);
    const lines = readFileSync(files[1], 'utf8').split('\n');
    // Cut the last four rows but keep a well-formed CSV: only the recorded size and SHA-256 can tell.
    writeFileSync(files[1], `${lines.slice(0, -5).join('\n')}\n`);
    const out = join(dir, 'merged.csv');
    const r = runCli(['merge', ...files, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(
      /^landform: .*d\.shard-2-of-3\.csv: d\.shard-2-of-3\.csv holds \d+ bytes but \d+ were written \(truncated or changed\); rerun this shard\n$/,
    );
    expect(existsSync(out)).toBe(false);
    const sidecar = JSON.parse(readFileSync(`${files[1]}.provenance.json`, 'utf8'));
    expect(sidecar.shard.content.samples).toBe(sidecar.shard.ids.length);
    expect(sidecar.shard.content.files.data.sha256).toMatch(/^[0-9a-f]{64}$/);
  });
});

/**
 * A tiny points CSV of 21 samples from a made-up sensor field (demo data for the mechanics, no numeric claim):
 * rings of 9–12 points, blobs and pairs of blobs, in 2-D.
 */
function writePointsCsv(file: string, count = 21): void {
  const rng = new Random(23);
  const lines = ['sample,label,x,y'];
  for (let i = 0; i < count; i++) {
    const label = ['ring', 'blob', 'pair'][i % 3];
    const n = 9 + rng.int(4);
    for (let k = 0; k < n; k++) {
      let x: number;
      let y: number;
      if (label === 'ring') {
        const a = (2 * Math.PI * k) / n;
        x = Math.cos(a) + rng.normal(0, 0.05);
        y = Math.sin(a) + rng.normal(0, 0.05);
      } else {
        x = rng.normal(label === 'pair' && k % 2 ? 3 : 0, 0.3);
        y = rng.normal(0, 0.3);
      }
      lines.push(`probe-${String(i).padStart(2, '0')},${label},${x},${y}`);
    }
  }
  writeFileSync(file, lines.join('\n') + '\n');
}

/** Long signal CSV; sample `short` (if given) has only 3 values, too few for a 3:2 delay embedding. */
function writeSignalCsv(file: string, count: number, short?: string): void {
  const rng = new Random(29);
  const lines = ['sample,label,value'];
  for (let i = 0; i < count; i++) {
    const id = `vib-${i}`;
    const n = id === short ? 3 : 40;
    for (let t = 0; t < n; t++)
      lines.push(`${id},${i % 2 ? 'healthy' : 'misaligned'},${Math.sin(0.7 * t) + rng.normal(0, 0.1)}`);
  }
  writeFileSync(file, lines.join('\n') + '\n');
}

/** Environment without any scheduler's shard variables, so that a run is unsharded unless a test sets them. */
const noScheduler = { SLURM_ARRAY_TASK_ID: '', JOB_COMPLETION_INDEX: '', LANDFORM_SHARD_COUNT: '' };

/**
 * Runs `landform ARGS` through the command's entry function in this process — the same parsing, errors and
 * writers as the `landform` binary, without a process start per shard (the machine is small). Spawned runs
 * below cover the real process and its environment.
 */
async function landform(
  args: string[],
  env: Record<string, string> = {},
): Promise<{ code: number; stderr: string; stdout: string }> {
  const saved = new Map<string, string | undefined>();
  for (const [key, value] of Object.entries({ ...noScheduler, ...env })) {
    saved.set(key, process.env[key]);
    process.env[key] = value;
  }
  let stderr = '';
  let stdout = '';
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => {
    stderr += String(chunk);
    return true;
  });
  const out = vi.spyOn(process.stdout, 'write').mockImplementation((chunk: string | Uint8Array) => {
    stdout += String(chunk);
    return true;
  });
  try {
    const code = await main(args);
    return { code, stderr, stdout };
  } finally {
    err.mockRestore();
    out.mockRestore();
    for (const [key, value] of saved) {
      if (value === undefined) delete process.env[key];
      else process.env[key] = value;
    }
  }
}

function files(dir: string): string[] {
  return existsSync(dir) ? readdirSync(dir).sort() : [];
}

function shardOutputs(dir: string): string[] {
  return files(dir)
    .filter((f) => /\.shard-\d+-of-\d+\.(csv|arrow|npy)$/.test(f))
    .map((f) => join(dir, f));
}

const same = (a: string, b: string): boolean => readFileSync(a).equals(readFileSync(b));

describe('sharded diagrams and vectorize through the CLI', () => {
  const dir = tempDir();
  const data = join(dir, 'field.csv');
  writePointsCsv(data);
  const diagramArgs = [data, '--kind', 'points', '--degrees', '0,1', '--workers', '1'];

  it('merged diagram shards (N = 1, 3, 7; CSV and Arrow) equal the unsharded run byte for byte, sidecar included', async () => {
    for (const ext of ['csv', 'arrow']) {
      const whole = join(dir, `whole.${ext}`);
      const w = await landform(['diagrams', ...diagramArgs, '--out', whole]);
      expect(w.code, w.stderr).toBe(0);
      expect(withoutCompletion(w.stderr)).toBe('');
      for (const n of ext === 'csv' ? [1, 3, 7] : [3]) {
        const outDir = join(dir, `${ext}-n${n}`);
        for (let i = 1; i <= n; i++) {
          const r = await landform([
            'diagrams',
            ...diagramArgs,
            '--shard',
            `${i}/${n}`,
            '--out',
            join(outDir, `whole.${ext}`),
          ]);
          expect(r.code, r.stderr).toBe(0);
          expect(r.stderr).toMatch(new RegExp(`shard ${i}/${n}: \\d+ of 21 samples`));
        }
        const shards = shardOutputs(outDir);
        expect(shards).toHaveLength(n);
        const merged = join(dir, `merged-${n}.${ext}`);
        const m = await landform(['merge', ...shards, '--out', merged]);
        expect(m.code, m.stderr).toBe(0);
        expect(same(merged, whole)).toBe(true);
        expect(same(`${merged}.provenance.json`, `${whole}.provenance.json`)).toBe(true);
      }
    }
  });

  it('merged vectorize shards (fixed grid; CSV and NPY) equal the unsharded run byte for byte', async () => {
    const vectorArgs = ['vectorize', ...diagramArgs, '--depth', '2', '--grid', '0:1.5:8'];
    for (const ext of ['csv', 'npy', 'arrow']) {
      const whole = join(dir, `features.${ext}`);
      const w = await landform([...vectorArgs, '--out', whole]);
      expect(w.code, w.stderr).toBe(0);
      const outDir = join(dir, `features-${ext}`);
      for (let i = 1; i <= 3; i++) {
        const r = await landform([
          ...vectorArgs,
          '--shard',
          `${i}/3`,
          '--out',
          join(outDir, `features.${ext}`),
        ]);
        expect(r.code, r.stderr).toBe(0);
      }
      const merged = join(dir, `merged-features.${ext}`);
      const m = await landform(['merge', ...shardOutputs(outDir), '--out', merged]);
      expect(m.code, m.stderr).toBe(0);
      expect(same(merged, whole)).toBe(true);
      expect(same(`${merged}.provenance.json`, `${whole}.provenance.json`)).toBe(true);
    }
  });

  it("landmark subsampling: the merged sidecar combines the shards' covering radii as the unsharded run records them", async () => {
    const args = ['diagrams', ...diagramArgs, '--subsample', 'maxmin:6'];
    const whole = join(dir, 'landmarks.csv');
    expect((await landform([...args, '--out', whole])).code).toBe(0);
    for (let i = 1; i <= 3; i++)
      expect(
        (await landform([...args, '--shard', `${i}/3`, '--out', join(dir, 'landmarks', 'l.csv')])).code,
      ).toBe(0);
    const merged = join(dir, 'landmarks-merged.csv');
    const m = await landform(['merge', ...shardOutputs(join(dir, 'landmarks')), '--out', merged]);
    expect(m.code, m.stderr).toBe(0);
    expect(same(merged, whole)).toBe(true);
    const sidecar = JSON.parse(readFileSync(`${merged}.provenance.json`, 'utf8')) as {
      options: { coveringRadius: { perSample: object } };
    };
    expect(Object.keys(sidecar.options.coveringRadius.perSample)).toHaveLength(21);
    expect(same(`${merged}.provenance.json`, `${whole}.provenance.json`)).toBe(true);
  });

  it('refuses a sharded vectorize that would learn its grid from its own shard', async () => {
    const r = await landform([
      'vectorize',
      ...diagramArgs,
      '--shard',
      '1/3',
      '--out',
      join(dir, 'learned', 'f.csv'),
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/--shard needs features fixed in advance/);
    expect(files(join(dir, 'learned'))).toEqual([]);
  });

  it('skips a finished shard unless --force or its data changed; other options run it again; a bad --shard is one line', async () => {
    const out = join(dir, 'again', 'd.csv');
    expect((await landform(['diagrams', ...diagramArgs, '--shard', '1/2', '--out', out])).code).toBe(0);
    const shardFile = join(dir, 'again', 'd.shard-1-of-2.csv');
    const original = readFileSync(shardFile, 'utf8');
    // An atomic write renames a new file into place, so an unchanged inode shows nothing was rewritten.
    const inode = statSync(shardFile).ino;
    const again = await landform(['diagrams', ...diagramArgs, '--shard', '1/2', '--out', out]);
    expect(again.code).toBe(0);
    expect(again.stderr).toMatch(/shard 1\/2 is already finished .*add --force to recompute/);
    expect(statSync(shardFile).ino).toBe(inode);
    const forced = await landform(['diagrams', ...diagramArgs, '--shard', '1/2', '--force', '--out', out]);
    expect(forced.code).toBe(0);
    expect(statSync(shardFile).ino).not.toBe(inode);
    expect(readFileSync(shardFile, 'utf8')).toBe(original);
    // A finished shard edited behind its back no longer matches its recorded SHA-256: it is computed again.
    writeFileSync(shardFile, 'edited\n');
    const repaired = await landform(['diagrams', ...diagramArgs, '--shard', '1/2', '--out', out]);
    expect(repaired.code).toBe(0);
    expect(repaired.stderr).not.toMatch(/already finished/);
    expect(readFileSync(shardFile, 'utf8')).toBe(original);
    writeFileSync(shardFile, 'edited\n');
    const other = await landform([
      'diagrams',
      ...diagramArgs,
      '--max-scale',
      '0.5',
      '--shard',
      '1/2',
      '--out',
      out,
    ]);
    expect(other.code).toBe(0);
    expect(other.stderr).not.toMatch(/already finished/);
    expect(readFileSync(shardFile, 'utf8')).not.toBe('edited\n');
    const bad = await landform(['diagrams', ...diagramArgs, '--shard', '0/2', '--out', out]);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    expect(bad.stderr).toMatch(/^landform: --shard '0\/2': shards count from 1/);
  });

  it('takes the shard from a Slurm array or a Kubernetes indexed job (real processes)', () => {
    const reference = join(dir, 'csv-n3', 'whole.shard-2-of-3.csv');
    // Element 11 of a Slurm job array --array=10-12 (SchedMD, Slurm documentation, "Job Array Support").
    const slurm = runCli(['diagrams', ...diagramArgs, '--out', join(dir, 'slurm', 'whole.csv')], {
      env: {
        ...noScheduler,
        SLURM_ARRAY_TASK_ID: '11',
        SLURM_ARRAY_TASK_COUNT: '3',
        SLURM_ARRAY_TASK_MIN: '10',
      },
    });
    expect(slurm.code, slurm.stderr).toBe(0);
    expect(slurm.stderr).toMatch(/shard 2\/3 \(from SLURM_ARRAY_TASK_ID=11\)/);
    expect(same(join(dir, 'slurm', 'whole.shard-2-of-3.csv'), reference)).toBe(true);
    // Pod 1 (from 0) of a Kubernetes Indexed Job (Kubernetes documentation, "Jobs", "Completion mode").
    const k8s = runCli(['diagrams', ...diagramArgs, '--out', join(dir, 'k8s', 'whole.csv')], {
      env: { ...noScheduler, JOB_COMPLETION_INDEX: '1', LANDFORM_SHARD_COUNT: '3' },
    });
    expect(k8s.code, k8s.stderr).toBe(0);
    expect(files(join(dir, 'k8s'))).toEqual([
      'whole.shard-2-of-3.csv',
      'whole.shard-2-of-3.csv.provenance.json',
    ]);
    expect(same(join(dir, 'k8s', 'whole.shard-2-of-3.csv'), reference)).toBe(true);
  });

  it('a merged diagrams file goes straight into evaluate', () => {
    const r = runCli(
      [
        'evaluate',
        join(dir, 'merged-7.csv'),
        '--folds',
        '3',
        '--models',
        'pca-svm',
        '--depths',
        '3',
        '--grid-sizes',
        '10',
        '--out',
        join(dir, 'study'),
      ],
      {
        env: noScheduler,
      },
    );
    expect(r.code, r.stderr).toBe(0);
    const metrics = JSON.parse(readFileSync(join(dir, 'study', 'metrics.json'), 'utf8')) as {
      classes: string[];
    };
    expect(metrics.classes).toEqual(['blob', 'pair', 'ring']);
  });
});

describe('interrupted shards leave no partial file', () => {
  it('a shard that fails part-way (a sample too short to embed) writes nothing', async () => {
    const dir = tempDir();
    const data = join(dir, 'pump.csv');
    // vib-0 … vib-5 in a shard of 1: the failing sample comes after the others have been computed.
    writeSignalCsv(data, 6, 'vib-5');
    const out = join(dir, 'out');
    const r = await landform([
      'diagrams',
      data,
      '--kind',
      'signal',
      '--embed',
      '3:2',
      '--degrees',
      '0,1',
      '--workers',
      '1',
      '--shard',
      '1/1',
      '--out',
      join(out, 'd.csv'),
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/too short/);
    expect(files(out)).toEqual([]);
  });

  it('a shard killed mid-run leaves neither output nor temporary file', async () => {
    const dir = tempDir();
    const data = join(dir, 'big.csv');
    // A few clouds of many points: slow enough that the kill lands while their diagrams are being computed.
    const rng = new Random(31);
    const lines = ['sample,label,x,y,z'];
    for (let s = 0; s < 4; s++)
      for (let k = 0; k < KILL_POINTS; k++)
        lines.push(`cloud-${s},c${s % 2},${rng.normal()},${rng.normal()},${rng.normal()}`);
    writeFileSync(data, lines.join('\n') + '\n');
    const out = join(dir, 'out');
    mkdirSync(out);
    const root = new URL('../../', import.meta.url).pathname;
    const args = [
      'diagrams',
      data,
      '--kind',
      'points',
      '--degrees',
      '0,1',
      '--workers',
      '1',
      '--shard',
      '1/1',
      '--out',
      join(out, 'd.csv'),
    ];
    const child = spawn(process.execPath, ['--import', 'tsx', join(root, 'src/cli/main.ts'), ...args], {
      env: { ...process.env, CI: 'true', ...noScheduler },
      stdio: ['ignore', 'ignore', 'pipe'],
    });
    let stderr = '';
    const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
    // The plan line is printed after loading, before any diagram is computed; kill a moment after it.
    await new Promise<void>((resolve) => {
      child.stderr!.on('data', (chunk: Buffer) => {
        stderr += chunk.toString();
        if (/shard 1\/1: 4 of 4 samples/.test(stderr)) {
          setTimeout(() => {
            child.kill('SIGKILL');
            resolve();
          }, 300);
        }
      });
      child.on('exit', () => resolve());
    });
    const code = await exited;
    expect(stderr).toMatch(/shard 1\/1: 4 of 4 samples/);
    // Killed, not finished: the clouds take well over the 300 ms.
    expect(code).toBeNull();
    expect(files(out)).toEqual([]);
    expect(statSync(data).isFile()).toBe(true);
  });
});

/** Points per cloud in the kill test. */
const KILL_POINTS = 1200;
