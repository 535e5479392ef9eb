import { Chalk, ChalkInstance } from 'chalk';

export type Format = 'text' | 'json' | 'csv' | 'tsv' | 'markdown';

/** Colour only for a terminal, never when NO_COLOR is set or --no-color is given. */
export function painter(colorOption: boolean | undefined): ChalkInstance {
  const wanted = colorOption !== false && process.stdout.isTTY === true && !('NO_COLOR' in process.env && process.env.NO_COLOR !== '');
  return new Chalk({ level: wanted ? 1 : 0 });
}

export function writeOut(text: string): Promise<void> {
  return new Promise((resolve) => {
    if (process.stdout.write(text)) resolve();
    else process.stdout.once('drain', () => resolve());
  });
}
