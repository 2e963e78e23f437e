import { coreCount } from '../core/budgets.js';
import { type InfinitePolicy, parseInfinitePolicy } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import { shown } from '../core/text.js';
import { isDecimalText } from '../io/csv.js';

/** Parsers for option values; each throws the one-line user error naming the option. */

export function parseIntegerOption(
  text: string,
  option: string,
  min = Number.MIN_SAFE_INTEGER,
  max = Number.MAX_SAFE_INTEGER,
): number {
  const value = Number(text);
  if (!/^[+-]?\d+$/.test(text.trim()) || value < min || value > max) {
    const range = max === Number.MAX_SAFE_INTEGER ? `at least ${min}` : `from ${min} to ${max}`;
    throw new UserError(`${option} '${text}' is not a whole number ${range}`);
  }
  return value;
}

/**
 * `--workers N`: a whole number from 1 to `max`, capped at the machine's cores (os.availableParallelism()),
 * with one line on stderr unless `quiet`. Capped rather than refused: threads beyond the cores add no speed,
 * only memory (each holds its own heap and two samples), and a script may pass one count to machines of
 * different sizes; the run is the same either way, only slower or faster.
 */
export function parseWorkersOption(text: string, quiet: boolean, max = 1024): number {
  const wanted = parseIntegerOption(text, '--workers', 1, max);
  const cores = coreCount();
  if (wanted <= cores) return wanted;
  if (!quiet) {
    process.stderr.write(
      `landform: --workers ${wanted} is more than the ${cores} core${cores === 1 ? '' : 's'} of this machine; using ${cores}\n`,
    );
  }
  return cores;
}

export function parseNumberOption(
  text: string,
  option: string,
  check?: { positive?: boolean; min?: number; max?: number },
): number {
  const value = Number(text);
  if (!isDecimalText(text.trim()) || !Number.isFinite(value))
    throw new UserError(`${option} '${text}' is not a finite decimal number`);
  if (check?.positive && !(value > 0)) throw new UserError(`${option} '${text}' must be greater than 0`);
  if (check?.min !== undefined && value < check.min)
    throw new UserError(`${option} '${text}' must be at least ${check.min}`);
  if (check?.max !== undefined && value > check.max)
    throw new UserError(`${option} '${text}' must be at most ${check.max}`);
  return value;
}

/** `0,1,2` → [0, 1, 2] (sorted, unique), each within [0, max]. */
export function parseDegreesOption(text: string, option = '--degrees', max = 2): number[] {
  const parts = text.split(',').map((s) => s.trim());
  const degrees = parts.map((p) => parseIntegerOption(p, option, 0, max));
  return [...new Set(degrees)].sort((a, b) => a - b);
}

/** `a,b,c` → ['a','b','c'], each one of `allowed`. */
export function parseListOption<T extends string>(text: string, option: string, allowed: readonly T[]): T[] {
  const parts = text
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '');
  if (parts.length === 0) throw new UserError(`${option} is empty; choose from ${allowed.join(', ')}`);
  for (const p of parts) {
    if (!(allowed as readonly string[]).includes(p)) throw unknownValue(option, p, allowed);
  }
  return [...new Set(parts)] as T[];
}

export function parseChoiceOption<T extends string>(text: string, option: string, allowed: readonly T[]): T {
  if (!(allowed as readonly string[]).includes(text)) throw unknownValue(option, text, allowed);
  return text as T;
}

/**
 * The one-line refusal of a value that is not among `allowed`: `--model 'pca-svn' is not known (did you mean
 * pca-svm?); choose from pca-svm, dense, forest` (the suggestion only when a known value is close).
 */
export function unknownValue(option: string, value: string, allowed: readonly string[]): UserError {
  const close = closestNames(value, allowed);
  const hint = close.length === 0 ? '' : ` (did you mean ${close.join(' or ')}?)`;
  return new UserError(`${option} '${shown(value)}' is not known${hint}; choose from ${allowed.join(', ')}`);
}

/**
 * The known names closest to `word` by edit distance (insertions, deletions, substitutions and swaps of
 * two neighbours, each counting 1; the optimal string alignment distance): those at the smallest distance,
 * if it is at most 3 and at least 40 % of the longer name is kept. Common practice, no source: the same
 * rule commander applies to unknown options and commands, so values and options are suggested alike.
 */
export function closestNames(word: string, known: readonly string[]): string[] {
  let best = 4;
  let found: string[] = [];
  for (const name of new Set(known)) {
    if (name.length <= 1) continue;
    const d = editDistance(word, name);
    const length = Math.max(word.length, name.length);
    if ((length - d) / length <= 0.4 || d > best) continue;
    if (d < best) {
      best = d;
      found = [name];
    } else found.push(name);
  }
  return found;
}

/** Optimal string alignment distance between two short strings. */
export function editDistance(a: string, b: string): number {
  const rows = a.length + 1;
  const cols = b.length + 1;
  const d = new Uint16Array(rows * cols);
  for (let i = 0; i < rows; i++) d[i * cols] = i;
  for (let j = 0; j < cols; j++) d[j] = j;
  for (let i = 1; i < rows; i++) {
    for (let j = 1; j < cols; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let v = Math.min(d[(i - 1) * cols + j] + 1, d[i * cols + j - 1] + 1, d[(i - 1) * cols + j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1])
        v = Math.min(v, d[(i - 2) * cols + j - 2] + 1);
      d[i * cols + j] = v;
    }
  }
  return d[rows * cols - 1];
}

/**
 * An option renamed in this release: the old flag stays accepted, hidden from help, for one release. Reads
 * the value given under either name; the old one prints one note on stderr (not with --quiet); both at
 * once is refused.
 */
export function renamedOption(
  opts: object,
  names: { key: string; flag: string; oldKey: string; oldFlag: string },
): string | undefined {
  const given = opts as Record<string, unknown>;
  const value = given[names.key] as string | undefined;
  const old = given[names.oldKey] as string | undefined;
  if (old === undefined) return value;
  if (value !== undefined)
    throw new UserError(`${names.oldFlag} is the old name of ${names.flag}; give ${names.flag} only`);
  if (given.quiet !== true)
    process.stderr.write(
      `landform: note: ${names.oldFlag} is now ${names.flag}; the old name will be removed in the next release\n`,
    );
  return old;
}

/** `START:STOP:COUNT` → a grid with COUNT ≥ 2 points and START < STOP. */
export function parseGridOption(
  text: string,
  option = '--grid',
): { start: number; stop: number; count: number } {
  const parts = text.split(':');
  if (parts.length !== 3)
    throw new UserError(`${option} '${text}' must look like START:STOP:COUNT, e.g. 0:2:100`);
  const start = parseNumberOption(parts[0], `${option} start`);
  const stop = parseNumberOption(parts[1], `${option} stop`);
  const count = parseIntegerOption(parts[2], `${option} count`, 2, 1_000_000);
  if (!(stop > start)) throw new UserError(`${option} '${text}': STOP must be greater than START`);
  return { start, stop, count };
}

export function parseInfiniteOption(text: string, option = '--infinite'): InfinitePolicy {
  const policy = parseInfinitePolicy(text);
  if (!policy) throw new UserError(`${option} '${text}' must be 'drop' or 'clip:VALUE' with a finite VALUE`);
  return policy;
}
