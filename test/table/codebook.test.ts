import { describe, expect, it } from 'vitest';
import { parseCodebook } from '../../src/io/codebookFile.js';
import { labelColumn, labellingWarnings } from '../../src/table/codebook.js';

// The rules of docs/codebook.md ("Errors and warnings", code matching).
const book = parseCodebook(
  JSON.stringify({
    codebook: 1,
    columns: [
      {
        name: 'agree',
        ordered: true,
        values: [
          { code: 1, label: 'disagree' },
          { code: 2, label: 'disagree' },
          { code: 3, label: 'neutral' },
          { code: 4, label: 'agree' },
          { code: 5, label: 'agree' },
          { code: 8, missing: "don't know" },
          { code: 9, missing: 'refused', label: 'refused to answer' },
        ],
      },
      { name: 'age', cuts: [18, 65], values: [{ code: 999, missing: 'not asked' }] },
    ],
  }),
  'book.json',
);
const [agree, age] = book.columns;

describe('applying a codebook to the values of a column', () => {
  it('labels codes written as text or as numbers ("4", "4.0", "04"), and gives missing codes their reason', () => {
    const result = labelColumn(agree, ['4.0', '1', '04', '9', '3', '8']);
    expect(result.meanings).toEqual([
      { kind: 'level', label: 'agree', code: '4' },
      { kind: 'level', label: 'disagree', code: '1' },
      { kind: 'level', label: 'agree', code: '4' },
      { kind: 'missing', reason: 'refused', label: 'refused to answer', code: '9' },
      { kind: 'level', label: 'neutral', code: '3' },
      { kind: 'missing', reason: "don't know", label: "don't know", code: '8' },
    ]);
  });
  it('orders levels as the codebook lists them, codes sharing a label make one level, codes that occur are kept per level', () => {
    const result = labelColumn(agree, ['5', '3', '1', '2', '4']);
    expect(result.order).toEqual(['disagree', 'neutral', 'agree']);
    expect(result.codesOf.get('disagree')).toEqual(['1', '2']);
    expect(result.codesOf.get('agree')).toEqual(['4', '5']);
  });
  it('a listed code that does not occur is a warning (code-not-seen), with the reason in the message', () => {
    const result = labelColumn(agree, ['1', '3', '4']);
    expect(result.unseen).toEqual(['2', '5', '8', '9']);
    expect(result.codesOf.get('agree')).toEqual(['4']);
    expect(labellingWarnings(agree, result, 'book.json')).toEqual([
      { code: 'code-not-seen', column: 'agree', message: 'book.json: codes "2", "5", "8", "9" of "agree" do not occur in the data (no row gave those answers)' },
    ]);
  });
  it('a value the codebook does not list stays a level of its own after the labelled ones (unlabelled-value)', () => {
    const result = labelColumn(agree, ['4', '7', '1', '6', '2', '3', '5', '8', '9']);
    expect(result.order).toEqual(['disagree', 'neutral', 'agree', '6', '7']);
    expect(result.unlabelled).toEqual(['6', '7']);
    expect(labellingWarnings(agree, result, 'book.json')[0]).toEqual({
      code: 'unlabelled-value',
      column: 'agree',
      message: '"agree" holds "6", "7", which book.json does not label; they stay levels of their own, after the labelled ones',
    });
  });
  it('a column with only missing codes (and cuts) keeps its values, none of them unlabelled', () => {
    const result = labelColumn(age, ['34', '999', '61']);
    expect(result.meanings.map((m) => m.kind)).toEqual(['unlabelled', 'missing', 'unlabelled']);
    expect(result.unlabelled).toEqual([]);
    expect(labellingWarnings(age, result, 'book.json')).toEqual([]);
  });
});
