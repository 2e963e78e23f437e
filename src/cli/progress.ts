import { performance } from 'node:perf_hooks';
import { UserError } from '../core/errors.js';

/**
 * Progress for long work: a bar on a terminal, nothing in pipes, in CI or with --quiet.
 * The library reports progress through `(done, total) => void` callbacks; this turns them into a bar.
 */
export interface Progress {
  update(done: number, total?: number): void;
  stop(): void;
}

const silent: Progress = { update() {}, stop() {} };

export function progressWanted(quiet: boolean): boolean {
  return !quiet && process.stderr.isTTY === true && !process.env.CI;
}

export async function startProgress(label: string, total: number, quiet: boolean): Promise<Progress> {
  if (!progressWanted(quiet)) return silent;
  const { default: cliProgress } = await import('cli-progress');
  const bar = new cliProgress.SingleBar(
    {
      format: `${label} [{bar}] {percentage}% | {value}/{total} | {duration_formatted}`,
      stream: process.stderr,
      hideCursor: true,
      clearOnComplete: true,
    },
    cliProgress.Presets.shades_classic,
  );
  bar.start(total, 0);
  return {
    update(done: number, newTotal?: number) {
      if (newTotal !== undefined) bar.setTotal(newTotal);
      bar.update(done);
    },
    stop() {
      bar.stop();
    },
  };
}

/**
 * How long work shows progress. 'auto' (the default): a bar on a terminal, nothing in pipes, in CI or with
 * --quiet. 'lines': plain lines on stderr wherever it goes — a line when a phase starts and ends, and at
 * most one every `every` seconds in between, each with done/total and an estimate of the time left — for
 * batch jobs and CI logs that want to see a long study move. 'none': nothing.
 */
export type ProgressMode = 'auto' | 'lines' | 'none';
export const PROGRESS_MODES: readonly ProgressMode[] = ['auto', 'lines', 'none'];

/** The mode from --progress, else the LANDFORM_PROGRESS environment variable, else 'auto'. */
export function parseProgressMode(
  option: string | undefined,
  env: NodeJS.ProcessEnv = process.env,
): ProgressMode {
  const fromEnv = env.LANDFORM_PROGRESS;
  const text = option ?? (fromEnv === undefined || fromEnv === '' ? 'auto' : fromEnv);
  if ((PROGRESS_MODES as readonly string[]).includes(text)) return text as ProgressMode;
  const where = option === undefined ? 'LANDFORM_PROGRESS' : '--progress';
  throw new UserError(`${where} must be one of ${PROGRESS_MODES.join(', ')}, got '${text}'`);
}

/** Progress over named phases (e.g. diagrams, inner CV, outer folds, report). */
export interface PhaseProgress {
  /** `done` of `total` units of `phase` are finished (a new name starts a new phase). */
  update(phase: string, done: number, total: number): void;
  stop(): void;
}

export interface PhaseProgressOptions {
  /** Seconds between two lines within a phase ('lines'). Default 10. */
  every?: number;
  /** Milliseconds now (for tests). Default performance.now. */
  now?: () => number;
  /** Where lines go (for tests). Default stderr. */
  write?: (text: string) => void;
}

/** "1h02m", "3m05s", "42s". */
export function formatDuration(seconds: number): string {
  const s = Math.max(0, Math.round(seconds));
  if (s >= 3600) return `${Math.floor(s / 3600)}h${String(Math.floor((s % 3600) / 60)).padStart(2, '0')}m`;
  if (s >= 60) return `${Math.floor(s / 60)}m${String(s % 60).padStart(2, '0')}s`;
  return `${s}s`;
}

/** The phase line printer of `--progress lines` (pure apart from `now` and `write`). */
export function phaseLines(options: PhaseProgressOptions = {}): PhaseProgress {
  const every = (options.every ?? 10) * 1000;
  const now = options.now ?? (() => performance.now());
  const write = options.write ?? ((text: string) => process.stderr.write(text));
  let current: string | undefined;
  let started = 0;
  let lastLine = 0;
  let finished = false;
  const line = (phase: string, done: number, total: number) => {
    const t = now();
    const elapsed = (t - started) / 1000;
    const percent = total > 0 ? Math.floor((100 * done) / total) : 100;
    let tail = `${formatDuration(elapsed)} elapsed`;
    if (done >= total) tail = `done in ${formatDuration(elapsed)}`;
    else if (done > 0) tail += `, about ${formatDuration((elapsed * (total - done)) / done)} left`;
    write(`landform: ${phase} ${done}/${total} (${percent}%), ${tail}\n`);
    lastLine = t;
  };
  return {
    update(phase, done, total) {
      if (phase !== current) {
        current = phase;
        started = now();
        finished = false;
        line(phase, done, total);
        if (done >= total) finished = true;
        return;
      }
      if (finished) return;
      if (done >= total) {
        finished = true;
        line(phase, done, total);
      } else if (now() - lastLine >= every) line(phase, done, total);
    },
    stop() {},
  };
}

/** Phase progress in the given mode (see ProgressMode); 'auto' draws a bar per phase on a terminal. */
export async function startPhases(
  mode: ProgressMode,
  quiet: boolean,
  options: PhaseProgressOptions = {},
): Promise<PhaseProgress> {
  if (quiet || mode === 'none') return { update() {}, stop() {} };
  if (mode === 'lines') return phaseLines(options);
  if (!progressWanted(false)) return { update() {}, stop() {} };
  const { default: cliProgress } = await import('cli-progress');
  let bar: InstanceType<typeof cliProgress.SingleBar> | undefined;
  let current: string | undefined;
  return {
    update(phase, done, total) {
      if (phase !== current) {
        bar?.stop();
        current = phase;
        bar = new cliProgress.SingleBar(
          {
            format: `${phase.padEnd(11)} [{bar}] {percentage}% | {value}/{total} | {duration_formatted} | ETA {eta_formatted}`,
            stream: process.stderr,
            hideCursor: true,
            clearOnComplete: true,
            etaBuffer: 20,
          },
          cliProgress.Presets.shades_classic,
        );
        bar.start(total, done);
        return;
      }
      bar?.setTotal(total);
      bar?.update(done);
      // A finished phase clears its bar at once, so lines printed between phases are not drawn over.
      if (done >= total) {
        bar?.stop();
        bar = undefined;
      }
    },
    stop() {
      bar?.stop();
    },
  };
}
