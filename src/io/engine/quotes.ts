/**
 * Quote settling: the engine reads a quote inside an unquoted field as a
 * character, where the built-in reader refuses the row and names its line.
 * A value with a quote in it is rare, so when one turns up the built-in
 * reader settles the question: it reads one file in place of the engine,
 * or checks each file of a pattern (and its error, if any, is the answer).
 */
import { readRecords, ReaderOptions } from '../readRecords.js';
import type { EngineInput } from './files.js';
import { EngineFallback } from './query.js';

export async function settleQuotes(input: EngineInput, reader: ReaderOptions, values: Iterable<string | null>): Promise<void> {
  if (input.format !== 'csv') return;
  for (const value of values) {
    if (value === null || !value.includes('"')) continue;
    if (!input.glob) throw new EngineFallback('a quote inside a field, which the built-in reader judges');
    for (const file of input.files) await readRecords({ path: file, label: file }, reader, () => [], () => undefined);
    return;
  }
}
