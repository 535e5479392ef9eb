/**
 * The banner as a spreadsheet (.xlsx, written with exceljs): a "Banner"
 * sheet laid out for reading and pasting, and a "Notes" sheet on method.
 * The long table (one line per question × row × column) is the CSV output;
 * it is left out of the workbook, where its quarter of a million cells for
 * a weekly export would triple the time to write it.
 *
 * One banner sheet with every break variable side by side, not a sheet per
 * break variable: a row of the sheet is then one answer across all the
 * demographics, as it is pasted into a report, and the Total is shown once.
 * Each banner column takes two spreadsheet columns: the number (stored as a
 * number with a % or count format) and the letters of its significant
 * differences in a cell of their own, so that filters and formulas work on
 * both. Everything from the data is written as a plain text cell, never as
 * a formula.
 */
import ExcelJS from 'exceljs';
import { neutraliseFormula } from '../escape/spreadsheet.js';
import type { BannerQuestion, BannerReport } from '../analysis/banner.js';
import { associationWords, bannerInputLine, methodNotes, questionHeading, showsWeightedBase } from './bannerWords.js';
import { CAUTION } from './words.js';

/** Rows of the Banner sheet above the data (frozen). */
export const BANNER_HEADER_ROWS = 3;

const PERCENT = '0%';
const COUNT = '#,##0';
const WEIGHTED = '#,##0.0';
const MEAN = '0.00';
const STANDARD_ERROR = '0.0%';
const RATIO = '0.00';

/**
 * Text from the data, as a cell value: always a string cell (exceljs writes
 * a formula only for {formula} values), and neutralised as the CSV output
 * is (escape/spreadsheet.ts: a leading apostrophe before a text a
 * spreadsheet would run as a formula), so that editing the cell later does
 * not turn it into one.
 */
function text(value: string): string {
  return neutraliseFormula(value.replace(/\u00a0/g, ' '));
}

export interface WorkbookOptions {
  /** The date the notes give (the run's own clock; fixed in tests). */
  created: Date;
}

export async function bannerWorkbook(report: BannerReport, options: WorkbookOptions): Promise<Uint8Array> {
  const workbook = new ExcelJS.Workbook();
  workbook.creator = 'tabsight';
  workbook.created = options.created;
  workbook.modified = options.created;
  bannerSheet(workbook, report);
  notesSheet(workbook, report, options);
  // Fast deflate (level 1): the sheet is mostly repeated XML, which it still packs well.
  const buffer = await workbook.xlsx.writeBuffer({ zip: { compression: 'DEFLATE', compressionOptions: { level: 1 } } } as ExcelJS.XlsxWriteOptions);
  return new Uint8Array(buffer as ArrayBuffer);
}

function bannerSheet(workbook: ExcelJS.Workbook, report: BannerReport): void {
  const sheet = workbook.addWorksheet('Banner', { views: [{ state: 'frozen', xSplit: 1, ySplit: BANNER_HEADER_ROWS }] });
  const columns = report.columns;
  // Spreadsheet column of banner column j's value (its marks are in the next one).
  const at = (j: number) => 2 + 2 * j;
  const groupRow = sheet.getRow(1);
  const levelRow = sheet.getRow(2);
  const keyRow = sheet.getRow(3);
  groupRow.getCell(1).value = text(report.input.file);
  levelRow.getCell(at(0)).value = 'Total';
  for (const b of report.breaks) {
    groupRow.getCell(at(b.first)).value = text(b.title ? `${b.name} · ${b.title}` : b.name);
    for (let j = b.first; j < b.first + b.count; j++) {
      levelRow.getCell(at(j)).value = text(columns[j].level);
      keyRow.getCell(at(j)).value = `(${columns[j].key})`;
      keyRow.getCell(at(j) + 1).value = 'higher than';
    }
  }
  for (const r of [groupRow, levelRow, keyRow]) r.font = { bold: true };
  keyRow.font = { italic: true, color: { argb: 'FF666666' } };
  sheet.getColumn(1).width = 40;
  for (let j = 0; j < columns.length; j++) {
    sheet.getColumn(at(j)).width = 10;
    sheet.getColumn(at(j) + 1).width = 6;
  }
  let row = BANNER_HEADER_ROWS + 1;
  for (const q of report.questions) row = questionRows(sheet, q, report, row, at) + 1;
}

function questionRows(sheet: ExcelJS.Worksheet, q: BannerQuestion, report: BannerReport, start: number, at: (j: number) => number): number {
  let row = start;
  const heading = sheet.getRow(row++);
  heading.getCell(1).value = text(`${questionHeading(q)}${q.kind === 'multiple' ? ' (multiple response: % of respondents)' : ''}`);
  heading.font = { bold: true };
  for (const r of q.rows) {
    for (const [k, part] of report.settings.cells.entries()) {
      const line = sheet.getRow(row++);
      line.getCell(1).value = text(k === 0 ? (r.kind === 'net' ? `net: ${r.label}` : r.label) : '');
      r.cells.forEach((cell, j) => {
        const value = line.getCell(at(j));
        if (part === 'count') {
          value.value = cell.count;
          value.numFmt = Number.isInteger(cell.count) ? COUNT : WEIGHTED;
        } else if (part === 'se') {
          value.value = cell.standardError === null ? null : cell.standardError / 100;
          value.numFmt = STANDARD_ERROR;
        } else {
          const percent = part === 'col' ? cell.columnPercent : cell.rowPercent;
          value.value = percent === null ? null : percent / 100;
          value.numFmt = PERCENT;
        }
        if (k === 0 && part !== 'count' && cell.marks !== '') line.getCell(at(j) + 1).value = cell.marks;
      });
      if (r.kind === 'net') line.font = { italic: true };
    }
  }
  if (q.means) {
    const mean = sheet.getRow(row++);
    const sd = sheet.getRow(row++);
    mean.getCell(1).value = 'mean';
    sd.getCell(1).value = 'standard deviation';
    q.means.forEach((m, j) => {
      Object.assign(mean.getCell(at(j)), { value: m.mean, numFmt: MEAN });
      Object.assign(sd.getCell(at(j)), { value: m.sd, numFmt: MEAN });
      if (m.marks !== '') mean.getCell(at(j) + 1).value = m.marks;
    });
    mean.font = { bold: true };
    if (report.design) {
      const se = sheet.getRow(row++);
      se.getCell(1).value = 'standard error of the mean';
      q.means.forEach((m, j) => Object.assign(se.getCell(at(j)), { value: m.standardError, numFmt: MEAN }));
    }
  }
  const base = sheet.getRow(row++);
  base.getCell(1).value = q.kind === 'multiple' ? 'base (respondents)' : 'base';
  q.bases.forEach((b, j) => {
    Object.assign(base.getCell(at(j)), { value: b.unweighted, numFmt: COUNT });
    if (b.small) base.getCell(at(j) + 1).value = 'small base';
  });
  base.font = { color: { argb: 'FF555555' } };
  if (showsWeightedBase(report)) {
    const weighted = sheet.getRow(row++);
    weighted.getCell(1).value = 'weighted base';
    q.bases.forEach((b, j) => Object.assign(weighted.getCell(at(j)), { value: b.weighted, numFmt: WEIGHTED }));
  }
  if (report.design) {
    const effect = sheet.getRow(row++);
    effect.getCell(1).value = 'design effect';
    q.bases.forEach((b, j) => Object.assign(effect.getCell(at(j)), { value: b.designEffect, numFmt: RATIO }));
  }
  for (const t of q.tests) sheet.getRow(row++).getCell(1).value = text(associationWords(t, report.settings.alpha));
  return row;
}

function notesSheet(workbook: ExcelJS.Workbook, report: BannerReport, options: WorkbookOptions): void {
  const sheet = workbook.addWorksheet('Notes');
  sheet.getColumn(1).width = 26;
  sheet.getColumn(2).width = 120;
  const s = report.settings;
  const rows: [string, string | number][] = [
    ['input file', text(report.input.file)],
    ['respondents', report.respondents],
    ['summary', text(bannerInputLine(report))],
    ['made', options.created.toISOString()],
    ['tool', `tabsight ${report.tool.version}`],
    ['break variables', text(report.breaks.map((b) => b.name).join(', '))],
    ['weighting', report.design ? 'sampling weights of the survey design' : report.weighting === 'weight' ? "sampling weights (column tests on Kish's effective bases)" : report.weighting === 'freq' ? 'frequency weights' : 'none'],
    ['design', report.designNote ?? 'none'],
    ['column test', report.design ? 'design-based t-test of the difference of two domain shares within each break variable (with their covariance)' : 'pooled two-proportion z-test within each break variable'],
    ['mean test', report.design ? 'design-based t-test of the difference of two domain means within each break variable (with their covariance)' : "Welch's t-test within each break variable"],
    ['confidence levels', s.confidenceLevels.map((l) => `${Number((l * 100).toPrecision(6))}%`).join(' (upper-case letters), ') + (s.confidenceLevels.length > 1 ? ' (lower-case letters)' : '')],
    ['multiple comparisons', s.adjustment === 'none' ? 'none' : `${s.adjustment} within each row of a break variable`],
    ['minimum base', s.minimumBase],
    ['overall test α', s.alpha],
    ['multiple-response correction', s.multipleResponseReferral],
  ];
  for (const [name, value] of rows) sheet.addRow([name, value]);
  sheet.addRow([]);
  for (const note of methodNotes(report)) sheet.addRow(['note', note]);
  for (const w of report.warnings) sheet.addRow(['check', text(w.message)]);
  for (const skipped of report.skipped) sheet.addRow(['left out', text(`${skipped.column}: ${skipped.reason}`)]);
  sheet.addRow(['caution', CAUTION]);
  sheet.getColumn(1).font = { bold: true };
}
