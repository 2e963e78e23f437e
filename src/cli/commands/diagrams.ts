import type { Command } from 'commander';

/** `landform diagrams`: placeholder until its issue lands; refuses to run. */
export function defineDiagrams(program: Command): Command {
  return program
    .command('diagrams')
    .description('(not yet available)')
    .allowUnknownOption()
    .allowExcessArguments()
    .action(() => {
      throw new Error("'landform diagrams' is not built yet");
    });
}
