/**
 * The program's shell in commander (name, description, version, where help
 * and errors go) and the same output settings for each command, shared by
 * the whole program (program.ts) and a run that loads only the command it
 * names (main.ts).
 */
import { Command } from 'commander';
import { messageLine } from '../escape/terminal.js';
import type { CliIo } from './output.js';

function oneLine(text: string): string {
  return text.replace(/^error: /, '').replace(/\s*\n\s*/g, ' ').trim();
}

function outputOf(io: CliIo) {
  return {
    writeOut: (text: string) => io.stdout.write(text),
    writeErr: (text: string) => {
      const line = oneLine(text);
      if (line !== '') io.stderr.write(`tabsight: ${messageLine(line)}\n`);
    },
  };
}

/** The program without its commands. */
export function programShell(io: CliIo, version: string): Command {
  return new Command('tabsight')
    .description('Find and explain associations between categorical columns of CSV files.')
    .version(version)
    .showSuggestionAfterError(true)
    .configureOutput(outputOf(io))
    .exitOverride();
}

/** A command with the program's output settings: errors as one line, no exit of its own. */
export function withOutput(command: Command, io: CliIo): Command {
  command.exitOverride();
  command.configureOutput(outputOf(io));
  command.showSuggestionAfterError(true);
  return command;
}
