/** The profile report as text and Markdown. */
import type { ChalkInstance } from 'chalk';
import type { ColumnProfile, ProfileReport } from '../analysis/profile.js';
import { clip, formatCount } from './format.js';
import { wrapText } from './layout.js';

/**
 * The profile for people (text) and for reports (Markdown): one block per
 * column, what it looks like and what to do with it. Arranges the record;
 * decides nothing.
 */

/** Control characters from the data shown as visible escapes: src/escape/terminal.ts. */
export { terminalSafe } from '../escape/terminal.js';
import { terminalSafe } from '../escape/terminal.js';
import { markdownText } from '../escape/markdown.js';

const KIND_WORDS: Record<ColumnProfile['kind'], string> = {
  empty: 'empty',
  constant: 'constant',
  identifier: 'identifier',
  'free-text': 'free text',
  numeric: 'numeric',
  ordered: 'ordered',
  categorical: 'categorical',
};

function number(x: number): string {
  if (Number.isInteger(x)) return x.toLocaleString('en-US');
  return x.toLocaleString('en-US', { maximumSignificantDigits: 4 });
}

function valueText(value: string, label: string | null): string {
  const shown = clip(value, 30);
  return label !== null ? `${shown} "${clip(label, 30)}"` : `"${shown}"`;
}

/** The facts of a column as label/text lines, shared by the text and Markdown forms. */
function columnFacts(column: ColumnProfile): [string, string][] {
  const facts: [string, string][] = [];
  if (column.question !== null) facts.push(['question', column.question]);
  const parts = [`${formatCount(column.present)} with a value`, `${column.distinctExact ? '' : 'about '}${formatCount(column.distinct)} distinct`];
  if (column.empty > 0) parts.push(`${formatCount(column.empty)} empty`);
  facts.push(['values', parts.join(', ')]);
  const missing = [
    ...column.missingLooking.map((t) => `"${t.token}" ${formatCount(t.rows)}`),
    ...column.declaredMissing.map((t) => `"${t.token}" ${formatCount(t.rows)} (--missing)`),
    ...column.codedMissing.map((t) => `${t.code} ${t.reason} ${formatCount(t.rows)}`),
  ];
  if (missing.length > 0) facts.push(['missing', missing.join(', ')]);
  if (column.numeric) {
    const n = column.numeric;
    const quartiles = n.quartiles ? `, quartiles ${n.quartiles.map(number).join(' / ')}` : '';
    facts.push(['range', `${number(n.min)} to ${number(n.max)}, mean ${number(n.mean)}${quartiles}`]);
  }
  if (column.top.length > 0 && column.kind !== 'identifier' && column.kind !== 'free-text') {
    facts.push(['most', column.top.map((t) => `${valueText(t.value, t.label)} ${formatCount(t.rows)}`).join(', ')]);
  }
  if (column.order !== null && column.order.length <= 30) facts.push(['order', column.order.map((l) => clip(l, 30)).join(' < ')]);
  for (const s of column.suggestions) facts.push(['try', s]);
  return facts;
}

function heading(report: ProfileReport): string {
  return `${report.input.file}: ${formatCount(report.rows)} rows, ${report.columns.length} columns${report.codebook !== null ? `, codebook ${report.codebook}` : ''}`;
}

/** The profile as text of at most `width` columns: long facts wrap under their label; a suggestion ("try") stays on one line, to be copied whole. */
export function renderProfileText(report: ProfileReport, paint: ChalkInstance, width = 80): string {
  const out: string[] = [...wrapText(terminalSafe(heading(report)), width).map((l) => paint.bold(l)), ''];
  for (const column of report.columns) {
    out.push(...wrapText(terminalSafe(column.why), width, `${paint.bold(terminalSafe(column.name))}  ${paint.cyan(KIND_WORDS[column.kind])} — `, '    '));
    for (const [label, text] of columnFacts(column)) {
      // a suggestion holds options to copy into a shell: kept on one line, never broken between an option and its value
      if (label === 'try') out.push(`  ${label.padEnd(9)}${terminalSafe(text)}`);
      else out.push(...wrapText(terminalSafe(text), width, `  ${label.padEnd(9)}`, ' '.repeat(11)));
    }
    out.push('');
  }
  for (const note of report.notes) out.push(...wrapText(`note: ${terminalSafe(note)}`, width, '', '  ').map((l) => paint.yellow(l)));
  for (const warning of report.warnings) out.push(...wrapText(`warning: ${terminalSafe(warning.message)}`, width, '', '  ').map((l) => paint.yellow(l)));
  if (report.notes.length + report.warnings.length > 0) out.push('');
  return out.join('\n');
}

const cell = markdownText;

export function renderProfileMarkdown(report: ProfileReport): string {
  const out: string[] = [`**${cell(heading(report))}**`, '', '| column | kind | distinct | empty | missing-looking | most frequent |', '|---|---|--:|--:|---|---|'];
  for (const c of report.columns) {
    const top = c.kind === 'identifier' || c.kind === 'free-text' ? '' : c.top.map((t) => `${cell(t.label ?? t.value)} (${formatCount(t.rows)})`).join(', ');
    const missing = c.missingLooking.map((t) => `${cell(t.token)} (${formatCount(t.rows)})`).join(', ');
    out.push(`| ${cell(c.name)} | ${KIND_WORDS[c.kind]} | ${c.distinctExact ? '' : '~'}${formatCount(c.distinct)} | ${formatCount(c.empty)} | ${missing} | ${top} |`);
  }
  out.push('');
  for (const c of report.columns) {
    if (c.suggestions.length === 0 && c.question === null) continue;
    out.push(`- **${cell(c.name)}**${c.question !== null ? ` (${cell(c.question)})` : ''}: ${cell(c.why)}${c.suggestions.length > 0 ? `. ${c.suggestions.map((s) => cell(s)).join('; ')}` : ''}`);
  }
  for (const note of report.notes) out.push(`- ${cell(note)}`);
  for (const warning of report.warnings) out.push(`- ${cell(warning.message)}`);
  return out.join('\n') + '\n';
}
