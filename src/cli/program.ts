/**
 * The whole program as commander sees it: every command (one file each),
 * each handing its parsed plan to `accept`, and the function that runs the
 * plan. main.ts loads this only when no single command is named (help,
 * version, a misspelt command, completion); tests build it directly.
 */
import { Command } from 'commander';
import { TOOL_VERSION } from '../version.js';
import { bannerCommand, BannerPlan, runBanner } from './banner.js';
import { compareCommand, ComparePlan, runCompare } from './compare.js';
import { completionCommand, CompletionPlan, runCompletion } from './completion.js';
import { countCommand, CountPlan, mergeCommand, MergePlan, runCount, runMerge } from './counts.js';
import { CliIo } from './output.js';
import { Outcome } from './outcome.js';
import { pairCommand, PairPlan, runPair } from './pair.js';
import { runScan, scanCommand, ScanPlan } from './scan.js';
import { runSql, sqlCommand, SqlPlan } from './sql.js';
import { profileCommand, ProfilePlan, runProfile } from './profile.js';
import { runWaves, wavesCommand, WavesPlan } from './waves.js';
import { programShell, withOutput } from './shell.js';

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

/** The program: its commands hand their parsed plan to `accept`. Help and version go to the run's streams. */
export function buildProgram(io: CliIo, accept: (chosen: CommandPlan) => void): Command {
  const program = programShell(io, TOOL_VERSION);
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
  for (const command of commands) program.addCommand(withOutput(command, io));
  return program;
}

/** Runs the command a plan names. */
export function execute(chosen: CommandPlan, io: CliIo, program: Command): Promise<Outcome> {
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

