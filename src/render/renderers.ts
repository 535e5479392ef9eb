/**
 * One table per report kind: each output format a command offers and the
 * renderer that writes it. The commands take their --format choices from
 * these tables, so a format is added in one place.
 */
import type { ChalkInstance } from 'chalk';
import type { BannerReport } from '../analysis/banner.js';
import type { CompareReport } from '../analysis/compare.js';
import type { PairReport } from '../analysis/report.js';
import type { ScanReport } from '../analysis/scan.js';
import type { WavesReport } from '../analysis/waves.js';
import { renderBannerDelimited, renderBannerHtml, renderBannerMarkdown } from './bannerTables.js';
import { renderBannerText } from './bannerText.js';
import { renderCompareDelimited, renderCompareMarkdown } from './compareDelimited.js';
import { renderCompareText } from './compareText.js';
import { renderCompareHtml, renderPairHtml, renderScanHtml } from './html.js';
import { toJson } from './json.js';
import { renderPairDelimited, renderPairMarkdown } from './pairDelimited.js';
import { CellView, renderPairText } from './pairText.js';
import { renderScanDelimited, renderScanMarkdown, renderScanText } from './scanTable.js';
import { renderWavesDelimited, renderWavesMarkdown } from './wavesDelimited.js';
import { renderWavesHtml } from './wavesHtml.js';
import { renderWavesText } from './wavesText.js';
import { terminalSafeRecord } from '../escape/terminal.js';

/**
 * What a renderer may need besides the record: the colours of the terminal,
 * the page width and the cell view of text tables, and whether CSV/TSV cells
 * are written raw, for machine use (--raw-cells). Decisions come from the
 * record alone. Each format escapes what comes from the data at this edge:
 * text through src/escape/terminal.ts (here, on the whole record), HTML and
 * SVG through escape/markup.ts, Markdown through escape/markdown.ts, CSV and
 * TSV through escape/spreadsheet.ts (in their renderers); JSON escapes by
 * its own grammar.
 */
export interface RenderContext {
  paint: ChalkInstance;
  width: number;
  cells: CellView;
  rawCells?: boolean;
}

type Renderers<R> = Record<string, (report: R, context: RenderContext) => string>;

export const PAIR_RENDERERS = {
  text: (report, { paint, width, cells }) => renderPairText(terminalSafeRecord(report), paint, { width, cells }),
  json: (report) => toJson(report),
  csv: (report, { rawCells }) => renderPairDelimited(report, ',', rawCells),
  tsv: (report, { rawCells }) => renderPairDelimited(report, '\t', rawCells),
  markdown: (report) => renderPairMarkdown(report),
  html: (report) => renderPairHtml(report),
} satisfies Renderers<PairReport>;

export const SCAN_RENDERERS = {
  text: (report, { paint, width }) => renderScanText(terminalSafeRecord(report), paint, { width }),
  json: (report) => toJson(report),
  csv: (report, { rawCells }) => renderScanDelimited(report, ',', rawCells),
  tsv: (report, { rawCells }) => renderScanDelimited(report, '\t', rawCells),
  markdown: (report) => renderScanMarkdown(report),
  html: (report) => renderScanHtml(report),
} satisfies Renderers<ScanReport>;

export const COMPARE_RENDERERS = {
  text: (report, { paint, width, cells }) => renderCompareText(terminalSafeRecord(report), paint, { width, cells }),
  json: (report) => toJson(report),
  csv: (report, { rawCells }) => renderCompareDelimited(report, ',', rawCells),
  tsv: (report, { rawCells }) => renderCompareDelimited(report, '\t', rawCells),
  markdown: (report) => renderCompareMarkdown(report),
  html: (report) => renderCompareHtml(report),
} satisfies Renderers<CompareReport>;

export const WAVES_RENDERERS = {
  text: (report, { paint, width }) => renderWavesText(terminalSafeRecord(report), paint, { width }),
  json: (report) => toJson(report),
  csv: (report, { rawCells }) => renderWavesDelimited(report, ',', rawCells),
  tsv: (report, { rawCells }) => renderWavesDelimited(report, '\t', rawCells),
  markdown: (report) => renderWavesMarkdown(report),
  html: (report) => renderWavesHtml(report),
} satisfies Renderers<WavesReport>;

/** The banner's text formats; its spreadsheet (xlsx) is binary and written by render/bannerXlsx.ts. */
export const BANNER_RENDERERS = {
  text: (report, { paint, width }) => renderBannerText(terminalSafeRecord(report), paint, { width }),
  json: (report) => toJson(report),
  csv: (report, { rawCells }) => renderBannerDelimited(report, ',', rawCells),
  tsv: (report, { rawCells }) => renderBannerDelimited(report, '\t', rawCells),
  markdown: (report) => renderBannerMarkdown(report),
  html: (report) => renderBannerHtml(report),
} satisfies Renderers<BannerReport>;

export type BannerFormat = keyof typeof BANNER_RENDERERS;
export type PairFormat = keyof typeof PAIR_RENDERERS;
export type ScanFormat = keyof typeof SCAN_RENDERERS;
export type CompareFormat = keyof typeof COMPARE_RENDERERS;
export type WavesFormat = keyof typeof WAVES_RENDERERS;
