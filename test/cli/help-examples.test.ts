import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { COMMANDS } from '../../src/cli/commands/index.js';
import { runCli } from '../helpers/cli.js';

const root = new URL('../../', import.meta.url).pathname;

/** Options whose value names something the example writes (exempt: it need not exist beforehand). */
const OUTPUT_OPTIONS = new Set(['--out', '--save']);
/** Options whose value looks like a path but is not one (a shard I/N). */
const NOT_PATHS = new Set(['--shard']);

/** The example lines of a help text: every line under an "Example:" or "Examples:" heading. */
function exampleLines(help: string): string[] {
  const lines = help.split('\n');
  const out: string[] = [];
  let inside = false;
  for (const line of lines) {
    if (/^Examples?:/.test(line.trim())) {
      inside = true;
      continue;
    }
    if (inside && line.trim() === '') {
      inside = false;
      continue;
    }
    if (inside) out.push(line.trim());
  }
  return out;
}

/** Path-like arguments of one example line (before a pipe or comment), and the outputs it names. */
function pathArguments(line: string): { inputs: string[]; outputs: string[] } {
  const words = line.split(/\s+/);
  const inputs: string[] = [];
  const outputs: string[] = [];
  for (let i = 0; i < words.length; i++) {
    const w = words[i];
    if (w === '|' || w.startsWith('#')) break;
    if (w.startsWith('-')) {
      const value = words[i + 1];
      if (value !== undefined && !value.startsWith('-')) {
        if (OUTPUT_OPTIONS.has(w)) outputs.push(value);
        else if (!NOT_PATHS.has(w) && looksLikePath(value)) inputs.push(value);
        i++;
      }
      continue;
    }
    if (looksLikePath(w)) inputs.push(w);
  }
  return { inputs, outputs };
}

function looksLikePath(word: string): boolean {
  return word.includes('/') || /\.(csv|npy|arrow|json|html|pgm|png|gz)$/i.test(word);
}

describe('help examples', () => {
  it('finds the paths of an example line (the extractor itself)', () => {
    expect(
      pathArguments('npx landform merge out/d.shard-*-of-7.csv --shard 2/7 --grid 0:1:5 --out d.csv | head'),
    ).toEqual({ inputs: ['out/d.shard-*-of-7.csv'], outputs: ['d.csv'] });
    expect(exampleLines('x\nExamples:\n  npx landform a b.csv\n  npx landform c\n\nmore')).toEqual([
      'npx landform a b.csv',
      'npx landform c',
    ]);
  });

  for (const name of ['', ...COMMANDS.map((c) => c.name)]) {
    it(`'landform ${name} --help' names only files the repository ships (or that its examples write)`, () => {
      const run = runCli(name === '' ? ['--help'] : [name, '--help']);
      expect(run.code).toBe(0);
      const lines = exampleLines(run.stdout);
      expect(lines.length, `no examples in 'landform ${name} --help'`).toBeGreaterThan(0);
      const written: string[] = [];
      for (const line of lines) {
        // The command as a fresh clone runs it (see README: npx, or npm link for the bare command).
        expect(line).toMatch(/^npx landform /);
        const { inputs, outputs } = pathArguments(line);
        for (const input of inputs) {
          const fromEarlier = written.some((out) => {
            const stem = out.replace(/\.[a-z]+$/i, '');
            return input === out || input.startsWith(`${stem}.`) || input.startsWith(`${out}/`);
          });
          expect(
            fromEarlier || existsSync(join(root, input)),
            `'${input}' in 'landform ${name} --help' does not exist in the repository`,
          ).toBe(true);
        }
        written.push(...outputs);
      }
    });
  }
});
