/**
 * The one error type for failures a user can act on. It carries the exit
 * status and a one-line message; the CLI prints the message once and exits.
 * Anything else thrown is a bug.
 */
export const ExitStatus = {
  ok: 0,
  /** The data cannot be read or analysed (unknown file, malformed CSV, one-level column). */
  dataError: 1,
  /** Bad usage: unknown option, unknown column, invalid option value. */
  usageError: 2,
  /** With --exit-status: the run succeeded and found no association at --alpha. */
  noAssociation: 3,
} as const;

export type ExitStatusCode = (typeof ExitStatus)[keyof typeof ExitStatus];

export class TabsightError extends Error {
  readonly exitStatus: ExitStatusCode;
  /**
   * The message is kept as given (it may echo the data: a file name, a
   * column name, a value); it becomes one line where it is printed, with
   * every control character shown and its length bounded
   * (src/escape/terminal.ts, messageLine).
   */
  constructor(message: string, exitStatus: ExitStatusCode = ExitStatus.dataError) {
    super(message);
    this.name = 'TabsightError';
    this.exitStatus = exitStatus;
  }
}

export function usageError(message: string): TabsightError {
  return new TabsightError(message, ExitStatus.usageError);
}

export function dataError(message: string): TabsightError {
  return new TabsightError(message, ExitStatus.dataError);
}
