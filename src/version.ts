/**
 * The program's version and the engine package it was built against, read
 * once from package.json (one source for --version, reports, SQL headers
 * and the engine's install hint).
 */
import { readFileSync } from 'node:fs';

interface PackageJson {
  version: string;
  optionalDependencies?: Record<string, string>;
}

/** The package's own package.json: beside dist/ and src/ (../), or beside the bundle in dist/bundle/ (../../). */
function readPackageJson(): PackageJson {
  for (const path of ['../package.json', '../../package.json']) {
    try {
      const found = JSON.parse(readFileSync(new URL(path, import.meta.url), 'utf8')) as PackageJson & { name?: string };
      if (found.name === 'tabsight') return found;
    } catch {
      // not here: look one folder up
    }
  }
  throw new Error('the package.json of tabsight was not found beside the program');
}

/** The package.json's fields, written into the bundle at build (scripts/bundle.mjs), so that a run need not read and parse the file. */
declare const TABSIGHT_PACKAGE_JSON: string | undefined;

const packageJson: PackageJson = typeof TABSIGHT_PACKAGE_JSON === 'string' ? (JSON.parse(TABSIGHT_PACKAGE_JSON) as PackageJson) : readPackageJson();

export const TOOL_VERSION: string = packageJson.version;

/** The embedded engine's package, and the version pinned in optionalDependencies (named in the install hint). */
export const ENGINE_PACKAGE = '@duckdb/node-api';
export const ENGINE_VERSION: string = packageJson.optionalDependencies?.[ENGINE_PACKAGE] ?? 'latest';
