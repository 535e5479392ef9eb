/**
 * File patterns read by the tool itself (without the engine): `*` (any run
 * of characters but `/`), `?` (one character) and `[...]` (one of a set,
 * `[!...]` none of it) in any part of the path, matched part by part
 * against the directories' entries, in code-point order of the full path
 * (the order the engine's glob gives).
 */
import { readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { dataError } from '../errors.js';
import { compareCodePoints } from '../table/naturalOrder.js';
import { isPattern } from './engine/files.js';

const WILDCARD = /[*?[]/;

/** A regular expression for one part of a pattern. */
function partRegex(part: string): RegExp {
  let out = '';
  for (let i = 0; i < part.length; i++) {
    const c = part[i];
    if (c === '*') out += '[^/]*';
    else if (c === '?') out += '[^/]';
    else if (c === '[') {
      const end = part.indexOf(']', i + 2);
      if (end < 0) {
        out += '\\[';
        continue;
      }
      let set = part.slice(i + 1, end);
      const negated = set.startsWith('!') || set.startsWith('^');
      if (negated) set = set.slice(1);
      out += `[${negated ? '^' : ''}${set.replace(/\\/g, '\\\\').replace(/\]/g, '\\]')}]`;
      i = end;
    } else out += c.replace(/[.+^${}()|\\]/g, (x) => `\\${x}`);
  }
  return new RegExp(`^${out}$`);
}

function entries(dir: string): string[] {
  try {
    return readdirSync(dir === '' ? '.' : dir);
  } catch {
    return [];
  }
}

function isFile(path: string): boolean {
  try {
    return statSync(path).isFile();
  } catch {
    return false;
  }
}

/**
 * The files a pattern matches, in code-point order of their paths (a path
 * that exists is that file, brackets and all: see isPattern); a pattern
 * that matches none is the tool's one-line error.
 */
export async function filesOfPattern(pattern: string): Promise<string[]> {
  if (!(await isPattern(pattern))) return [pattern];
  const absolute = pattern.startsWith('/');
  const parts = pattern.split('/').filter((p, k) => p !== '' || k === 0);
  let paths = [absolute ? '/' : ''];
  parts.forEach((part, k) => {
    if (absolute && k === 0 && part === '') return;
    const last = k === parts.length - 1;
    const next: string[] = [];
    for (const base of paths) {
      if (!WILDCARD.test(part)) {
        next.push(base === '' ? part : join(base, part));
        continue;
      }
      const regex = partRegex(part);
      for (const name of entries(base)) if (regex.test(name) && (part.startsWith('.') || !name.startsWith('.'))) next.push(base === '' ? name : join(base, name));
    }
    paths = last ? next.filter(isFile) : next;
  });
  const files = paths.sort(compareCodePoints);
  if (files.length === 0) throw dataError(`${pattern}: no file matches this pattern`);
  return files;
}
