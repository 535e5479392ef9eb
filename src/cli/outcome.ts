/**
 * What a command's run returns, and the exit status read from it: a run
 * that ends without error is "done" (0), or, under --exit-status, reports
 * that it found nothing (3), or, when the report could not decide, fails
 * with its reason (1). Errors are thrown (TabsightError) and mapped to
 * their status at the top, in main.ts.
 */
import { dataError, ExitStatus, ExitStatusCode } from '../errors.js';

export interface Outcome {
  /** Whether the run found what --exit-status asks about (an association, a passing pair, a change); null when the command asks nothing. */
  found: boolean | null;
  /** --exit-status was given: finding nothing ends with status 3. */
  exitStatusWanted: boolean;
  /**
   * Why the report could not decide what --exit-status asks (periods with no
   * level in common, a change that cannot be tested); null or absent when it
   * decided. Under --exit-status such a run ends with status 1 and this
   * reason in one line, never 0 or 3: neither answer would be true.
   */
  undecided?: string | null;
}

/** The outcome of a command that only writes (count, merge, sql, completion). */
export const DONE: Outcome = { found: null, exitStatusWanted: false };

export function statusOf(outcome: Outcome): ExitStatusCode {
  if (outcome.exitStatusWanted && outcome.undecided) throw dataError(`--exit-status has no answer: ${outcome.undecided}`);
  return outcome.exitStatusWanted && outcome.found === false ? ExitStatus.noAssociation : ExitStatus.ok;
}
