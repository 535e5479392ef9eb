import { Command, CommanderError } from 'commander';
import { ExitStatus, TabsightError } from '../errors.js';
import { TOOL_VERSION } from '../analysis/report.js';
import { pairCommand } from './pair.js';
import { scanCommand } from './scan.js';
import { compareCommand } from './compare.js';
import { countCommand, mergeCommand } from './counts.js';
import { completionCommand } from './completion.js';
import { sqlCommand } from './sql.js';
import { outcome } from './outcome.js';

function oneLine(text: string): string {
  return text.replace(/^error: /, '').replace(/\s*\n\s*/g, ' ').trim();
}

export function buildProgram(): Command {
  const program = new Command('tabsight')
    .description('Find and explain associations between categorical columns of CSV files.')
    .version(TOOL_VERSION)
    .showSuggestionAfterError(true)
    .configureOutput({
      writeErr: (text) => {
        const line = oneLine(text);
        if (line !== '') process.stderr.write(`tabsight: ${line}\n`);
      },
    })
    .exitOverride();
  for (const command of [pairCommand(), scanCommand(), compareCommand(), countCommand(), mergeCommand(), sqlCommand(), completionCommand(() => program)]) {
    command.exitOverride();
    command.configureOutput({ writeErr: (text: string) => { const line = oneLine(text); if (line !== '') process.stderr.write(`tabsight: ${line}\n`); } });
    command.showSuggestionAfterError(true);
    program.addCommand(command);
  }
  return program;
}

/** Runs the program and maps the outcome to an exit status: 0 done, 1 data, 2 usage. */
export async function main(argv: string[]): Promise<number> {
  process.stdout.on('error', (error: NodeJS.ErrnoException) => {
    if (error.code === 'EPIPE') process.exit(ExitStatus.ok); // a closed pipe (| head) ends quietly
    throw error;
  });
  const program = buildProgram();
  try {
    if (argv.length <= 2) {
      program.outputHelp();
      return ExitStatus.usageError;
    }
    await program.parseAsync(argv);
    return outcome();
  } catch (error) {
    if (error instanceof CommanderError) {
      if (error.code === 'commander.helpDisplayed' || error.code === 'commander.version' || error.code === 'commander.help') return ExitStatus.ok;
      return ExitStatus.usageError;
    }
    if (error instanceof TabsightError) {
      process.stderr.write(`tabsight: ${error.message}\n`);
      return error.exitStatus;
    }
    throw error;
  }
}
