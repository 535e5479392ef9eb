// The files of a series counted by a pool of worker threads (io/rangePool.ts,
// io/counting.ts countFiles) against the single reader, file by file: the same
// JSON, and the same one-line error from the first file in order that fails.
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { run, runJson, spawnCli, tempFile } from '../cli/cliHelpers.js';

/** A weekly file of 1,200 rows: quoted fields with line breaks and doubled quotes, CRLF, a byte-order mark, blank lines. */
function week(k: number): string {
  const rows = [`${k % 2 === 0 ? '\ufeff' : ''}id,region,segment,note`];
  for (let i = 0; i < 1200; i++) {
    rows.push(`${i},${['north', 'south', 'east'][(i + k) % 3]},${(i * (k + 1)) % 7 < 3 ? '"retail, small"' : 'trade'},${i % 13 === 0 ? '"two\r\nlines, ""quoted"""' : 'plain'}`);
    if (i % 400 === 0) rows.push('');
  }
  return rows.join(k % 3 === 0 ? '\r\n' : '\n') + '\n';
}

describe('waves counted on several threads', () => {
  const files = Array.from({ length: 6 }, (_v, k) => tempFile(`pool-2026-W0${k + 1}.csv`, week(k)));
  // One wave gzipped: the single reader reads it, the others go to the pool.
  files[4] = tempFile('pool-2026-W05.csv.gz', gzipSync(week(4)));

  it('--threads 2 gives the JSON of --threads 1 (the single reader), and with --where', async () => {
    for (const extra of [[], ['--where', 'note!=plain']]) {
      const args = ['waves', ...files, '--rows', 'region', '--cols', 'segment', '--engine', 'builtin', ...extra];
      const one = await runJson([...args, '--threads', '1']);
      const two = await runJson([...args, '--threads', '2']);
      expect(two).toEqual(one);
    }
  });

  it('a broken row in one file and an unknown column in a later one: the error of the first file in order, as the single reader gives it', async () => {
    const broken = [...files];
    broken[1] = tempFile('pool-broken-2026-W02.csv', week(1).replace('\n5,', '\n5,north,re"tail,x\n6,'));
    broken[3] = tempFile('pool-other-2026-W04.csv', week(3).replace('region', 'area'));
    const args = ['waves', ...broken, '--rows', 'region', '--cols', 'segment'];
    const one = await run([...args, '--threads', '1']);
    const two = await run([...args, '--threads', '2']);
    expect(one.status).toBe(1);
    expect(one.stderr).toMatch(/pool-broken-2026-W02\.csv, line \d+: a quote inside the unquoted field 3/);
    expect(two.status).toBe(one.status);
    expect(two.stderr).toBe(one.stderr);
  });

  it('the built program (bundled, its workers beside it) gives the same JSON with --threads 2', () => {
    const args = ['waves', ...files, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', 'builtin'];
    const one = spawnCli([...args, '--threads', '1']);
    const two = spawnCli([...args, '--threads', '2']);
    expect(one.status).toBe(0);
    expect(two.stderr).toBe('');
    expect(JSON.parse(two.stdout)).toEqual(JSON.parse(one.stdout));
  });
});
