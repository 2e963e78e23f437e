import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const root = new URL('../../', import.meta.url).pathname;

export interface CliResult {
  code: number;
  stdout: string;
  stderr: string;
}

/** Runs `landform ARGS` from the TypeScript sources (through tsx), as a user would, in a fresh process. */
export function runCli(
  args: string[],
  options: { cwd?: string; env?: Record<string, string>; input?: string } = {},
): CliResult {
  const result = spawnSync(process.execPath, ['--import', 'tsx', join(root, 'src/cli/main.ts'), ...args], {
    cwd: options.cwd ?? root,
    env: { ...process.env, CI: 'true', ...options.env },
    input: options.input,
    encoding: 'utf8',
    maxBuffer: 1 << 28,
  });
  return { code: result.status ?? -1, stdout: result.stdout, stderr: result.stderr };
}

/** A new empty folder under the system's temporary folder. */
export function tempDir(prefix = 'landform-test-'): string {
  return mkdtempSync(join(tmpdir(), prefix));
}

/** The folder under which tests keep artefacts worth looking at (screenshots, reports). */
export const testOutput = join(root, 'test-output');

/** The completion line every writing command ends with (src/cli/finish.ts). */
export const COMPLETION_LINE =
  /^landform ([a-z]+): wrote (.+) \(([^,()]+), (\d+) samples?, (\d+\.\d s|\d+m\d\ds|\d+h\d\dm)\)$/;

/** Standard error without the completion line, for tests that check nothing else was said. */
export function withoutCompletion(stderr: string): string {
  return stderr
    .split(/(?<=\n)/)
    .filter((line) => !COMPLETION_LINE.test(line.replace(/\n$/, '')))
    .join('');
}

/** What `landform evaluate --no-report --out DIR` leaves in DIR, sorted (with the report: add 'report.html'). */
export const STUDY_FOLDER: readonly string[] = [
  '.landform-output.json',
  'folds.csv',
  'folds.csv.provenance.json',
  'metrics.json',
  'predictions.csv',
  'predictions.csv.provenance.json',
];
