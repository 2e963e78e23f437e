import type { Command } from 'commander';

/** `landform landscape`: placeholder until its issue lands; refuses to run. */
export function defineLandscape(program: Command): Command {
  return program
    .command('landscape')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform landscape' is not built yet");
    });
}
