import { coreCount } from '../core/budgets.js';
import { type InfinitePolicy, parseInfinitePolicy } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
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
    if (!(allowed as readonly string[]).includes(p)) {
      throw new UserError(`${option} '${p}' is not known; choose from ${allowed.join(', ')}`);
    }
  }
  return [...new Set(parts)] as T[];
}

export function parseChoiceOption<T extends string>(text: string, option: string, allowed: readonly T[]): T {
  if (!(allowed as readonly string[]).includes(text)) {
    throw new UserError(`${option} '${text}' is not known; choose from ${allowed.join(', ')}`);
  }
  return text as T;
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
