import { describe, expect, it } from 'vitest';
import { parseCodebook } from '../../src/io/codebookFile.js';
import { EMPTY_LEVEL, levelOrder, levelOutcome, LevelRules } from '../../src/table/levelRules.js';
import { parseRangeRecode, RecodeMap } from '../../src/table/rangeRecode.js';

const recode = (spec: string) => RecodeMap.of([parseRangeRecode(spec)]);

// The order of the rules is stated in src/table/levelRules.ts and docs/codebook.md.
const book = parseCodebook(
  JSON.stringify({
    codebook: 1,
    columns: [
      { name: 'pid', ordered: true, values: [{ code: 0, label: 'Strong Democrat' }, { code: 1, label: 'Weak Democrat' }, { code: 5, label: 'Weak Republican' }, { code: 6, label: 'Strong Republican' }, { code: 8, missing: "don't know" }, { code: 9, missing: 'refused', label: 'refused to say' }] },
    ],
  }),
  'b.json',
);
const pid = book.columns[0];

describe('what a value becomes before counting', () => {
  const rules: LevelRules = { codebook: pid, recode: null, keepMissing: false };
  it('codebook labels, missing codes with their reasons, empty fields, unlisted values as they are', () => {
    expect(levelOutcome(rules, '0')).toEqual({ kind: 'level', label: 'Strong Democrat', code: '0', missingReason: null });
    expect(levelOutcome(rules, '9.0')).toEqual({ kind: 'missing', reason: 'refused' });
    expect(levelOutcome(rules, null)).toEqual({ kind: 'missing', reason: 'empty' });
    expect(levelOutcome(rules, '3')).toEqual({ kind: 'level', label: '3', code: null, missingReason: null });
  });
  it('--keep-missing keeps missing values as levels: the code\'s label, else its reason, and "(missing)" for empty fields', () => {
    const keep = { ...rules, keepMissing: true };
    expect(levelOutcome(keep, '9')).toEqual({ kind: 'level', label: 'refused to say', code: '9', missingReason: 'refused' });
    expect(levelOutcome(keep, '8')).toEqual({ kind: 'level', label: "don't know", code: '8', missingReason: "don't know" });
    expect(levelOutcome(keep, null)).toEqual({ kind: 'level', label: EMPTY_LEVEL, code: null, missingReason: 'empty' });
  });
  it('a recode after the codebook names labels, or codes when no rule names the label', () => {
    const byLabel = { ...rules, recode: recode('pid:Strong Democrat=Democrat,Weak Democrat=Democrat') };
    expect(levelOutcome(byLabel, '1')).toMatchObject({ kind: 'level', label: 'Democrat', code: '1' });
    const byCode = { ...rules, recode: recode('pid:5=Republican,6=Republican') };
    expect(levelOutcome(byCode, '6')).toMatchObject({ kind: 'level', label: 'Republican' });
  });
  it('a range recode without a codebook', () => {
    const ages: LevelRules = { codebook: null, recode: recode('age:<18=minor,18-64=adult,>=65=senior'), keepMissing: false };
    expect(['12', '30', '70', 'n/a'].map((v) => levelOutcome(ages, v))).toMatchObject([{ label: 'minor' }, { label: 'adult' }, { label: 'senior' }, { label: 'n/a' }]);
  });
});

describe('level order', () => {
  it('the codebook order, then unlisted levels naturally, then missing levels kept with --keep-missing', () => {
    const rules: LevelRules = { codebook: pid, recode: null, keepMissing: true };
    expect(levelOrder(rules, ['3', EMPTY_LEVEL, 'Strong Republican', 'refused to say', 'Strong Democrat', '2', 'Weak Democrat'])).toEqual(['Strong Democrat', 'Weak Democrat', 'Strong Republican', '2', '3', 'refused to say', EMPTY_LEVEL]);
  });
  it('a recode carries the codebook order to its new labels; range labels follow their ranges', () => {
    const rules: LevelRules = { codebook: pid, recode: recode('pid:Strong Democrat=Democrat,Weak Democrat=Democrat,Weak Republican=Republican,Strong Republican=Republican'), keepMissing: false };
    expect(levelOrder(rules, ['Republican', 'Democrat'])).toEqual(['Democrat', 'Republican']);
    const ages: LevelRules = { codebook: null, recode: recode('age:>=65=senior,<18=minor,18-64=adult'), keepMissing: false };
    expect(levelOrder(ages, ['senior', 'adult', 'minor', 'unknown'])).toEqual(['minor', 'adult', 'senior', 'unknown']);
  });
});
