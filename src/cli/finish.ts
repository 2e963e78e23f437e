/**
 * The one completion line of every command that writes a file or folder, on stderr (stdout keeps the data):
 *
 *   landform <command>: wrote <path> (<what>, <n> samples, <time>)
 *
 * `<what>` says what the output holds, in words without commas; `<time>` is the time since the process
 * started (`0.8 s`, `12.3 s`, `2m05s`). Nothing with --quiet, and nothing when the output went to standard
 * output (the data there says it all).
 */
export function completionLine(
  command: string,
  path: string,
  what: string,
  samples: number,
  seconds = performance.now() / 1000,
): string {
  return `landform ${command}: wrote ${path} (${what}, ${samples} sample${samples === 1 ? '' : 's'}, ${elapsed(seconds)})\n`;
}

/** Prints the completion line unless `quiet`. */
export function reportWritten(
  command: string,
  path: string,
  what: string,
  samples: number,
  quiet: boolean | undefined,
): void {
  if (quiet === true) return;
  process.stderr.write(completionLine(command, path, what, samples));
}

/** Seconds as the completion line shows them: one decimal under a minute, then minutes and seconds. */
export function elapsed(seconds: number): string {
  if (seconds < 59.95) return `${seconds.toFixed(1)} s`;
  const s = Math.round(seconds);
  if (s >= 3600) return `${Math.floor(s / 3600)}h${String(Math.floor((s % 3600) / 60)).padStart(2, '0')}m`;
  return `${Math.floor(s / 60)}m${String(s % 60).padStart(2, '0')}s`;
}
