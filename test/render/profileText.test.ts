import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Chalk } from 'chalk';
import { describe, expect, it } from 'vitest';
import { profileFile, DEFAULT_PROFILE_OPTIONS } from '../../src/analysis/profile.js';
import type { InputSummary } from '../../src/analysis/report.js';
import { readCodebook } from '../../src/io/codebookFile.js';
import { profileColumns } from '../../src/io/profileColumns.js';
import { inputSource } from '../../src/io/source.js';
import { renderProfileMarkdown, renderProfileText } from '../../src/render/profileText.js';
import { tempFile } from '../cli/cliHelpers.js';
import { ROOT } from '../helpers.js';

const plain = new Chalk({ level: 0 });
const contract = readFileSync(join(ROOT, 'docs', 'json.md'), 'utf8');

async function profileOf(path: string, codebook: string | null = null) {
  const source = inputSource(path);
  const tallied = await profileColumns(source, { missing: [], skipBadRows: false, header: true });
  return profileFile(tallied, { file: source.label } as InputSummary, { ...DEFAULT_PROFILE_OPTIONS, codebook: codebook ? readCodebook(codebook) : null }).report;
}

describe('profile renderers', () => {
  it('text: one block per column with the question, the labelled most frequent values and the suggestions', async () => {
    const report = await profileOf(join(ROOT, 'fixtures', 'anes96', 'anes96.csv'), join(ROOT, 'fixtures', 'anes96', 'codebook.json'));
    const text = renderProfileText(report, plain);
    expect(text).toContain(`PID  ordered — labelled by the codebook, ordered\n  question Party identification of respondent.`);
    expect(text).toContain(`0 "Strong Democrat" 200`);
    expect(text).toMatch(/age  numeric — 71 different numbers from 19 to 91\n/);
  });
  it('text escapes control characters from the data; Markdown escapes its table syntax (escape at the edge)', async () => {
    const report = await profileOf(tempFile('hostile.csv', 'a|b,c\n"x\u001b[31m",1\n"y|*z*",2\n"x\u001b[31m",3\n'));
    const text = renderProfileText(report, plain);
    expect(text).not.toContain('\u001b');
    expect(text).toContain('x\\u{1b}[31m');
    const markdown = renderProfileMarkdown(report);
    expect(markdown).toContain('| a\\|b |');
    expect(markdown).toContain('y\\|\\*z\\*');
  });
  it('docs/json.md documents every field of the profile record', async () => {
    const report = await profileOf(tempFile('doc.csv', 'q,n\nNA,1\nyes,2\nno,3\n'));
    const fields = [...Object.keys(report), ...Object.keys(report.columns[0]).map((k) => `columns[].${k}`)];
    for (const field of fields) expect(contract, field).toContain(`\`${field}\``);
  });
});
