/**
 * What a command's run returns, and the exit status read from it: a run
 * that ends without error is "done" (0), or, under --exit-status, reports
 * that it found nothing (3). Errors are thrown (TabsightError) and mapped to
 * their status at the top, in main.ts.
 */
import { ExitStatus, ExitStatusCode } from '../errors.js';

export interface Outcome {
  /** Whether the run found what --exit-status asks about (an association, a passing pair, a change); null when the command asks nothing. */
  found: boolean | null;
  /** --exit-status was given: finding nothing ends with status 3. */
  exitStatusWanted: boolean;
}

/** The outcome of a command that only writes (count, merge, sql, completion). */
export const DONE: Outcome = { found: null, exitStatusWanted: false };

export function statusOf(outcome: Outcome): ExitStatusCode {
  return outcome.exitStatusWanted && outcome.found === false ? ExitStatus.noAssociation : ExitStatus.ok;
}
