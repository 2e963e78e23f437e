import type { Command } from 'commander';

/** `landform distance`: placeholder until its issue lands; refuses to run. */
export function defineDistance(program: Command): Command {
  return program
    .command('distance')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform distance' is not built yet");
    });
}
