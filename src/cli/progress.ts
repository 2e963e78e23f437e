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
