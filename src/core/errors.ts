/**
 * One error type for the user's mistakes. The CLI prints it as one line,
 * `landform: <file>:<line>: <message>`, and exits with code 2. Anything else is a bug (exit 1).
 */
export class UserError extends Error {
  readonly file?: string;
  readonly line?: number;

  constructor(message: string, where: { file?: string; line?: number } = {}) {
    super(message);
    this.name = 'UserError';
    this.file = where.file;
    this.line = where.line;
  }

  /** The one line shown to the user (without the `landform: ` prefix). */
  describe(): string {
    const parts: string[] = [];
    if (this.file !== undefined)
      parts.push(this.line !== undefined ? `${this.file}:${this.line}` : this.file);
    parts.push(this.message);
    return parts.join(': ');
  }
}

export function isUserError(error: unknown): error is UserError {
  return error instanceof UserError;
}

/** Throws a UserError unless `condition` holds. */
export function ensure(
  condition: unknown,
  message: string,
  where?: { file?: string; line?: number },
): asserts condition {
  if (!condition) throw new UserError(message, where);
}
