/**
 * The command line: builds the program (one commander command per file),
 * parses the arguments once into a CommandPlan, runs that command, and
 * turns its Outcome (or its one error) into an exit status. `run` is the
 * whole program for a given set of streams, so tests call it in-process;
 * `main` is what bin/tabsight.js calls with the process's own.
 */
import { Command, CommanderError } from 'commander';
import { ExitStatus, ExitStatusCode, TabsightError } from '../errors.js';
import { TOOL_VERSION } from '../version.js';
import { bannerCommand, BannerPlan, runBanner } from './banner.js';
import { compareCommand, ComparePlan, runCompare } from './compare.js';
import { completionCommand, CompletionPlan, runCompletion } from './completion.js';
import { countCommand, CountPlan, mergeCommand, MergePlan, runCount, runMerge } from './counts.js';
import { CliIo, processIo } from './output.js';
import { ClosedPipe } from '../output/reasons.js';
import { messageLine } from '../escape/terminal.js';
import { removeTemporariesOnSignals } from '../output/temporaries.js';
import { Outcome, statusOf } from './outcome.js';
import { pairCommand, PairPlan, runPair } from './pair.js';
import { runScan, scanCommand, ScanPlan } from './scan.js';
import { runSql, sqlCommand, SqlPlan } from './sql.js';
import { profileCommand, ProfilePlan, runProfile } from './profile.js';
import { runWaves, wavesCommand, WavesPlan } from './waves.js';

/** A command and its plan, as parsed from the arguments. */
export type CommandPlan =
  | { command: 'pair'; plan: PairPlan }
  | { command: 'scan'; plan: ScanPlan }
  | { command: 'banner'; plan: BannerPlan }
  | { command: 'compare'; plan: ComparePlan }
  | { command: 'waves'; plan: WavesPlan }
  | { command: 'count'; plan: CountPlan }
  | { command: 'merge'; plan: MergePlan }
  | { command: 'sql'; plan: SqlPlan }
  | { command: 'profile'; plan: ProfilePlan }
  | { command: 'completion'; plan: CompletionPlan };

function oneLine(text: string): string {
  return text.replace(/^error: /, '').replace(/\s*\n\s*/g, ' ').trim();
}

/** The program: its commands hand their parsed plan to `accept`. Help and version go to the run's streams. */
export function buildProgram(io: CliIo, accept: (chosen: CommandPlan) => void): Command {
  const output = {
    writeOut: (text: string) => io.stdout.write(text),
    writeErr: (text: string) => {
      const line = oneLine(text);
      if (line !== '') io.stderr.write(`tabsight: ${messageLine(line)}\n`);
    },
  };
  const program = new Command('tabsight')
    .description('Find and explain associations between categorical columns of CSV files.')
    .version(TOOL_VERSION)
    .showSuggestionAfterError(true)
    .configureOutput(output)
    .exitOverride();
  const commands = [
    pairCommand((plan) => accept({ command: 'pair', plan })),
    scanCommand((plan) => accept({ command: 'scan', plan })),
    bannerCommand((plan) => accept({ command: 'banner', plan })),
    compareCommand((plan) => accept({ command: 'compare', plan })),
    wavesCommand((plan) => accept({ command: 'waves', plan })),
    countCommand((plan) => accept({ command: 'count', plan })),
    mergeCommand((plan) => accept({ command: 'merge', plan })),
    sqlCommand((plan) => accept({ command: 'sql', plan })),
    profileCommand((plan) => accept({ command: 'profile', plan })),
    completionCommand((plan) => accept({ command: 'completion', plan })),
  ];
  for (const command of commands) {
    command.exitOverride();
    command.configureOutput(output);
    command.showSuggestionAfterError(true);
    program.addCommand(command);
  }
  return program;
}

/** Runs the command a plan names. */
function execute(chosen: CommandPlan, io: CliIo, program: Command): Promise<Outcome> {
  switch (chosen.command) {
    case 'pair':
      return runPair(chosen.plan, io);
    case 'scan':
      return runScan(chosen.plan, io);
    case 'banner':
      return runBanner(chosen.plan, io);
    case 'compare':
      return runCompare(chosen.plan, io);
    case 'waves':
      return runWaves(chosen.plan, io);
    case 'count':
      return runCount(chosen.plan, io);
    case 'merge':
      return runMerge(chosen.plan, io);
    case 'sql':
      return runSql(chosen.plan, io);
    case 'profile':
      return runProfile(chosen.plan, io);
    case 'completion':
      return runCompletion(chosen.plan, io, program);
  }
}

/**
 * The whole program for the arguments after the program name: 0 done,
 * 1 data, 2 usage, 3 nothing found under --exit-status. A user-facing
 * failure is one line on io.stderr; anything else thrown is a bug and
 * rejects (bin/tabsight.js reports it with status 70).
 */
export async function run(args: readonly string[], io: CliIo): Promise<{ status: ExitStatusCode }> {
  let chosen: CommandPlan | null = null;
  const program = buildProgram(io, (plan) => (chosen = plan));
  try {
    if (args.length === 0) {
      program.outputHelp();
      return { status: ExitStatus.usageError };
    }
    await program.parseAsync([...args], { from: 'user' });
    if (chosen === null) return { status: ExitStatus.ok };
    return { status: statusOf(await execute(chosen, io, program)) };
  } catch (error) {
    if (error instanceof CommanderError) {
      if (error.code === 'commander.helpDisplayed' || error.code === 'commander.version' || error.code === 'commander.help') return { status: ExitStatus.ok };
      return { status: ExitStatus.usageError };
    }
    if (error instanceof ClosedPipe) return { status: ExitStatus.ok }; // `| head`: ends quietly
    if (error instanceof TabsightError) {
      // The message may echo the data (a file name, a column name, a value): control characters visible, clipped.
      io.stderr.write(`tabsight: ${messageLine(error.message)}\n`);
      return { status: error.exitStatus };
    }
    throw error;
  }
}

/** The program on the process's own streams (argv as process.argv gives it). */
export async function main(argv: string[]): Promise<number> {
  // Write errors reach each write's callback (src/output/standardOutput.ts),
  // where they end the run with one line (a closed pipe: quietly); the
  // streams' error events are then only echoes. Standard error that cannot
  // be written (a closed pipe) must not change the status either.
  process.stdout.on('error', () => undefined);
  process.stderr.on('error', () => undefined);
  removeTemporariesOnSignals();
  return (await run(argv.slice(2), processIo())).status;
}
