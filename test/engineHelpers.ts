// Engine tests need the optional package @duckdb/node-api. Where it is not
// installed (npm ci --omit=optional) they are skipped, and the reason is in
// their title and in one line of the run's output.
import { describe } from 'vitest';
import { engineAvailable } from '../src/io/engine/module.js';
import { ENGINE_PACKAGE } from '../src/version.js';

export const ENGINE_INSTALLED = await engineAvailable();

const REASON = `skipped: the optional package ${ENGINE_PACKAGE} is not installed`;

if (!ENGINE_INSTALLED) console.warn(`engine tests ${REASON} (npm ci installs it)`);

/** describe() for tests that need the engine: skipped, saying why, where its package is absent. */
export function describeEngine(title: string, body: () => void): void {
  if (ENGINE_INSTALLED) describe(title, body);
  else describe.skip(`${title} [${REASON}]`, body);
}
