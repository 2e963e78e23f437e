import type { Command } from 'commander';

/** `landform inspect`: placeholder until its issue lands; refuses to run. */
export function defineInspect(program: Command): Command {
  return program
    .command('inspect')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform inspect' is not built yet");
    });
}
