import type { Command } from 'commander';

interface DatasetsOptions {
  out: string;
  only?: string;
  force?: boolean;
  quiet?: boolean;
}

/**
 * `landform datasets [--out datasets] [--only NAME]`: writes the shipped demo datasets from their seeded
 * generators, byte for byte the same on every run, all files in one atomic step.
 */
export function defineDatasets(program: Command): Command {
  return program
    .command('datasets')
    .description('write the synthetic demo datasets (lattice, pump, field) from their seeded generators')
    .option('--out <folder>', 'folder to write them into', 'datasets')
    .option('--only <names>', 'comma-separated dataset names to write (default: all)')
    .option('--force', 'write into a non-empty folder holding other files than the datasets')
    .addHelpText('after', '\nExample:\n  npx landform datasets --only pump --out demo-data')
    .action(async (options: DatasetsOptions) => {
      const { join } = await import('node:path');
      const { parseListOption } = await import('../options.js');
      const { SCENARIOS, datasetsReadme } = await import('../../demo/scenarios/index.js');
      const { writeFilesAtomic } = await import('../../io/atomic.js');
      const names = SCENARIOS.map((s) => s.name);
      const chosen = options.only === undefined ? names : parseListOption(options.only, '--only', names);
      // The datasets' own top-level names: a folder holding only those (this repository's datasets/) is ours.
      const { checkOutputPath } = await import('../../io/output-guard.js');
      const known = SCENARIOS.map((s) => s.path.split('/')[0]);
      checkOutputPath(options.out, [], {
        folder: true,
        force: options.force === true,
        known: [...known, 'README.md'],
        addsFiles: true,
      });
      const files: Array<{ path: string; data: string | Uint8Array }> = [];
      const lines: string[] = [];
      let total = 0;
      for (const scenario of SCENARIOS) {
        if (!chosen.includes(scenario.name)) continue;
        const own = scenario.files();
        for (const f of own) files.push({ path: join(options.out, f.path), data: f.data });
        const samples = scenario.samples();
        total += samples.length;
        lines.push(
          `${scenario.name.padEnd(8)} ${scenario.kind.padEnd(7)} ${String(samples.length).padStart(4)} samples  ${join(options.out, scenario.path)}`,
        );
      }
      if (chosen.length === names.length)
        files.push({ path: join(options.out, 'README.md'), data: datasetsReadme() });
      writeFilesAtomic(files);
      process.stdout.write(`${lines.join('\n')}\n`);
      const { reportWritten } = await import('../finish.js');
      const what = `${chosen.length} demo dataset${chosen.length === 1 ? '' : 's'}`;
      reportWritten('datasets', options.out, what, total, options.quiet);
    });
}
