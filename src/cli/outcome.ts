import { ExitStatus, ExitStatusCode } from '../errors.js';

/** The status a command asks for when it ends without error (only --exit-status changes it). */
let status: ExitStatusCode = ExitStatus.ok;

export function setOutcome(found: boolean, exitStatusWanted: boolean | undefined): void {
  status = exitStatusWanted && !found ? ExitStatus.noAssociation : ExitStatus.ok;
}

export function outcome(): ExitStatusCode {
  return status;
}
