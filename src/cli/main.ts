/**
 * The command line: builds the program (one commander command per file),
 * parses the arguments once into a plan, runs that command, and turns its
 * Outcome (or its one error) into an exit status. A run that names a
 * command loads that command's module only (a run on a small file is
 * mostly start-up; README, Speed); help, version, a misspelt command and
 * completion load the whole program (program.ts). `run` is the whole
 * program for a given set of streams, so tests call it in-process; `main`
 * is what bin/tabsight.js calls with the process's own.
 */
import { Command, CommanderError } from 'commander';
import { ExitStatus, ExitStatusCode, TabsightError } from '../errors.js';
import { TOOL_VERSION } from '../version.js';
import { CliIo, processIo } from './output.js';
import { ClosedPipe } from '../output/reasons.js';
import { messageLine } from '../escape/terminal.js';
import { Outcome, statusOf } from './outcome.js';
import { programShell, withOutput } from './shell.js';

/** One command's module: its commander command and the function that runs its plan. */
interface CommandModule {
  command(accept: (plan: unknown) => void): Command;
  run(plan: unknown, io: CliIo): Promise<Outcome>;
}

/** The commands a run can name, each loaded on its own (completion needs the whole program). */
const COMMANDS: Record<string, () => Promise<CommandModule>> = {
  pair: async () => {
    const m = await import('./pair.js');
    return { command: m.pairCommand as CommandModule['command'], run: (plan, io) => m.runPair(plan as Parameters<typeof m.runPair>[0], io) };
  },
  scan: async () => {
    const m = await import('./scan.js');
    return { command: m.scanCommand as CommandModule['command'], run: (plan, io) => m.runScan(plan as Parameters<typeof m.runScan>[0], io) };
  },
  banner: async () => {
    const m = await import('./banner.js');
    return { command: m.bannerCommand as CommandModule['command'], run: (plan, io) => m.runBanner(plan as Parameters<typeof m.runBanner>[0], io) };
  },
  compare: async () => {
    const m = await import('./compare.js');
    return { command: m.compareCommand as CommandModule['command'], run: (plan, io) => m.runCompare(plan as Parameters<typeof m.runCompare>[0], io) };
  },
  waves: async () => {
    const m = await import('./waves.js');
    return { command: m.wavesCommand as CommandModule['command'], run: (plan, io) => m.runWaves(plan as Parameters<typeof m.runWaves>[0], io) };
  },
  count: async () => {
    const m = await import('./counts.js');
    return { command: m.countCommand as CommandModule['command'], run: (plan, io) => m.runCount(plan as Parameters<typeof m.runCount>[0], io) };
  },
  merge: async () => {
    const m = await import('./counts.js');
    return { command: m.mergeCommand as CommandModule['command'], run: (plan, io) => m.runMerge(plan as Parameters<typeof m.runMerge>[0], io) };
  },
  sql: async () => {
    const m = await import('./sql.js');
    return { command: m.sqlCommand as CommandModule['command'], run: (plan, io) => m.runSql(plan as Parameters<typeof m.runSql>[0], io) };
  },
  profile: async () => {
    const m = await import('./profile.js');
    return { command: m.profileCommand as CommandModule['command'], run: (plan, io) => m.runProfile(plan as Parameters<typeof m.runProfile>[0], io) };
  },
};

/** Parses the arguments and runs what they name: one command alone when args[0] names it, else the whole program. */
async function parseAndRun(args: readonly string[], io: CliIo): Promise<ExitStatusCode> {
  const load = Object.hasOwn(COMMANDS, args[0]) ? COMMANDS[args[0]] : undefined;
  if (load !== undefined) {
    const chosen = await load();
    let plan: unknown = null;
    const program = programShell(io, TOOL_VERSION).addCommand(withOutput(chosen.command((p) => (plan = p)), io));
    await program.parseAsync([...args], { from: 'user' });
    return plan === null ? ExitStatus.ok : statusOf(await chosen.run(plan, io));
  }
  const { buildProgram, execute } = await import('./program.js');
  let chosen: Parameters<typeof execute>[0] | null = null;
  const program = buildProgram(io, (plan) => (chosen = plan));
  if (args.length === 0) {
    program.outputHelp();
    return ExitStatus.usageError;
  }
  await program.parseAsync([...args], { from: 'user' });
  if (chosen === null) return ExitStatus.ok;
  return statusOf(await execute(chosen, io, program));
}

/**
 * The whole program for the arguments after the program name: 0 done,
 * 1 data, 2 usage, 3 nothing found under --exit-status. A user-facing
 * failure is one line on io.stderr; anything else thrown is a bug and
 * rejects (bin/tabsight.js reports it with status 70).
 */
export async function run(args: readonly string[], io: CliIo): Promise<{ status: ExitStatusCode }> {
  try {
    return { status: await parseAndRun(args, io) };
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
  // The streams' error events are ignored where each is made (nodeStream in src/output/standardOutput.ts).
  return (await run(argv.slice(2), processIo())).status;
}
