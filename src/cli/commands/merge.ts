import type { Command } from 'commander';

/** `landform merge`: placeholder until its issue lands; refuses to run. */
export function defineMerge(program: Command): Command {
  return program
    .command('merge')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform merge' is not built yet");
    });
}
