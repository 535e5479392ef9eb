/**
 * The program's version and the engine package it was built against, read
 * once from package.json (one source for --version, reports, SQL headers
 * and the engine's install hint). From src/ and from dist/ alike,
 * ../package.json is the package's own file.
 */
import { readFileSync } from 'node:fs';

interface PackageJson {
  version: string;
  optionalDependencies?: Record<string, string>;
}

const packageJson = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as PackageJson;

export const TOOL_VERSION: string = packageJson.version;

/** The embedded engine's package, and the version pinned in optionalDependencies (named in the install hint). */
export const ENGINE_PACKAGE = '@duckdb/node-api';
export const ENGINE_VERSION: string = packageJson.optionalDependencies?.[ENGINE_PACKAGE] ?? 'latest';
