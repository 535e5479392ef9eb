import { describe, expect, it } from 'vitest';
import { profileColumns } from '../../src/io/profileColumns.js';
import { tempFile } from '../cli/cliHelpers.js';
import { inputSource } from '../../src/io/source.js';

const reader = { missing: [] as string[], skipBadRows: false, header: true };

describe('the profile read: exact up to a limit of distinct values per column, summarised beyond', () => {
  it('keeps at most the limit of values and estimates the rest (200,000 distinct ids, limit 1,000)', async () => {
    const lines = ['id,score,answer'];
    const answers = new Map<string, number>();
    for (let i = 0; i < 200_000; i++) {
      const answer = i % 3 === 0 ? 'yes' : i % 1000 === 1 ? 'NA' : 'no';
      answers.set(answer, (answers.get(answer) ?? 0) + 1);
      lines.push(`u${i},${(i * 7919) % 100_003},${answer}`);
    }
    const file = tempFile('many-ids.csv', lines.join('\n') + '\n');
    const { columns, summary } = await profileColumns(inputSource(file), reader, 1_000);
    expect(summary.records).toBe(200_000);
    const [id, score, answer] = columns;
    expect(id.labels.length).toBe(1_000);
    expect(id.overflow!.rows).toBe(199_000);
    // HyperLogLog with m = 4096: within three standard errors (3 × 1.625%) of the 199,000 values past the limit.
    expect(Math.abs(id.overflow!.distinctEstimate / 199_000 - 1)).toBeLessThan(0.049);
    expect(id.overflow!.numeric).toBe(false);
    expect(score.overflow!.numeric).toBe(true);
    expect(score.overflow!.integer).toBe(true);
    expect(score.overflow!.max).toBeLessThanOrEqual(100_002);
    expect(answer.overflow).toBeNull();
    expect([...answer.labels]).toEqual([...answers.keys()]);
    expect(Array.from(answer.counts)).toEqual([...answers.values()]);
  });
  it('counts empty fields apart and keeps --missing values as values, so their rows can be reported', async () => {
    const file = tempFile('missing.csv', 'a,b\n1,x\n,y\nNA,\n  ,z\n');
    const { columns } = await profileColumns(inputSource(file), { ...reader, missing: ['NA'] });
    expect(columns[0].empty).toBe(2);
    expect([...columns[0].labels]).toEqual(['1', 'NA']);
    expect(columns[1].empty).toBe(1);
  });
  it('tallies missing-looking tokens that first appear past the limit', async () => {
    const lines = ['v'];
    for (let i = 0; i < 50; i++) lines.push(String(i));
    lines.push('NA', '.', 'NA', '51');
    const { columns } = await profileColumns(inputSource(tempFile('late-na.csv', lines.join('\n') + '\n')), reader, 10);
    expect(Object.fromEntries(columns[0].overflow!.tokens)).toEqual({ NA: 2, '.': 1 });
    expect(columns[0].overflow!.numeric).toBe(true);
  });
});
