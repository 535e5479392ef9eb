/** `tabsight completion`: bash and zsh completion scripts built from the program's own commands and options. */
import { Command } from 'commander';
import { usageError } from '../errors.js';
import { CliIo, writeOut } from './output.js';
import { DONE, Outcome } from './outcome.js';

interface CommandShape {
  name: string;
  options: string[];
}

function shapes(program: Command): CommandShape[] {
  return program.commands.map((c) => ({ name: c.name(), options: [...c.options.map((o) => o.long ?? o.short ?? '').filter((o) => o !== ''), '--help'] }));
}

/** A bash completion function built from the program's own commands and options. */
export function bashCompletion(program: Command): string {
  const cases = shapes(program)
    .map((c) => `    ${c.name}) opts="${c.options.join(' ')}" ;;`)
    .join('\n');
  return `# bash completion for tabsight; add to ~/.bashrc:  source <(tabsight completion bash)
_tabsight() {
  local cur="\${COMP_WORDS[COMP_CWORD]}" cmd="\${COMP_WORDS[1]}" opts
  if [ "$COMP_CWORD" -eq 1 ]; then
    COMPREPLY=( $(compgen -W "${shapes(program).map((c) => c.name).join(' ')} --help --version" -- "$cur") )
    return
  fi
  case "$cmd" in
${cases}
    *) opts="" ;;
  esac
  if [[ "$cur" == -* ]]; then
    COMPREPLY=( $(compgen -W "$opts" -- "$cur") )
  else
    COMPREPLY=( $(compgen -f -- "$cur") )
  fi
}
complete -o filenames -F _tabsight tabsight
`;
}

/** A zsh completion function built the same way. */
export function zshCompletion(program: Command): string {
  const cases = shapes(program)
    .map((c) => `    ${c.name}) _arguments ${c.options.map((o) => `'${o}[]'`).join(' ')} '*:file:_files' ;;`)
    .join('\n');
  return `#compdef tabsight
# zsh completion for tabsight; save as _tabsight in a folder on $fpath, or:  source <(tabsight completion zsh)
_tabsight() {
  if (( CURRENT == 2 )); then
    compadd ${shapes(program).map((c) => c.name).join(' ')}
    return
  fi
  case "$words[2]" in
${cases}
  esac
}
compdef _tabsight tabsight 2>/dev/null || true
`;
}

export interface CompletionPlan {
  shell: 'bash' | 'zsh';
}

export function completionCommand(accept: (plan: CompletionPlan) => void): Command {
  return new Command('completion')
    .description('print a shell completion script (bash or zsh)')
    .argument('<shell>', 'bash or zsh')
    .action((shell: string) => {
      if (shell !== 'bash' && shell !== 'zsh') throw usageError(`completion "${shell}": choose bash or zsh`);
      accept({ shell });
    });
}

/** Writes the completion script of the given program. */
export async function runCompletion(plan: CompletionPlan, io: CliIo, program: Command): Promise<Outcome> {
  await writeOut(io, plan.shell === 'bash' ? bashCompletion(program) : zshCompletion(program));
  return DONE;
}
