#!/usr/bin/env node
import { realpathSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Command, CommanderError } from 'commander';
import { isUserError } from '../core/errors.js';
import { version } from '../core/version.js';
import { COMMANDS } from './commands/index.js';

/**
 * The `landform` command: a thin shell over the library. Each subcommand lives in `commands/<name>.ts`,
 * defines its options there and loads the heavy parts of the library only inside its action.
 */
export async function buildProgram(only?: string): Promise<Command> {
  const program = new Command('landform')
    .description('Topological features and validated classifiers from labelled samples.')
    .version(version(), '-V, --version')
    .showHelpAfterError(false)
    .showSuggestionAfterError(true)
    .exitOverride()
    .addHelpText(
      'after',
      `
In a clone, run the command as 'npx landform …' (or 'npm link' once for a bare 'landform').

Examples:
  npx landform demo --quick --out results/demo
  npx landform inspect datasets/lattice.csv
  npx landform evaluate datasets/lattice.csv --out results/lattice`,
    );
  // One command's module when `only` names one (loading every command's took about 0.1 s per run).
  const named = COMMANDS.filter((c) => c.name === only);
  const defines = await Promise.all((named.length > 0 ? named : COMMANDS).map((c) => c.load()));
  for (const define of defines) {
    const sub = define(program);
    sub.option('--quiet', 'no progress bar').option('--debug', 'show stack traces of errors').exitOverride();
  }
  return program;
}

export async function main(argv: string[]): Promise<number> {
  const program = await buildProgram(argv[0]);
  let commanderMessage = '';
  const capture = {
    writeErr: (s: string) => {
      commanderMessage += s;
    },
    outputError: (s: string) => {
      commanderMessage += s;
    },
  };
  program.configureOutput(capture);
  for (const sub of program.commands) sub.configureOutput(capture);
  const debug = argv.includes('--debug');
  try {
    await program.parseAsync(argv, { from: 'user' });
    return 0;
  } catch (error) {
    if (error instanceof CommanderError) {
      if (
        error.code === 'commander.helpDisplayed' ||
        error.code === 'commander.version' ||
        error.code === 'commander.help'
      ) {
        if (commanderMessage) process.stdout.write(commanderMessage);
        return 0;
      }
      if (error.exitCode === 0) return 0;
      process.stderr.write(commanderErrorLine(commanderMessage || error.message, program, argv));
      return 2;
    }
    if (isUserError(error)) {
      process.stderr.write(`landform: ${error.describe().replace(/\r?\n/g, ' ')}\n`);
      if (debug && error.stack) process.stderr.write(error.stack + '\n');
      return 2;
    }
    const system = systemErrorLine(error);
    if (system !== undefined) {
      process.stderr.write(`landform: ${system}\n`);
      if (debug && (error as Error).stack) process.stderr.write((error as Error).stack + '\n');
      return 2;
    }
    const e = error as Error;
    process.stderr.write(
      `landform: internal error: ${e?.message ?? String(error)}. This is a bug in landform; please report it with the command you ran${debug ? '' : ' (add --debug for details)'}.\n`,
    );
    if (debug && e?.stack) process.stderr.write(e.stack + '\n');
    return 1;
  }
}

/**
 * Commander's error as our one line: `landform: unknown option '--grid-sise' (did you mean --grid-size?); see
 * 'landform vectorize --help'`. Commander puts its suggestion ("(Did you mean …?)", edit distance over the
 * visible names) on a second line; it is folded into the one line here, so it is not lost.
 */
export function commanderErrorLine(message: string, program: Command, argv: readonly string[]): string {
  const lines = message
    .split('\n')
    .map((l) => l.trim())
    .filter((l) => l !== '');
  const first = lines[0] ?? message;
  const suggestion = lines.map((l) => /^\(Did you mean (.+)\?\)$/.exec(l)).find((m) => m !== null);
  const sub = program.commands.find((c) => c.name() === argv[0]);
  const what = first.replace(/^error:\s*/, '').replace(/\.\s*$/, '');
  const hint = suggestion
    ? ` (did you mean ${suggestion[1].replace(/^one of /, '').replace(/, /g, ' or ')}?)`
    : '';
  return `landform: ${what}${hint}; see 'landform ${sub ? `${sub.name()} ` : ''}--help'\n`;
}

/**
 * A file-system refusal (no such file or folder, no permission, disk full, read-only) is about the user's
 * paths or machine, not a bug: one line naming the path, exit 2.
 */
function systemErrorLine(error: unknown): string | undefined {
  const e = error as { code?: unknown; path?: unknown; syscall?: unknown };
  if (typeof e?.code !== 'string') return undefined;
  if (typeof e.path !== 'string') {
    // A failed write on an open file carries no path: say what happened, without a trace.
    if (e.code === 'ENOSPC' || e.code === 'EDQUOT') return 'cannot write: disk full (or over quota)';
    if (e.code === 'EPIPE') return 'cannot write: the reading end of a pipe was closed';
    return undefined;
  }
  const reasons: Record<string, string> = {
    ENOENT: 'no such file or folder; check the path',
    EACCES: 'permission denied; choose a path you may write or read',
    EPERM: 'operation not permitted; choose another path',
    ENOTDIR: 'a part of the path is a file, not a folder; check the path',
    EISDIR: 'is a folder where a file was expected; give a file name',
    ENOSPC: 'no space left on the device; free some space or write elsewhere',
    EROFS: 'the file system is read-only; write elsewhere',
    EEXIST: 'is in the way (a file where a folder is needed, or the reverse); move it or choose another path',
    ENAMETOOLONG: 'the path is too long; choose a shorter one',
    EMFILE: 'too many open files; raise the limit (ulimit -n) or load fewer files at once',
  };
  const reason = reasons[e.code];
  return reason === undefined ? undefined : `${e.path}: ${reason}`;
}

/**
 * Standard output or error that cannot take more. A reader that stops early (`landform … | head -1`) closes
 * the pipe: the run ends at once, silently (the reader asked for no more, so no message), with exit code 2 —
 * not 0, because not everything was delivered, so a script with `set -o pipefail` still sees it, as it
 * would see the conventional death by SIGPIPE, which Node does not die of. A full disk or another write
 * failure on standard output is one line on standard error and exit 2.
 */
export function outputStreamFailure(
  stream: 'stdout' | 'stderr',
  error: NodeJS.ErrnoException,
): string | undefined {
  if (error.code === 'EPIPE' || error.code === 'ECONNRESET') return undefined;
  const where = stream === 'stdout' ? 'standard output' : 'standard error';
  if (error.code === 'ENOSPC' || error.code === 'EDQUOT' || error.code === 'EFBIG')
    return `landform: cannot write ${where}: disk full (or over quota)\n`;
  return `landform: cannot write ${where}: ${error.code ?? error.message}\n`;
}

function handleOutputStreams(): void {
  for (const name of ['stdout', 'stderr'] as const) {
    process[name].on('error', (error: NodeJS.ErrnoException) => {
      const line = outputStreamFailure(name, error);
      if (line !== undefined && name === 'stdout') {
        try {
          process.stderr.write(line);
        } catch {
          // standard error is gone too: the exit code is all that is left
        }
      }
      process.exit(2);
    });
  }
}

function isEntryPoint(): boolean {
  if (!process.argv[1]) return false;
  try {
    return realpathSync(process.argv[1]) === realpathSync(fileURLToPath(import.meta.url));
  } catch {
    return false;
  }
}

if (isEntryPoint()) {
  handleOutputStreams();
  main(process.argv.slice(2)).then(
    (code) => {
      process.exitCode = code;
    },
    (error) => {
      process.stderr.write(
        `landform: internal error: ${String(error)}. This is a bug in landform; please report it.\n`,
      );
      process.exitCode = 1;
    },
  );
}
