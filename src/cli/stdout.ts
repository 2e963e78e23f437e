import { UserError } from '../core/errors.js';

/**
 * Binary formats (NPY, Arrow) go to a file or a pipe, never to a terminal, where they would print as noise:
 * one line saying what to do instead.
 */
export function refuseBinaryOnTerminal(format: string, stream: { isTTY?: boolean } = process.stdout): void {
  if (stream.isTTY === true)
    throw new UserError(
      `${format} is binary and standard output is a terminal; give --out FILE, or pipe the output to a program`,
    );
}
