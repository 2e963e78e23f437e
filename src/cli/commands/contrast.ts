import type { Command } from 'commander';

/** `landform contrast`: placeholder until its issue lands; refuses to run. */
export function defineContrast(program: Command): Command {
  return program
    .command('contrast')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform contrast' is not built yet");
    });
}
