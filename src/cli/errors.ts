/**
 * An expected failure the user can fix (bad arguments, bad file): the message is printed without a
 * stack and `exitCode` becomes the process exit status. Anything else thrown is a bug and is
 * printed with its stack by the bin.
 */
export class UserError extends Error {
  /** Exit status for a failed requirement check. */
  static readonly FAIL = 1;
  /** Exit status for bad arguments or a bad plant file. */
  static readonly USAGE = 2;

  readonly exitCode: number;

  constructor(message: string, exitCode: number = UserError.USAGE) {
    super(message);
    this.name = 'UserError';
    this.exitCode = exitCode;
  }
}
