import type { Command } from 'commander';

/** `landform vectorize`: placeholder until its issue lands; refuses to run. */
export function defineVectorize(program: Command): Command {
  return program
    .command('vectorize')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform vectorize' is not built yet");
    });
}
