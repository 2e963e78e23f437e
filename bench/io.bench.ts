import { spawnSync } from 'node:child_process';
import { createWriteStream, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { packageRoot } from '../src/core/version.js';
import { type Figure, report } from './harness.js';

/**
 * Streaming load of a large points CSV. A file of LANDFORM_BENCH_IO_MB megabytes (default 300) is generated in
 * a temporary folder, then loaded in a fresh child process by `loadDataset`, beside two floors measured in the
 * same run: a child that only streams the file and counts its lines, and a child that runs csv-parse with the
 * loader's options and drops the records (the generated file has no quotes, so the loader reads it with its
 * plain reader; csv-parse is what it falls back to for quoted files). Reported: throughput (MB/s) and its ratio
 * to the floor, and peak resident memory against the numeric payload (8 bytes per value), with and without the
 * floor child's resident memory (Node itself and the read buffers).
 *
 * Goal (issue 4): memory near twice the numeric payload — peak RSS above the floor ≤ 2 × payload.
 */
const loadUrl = new URL('../src/io/load.js', import.meta.url).href;

interface ChildResult {
  ms: number;
  maxRssMB: number;
  lines?: number;
  samples?: number;
  values?: number;
}

function child(script: string, file: string): ChildResult {
  // Run from the package root, so that the child's bare imports (csv-parse) resolve as in the library.
  const r = spawnSync(process.execPath, ['--input-type=module', '-e', script, file], {
    cwd: packageRoot(),
    encoding: 'utf8',
    maxBuffer: 1 << 20,
  });
  if (r.status !== 0) throw new Error(`benchmark child failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').pop() as string) as ChildResult;
}

const FLOOR = `
import { createReadStream } from 'node:fs';
const t0 = performance.now();
let lines = 0;
for await (const chunk of createReadStream(process.argv[1], { highWaterMark: 1 << 20 })) {
  for (let i = 0; i < chunk.length; i++) if (chunk[i] === 10) lines++;
}
const ms = performance.now() - t0;
console.log(JSON.stringify({ ms, lines, maxRssMB: process.resourceUsage().maxRSS / 1024 }));
`;

const PARSE = `
import { createReadStream } from 'node:fs';
const { parse } = await import('csv-parse');
const { CSV_OPTIONS } = await import(${JSON.stringify(new URL('../src/io/csv.js', import.meta.url).href)});
const t0 = performance.now();
let lines = 0;
const p = createReadStream(process.argv[1], { highWaterMark: 1 << 16 }).pipe(parse(CSV_OPTIONS));
p.on('readable', () => { while (p.read() !== null) lines++; });
await new Promise((resolve) => p.on('end', resolve));
const ms = performance.now() - t0;
console.log(JSON.stringify({ ms, lines, maxRssMB: process.resourceUsage().maxRSS / 1024 }));
`;

const LOAD = `
const { loadDataset } = await import(${JSON.stringify(loadUrl)});
const t0 = performance.now();
const d = await loadDataset(process.argv[1]);
const ms = performance.now() - t0;
let values = 0;
for (const s of d.samples) values += s.coords.length;
console.log(JSON.stringify({ ms, samples: d.samples.length, values, maxRssMB: process.resourceUsage().maxRSS / 1024 }));
`;

/** Writes about `megabytes` MB of `sample,label,x,y,z` rows: clouds of 4,000 points, two labels. */
async function generate(path: string, megabytes: number): Promise<number> {
  const out = createWriteStream(path);
  const write = (text: string): Promise<void> =>
    new Promise((resolve) => {
      if (out.write(text)) resolve();
      else out.once('drain', () => resolve());
    });
  await write('sample,label,x,y,z\n');
  const target = megabytes * 1e6;
  let bytes = 0;
  let rows = 0;
  let seed = 12345;
  const next = (): number => {
    // A small linear congruential generator (Numerical Recipes constants, Press et al., 1992) — data only.
    seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
    return seed / 4294967296;
  };
  while (bytes < target) {
    let block = '';
    for (let i = 0; i < 5000; i++, rows++) {
      const sample = Math.floor(rows / 4000);
      block += `cloud-${sample},${sample % 2 === 0 ? 'ring' : 'disc'},${(next() * 20 - 10).toFixed(6)},${(next() * 20 - 10).toFixed(6)},${(next() * 2).toFixed(6)}\n`;
    }
    bytes += block.length;
    await write(block);
  }
  await new Promise<void>((resolve) => out.end(resolve));
  return rows;
}

export async function run(): Promise<void> {
  const megabytes = Number(process.env.LANDFORM_BENCH_IO_MB ?? 300);
  const dir = mkdtempSync(join(tmpdir(), 'landform-bench-io-'));
  try {
    const file = join(dir, 'clouds.csv');
    const rows = await generate(file, megabytes);
    const size = statSync(file).size;
    const floor = child(FLOOR, file);
    const parsed = child(PARSE, file);
    const load = child(LOAD, file);
    if (floor.lines !== rows + 1) throw new Error(`floor counted ${floor.lines} lines, expected ${rows + 1}`);
    if (load.values !== rows * 3) throw new Error(`loader read ${load.values} values, expected ${rows * 3}`);
    const payloadMB = (load.values * 8) / 1e6;
    const sizeMB = size / 1e6;
    const floorMBs = sizeMB / (floor.ms / 1000);
    const loadMBs = sizeMB / (load.ms / 1000);
    const parseMBs = sizeMB / (parsed.ms / 1000);
    const above = load.maxRssMB * 1.048576 - floor.maxRssMB * 1.048576;
    const figures: Figure[] = [
      { name: `file size (${rows} rows, ${load.samples} clouds)`, value: sizeMB, unit: 'MB' },
      { name: 'numeric payload (8 bytes a value)', value: payloadMB, unit: 'MB' },
      { name: 'floor: stream the file and count lines', value: floorMBs, unit: 'MB/s' },
      { name: 'csv-parse alone, same options (records, no numbers)', value: parseMBs, unit: 'MB/s' },
      { name: 'loadDataset (plain reader: no quotes; per-sample buffers)', value: loadMBs, unit: 'MB/s' },
      { name: 'load throughput / line-count floor', value: loadMBs / floorMBs, unit: '×' },
      { name: 'load throughput / csv-parse alone', value: loadMBs / parseMBs, unit: '×' },
      { name: 'peak RSS, floor child', value: floor.maxRssMB * 1.048576, unit: 'MB' },
      { name: 'peak RSS, loading child', value: load.maxRssMB * 1.048576, unit: 'MB' },
      { name: 'peak RSS / payload', value: (load.maxRssMB * 1.048576) / payloadMB, unit: '×' },
      {
        name: 'peak RSS above the floor / payload',
        value: above / payloadMB,
        unit: '×',
        goal: '≤ 2',
        met: above / payloadMB <= 2,
      },
    ];
    report(`io: streaming load of a ${Math.round(sizeMB)} MB points CSV`, figures);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) await run();
