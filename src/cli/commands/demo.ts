import type { Command } from 'commander';

/** `landform demo`: placeholder until its issue lands; refuses to run. */
export function defineDemo(program: Command): Command {
  return program
    .command('demo')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform demo' is not built yet");
    });
}
