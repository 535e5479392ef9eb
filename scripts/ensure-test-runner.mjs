#!/usr/bin/env node
// Run before the tests (npm's pretest). The test runner's bundler (rolldown,
// under vite and vitest) loads a native binding that is an optional
// dependency, so `npm ci --omit=optional` -- the way to install tabsight
// without its optional engine -- leaves the test runner unable to start.
// When that is the case, this installs the one binding rolldown names for
// this machine, at rolldown's own pinned version, without saving it
// (package.json and package-lock.json are untouched), and says so in one
// line. Otherwise it does nothing.
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';

/** The messages of an error and its causes (rolldown gathers several). */
function messages(error) {
  const out = [];
  const walk = (e) => {
    if (!e) return;
    if (Array.isArray(e)) return e.forEach(walk);
    out.push(String(e.message ?? e));
    walk(e.cause);
  };
  walk(error);
  return out;
}

try {
  await import('rolldown');
} catch (error) {
  const wanted = messages(error)
    .map((m) => /Cannot find module '(@rolldown\/binding-[a-z0-9-]+)'/.exec(m)?.[1])
    .filter((name) => name !== undefined && name !== '@rolldown/binding-wasm32-wasi');
  if (wanted.length === 0) throw error;
  const require = createRequire(import.meta.url);
  const { version } = JSON.parse(readFileSync(require.resolve('rolldown/package.json'), 'utf8'));
  const spec = `${wanted[0]}@${version}`;
  console.log(`the test runner lacks its native binding (left out with the optional dependencies); installing ${spec} without saving it`);
  const npm = spawnSync('npm', ['install', '--no-save', '--omit=optional', '--no-audit', '--no-fund', spec], { stdio: 'inherit' });
  if (npm.status !== 0) process.exit(npm.status ?? 1);
}
