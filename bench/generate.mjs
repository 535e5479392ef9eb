// Seeded benchmark files (kept out of git, in bench/data/).
//   scan-200k.csv : 200,000 rows x 30 categorical columns (2 to 9 levels; some columns depend on others);
//                   the same kind of file at 1M x 30, 10M x 30 (memory) and 200k x 100 (4,950 pairs)
//   pair-1m.csv   : 1,000,000 rows x 8 columns (about 60 MB)
//   pair-10m.csv  : ten times the pair file, for the streaming-memory check (only with --large)
//   weekly/       : 52 weekly files of 100,000 rows each (the pair file's columns), for waves
import { createWriteStream, existsSync, mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { mulberry32 } from '../scripts/seeded-random.mjs';

const here = dirname(fileURLToPath(import.meta.url));
export const DATA = join(here, 'data');


async function writeLines(path, header, rows, makeRow) {
  const out = createWriteStream(path);
  out.write(header + '\n');
  let buffer = [];
  for (let i = 0; i < rows; i++) {
    buffer.push(makeRow(i));
    if (buffer.length === 10000) {
      if (!out.write(buffer.join('\n') + '\n')) await new Promise((r) => out.once('drain', r));
      buffer = [];
    }
  }
  if (buffer.length) out.write(buffer.join('\n') + '\n');
  await new Promise((r) => out.end(r));
}

const LEVEL_WORDS = ['alpha', 'bravo', 'cedar', 'delta', 'ember', 'fjord', 'grove', 'heath', 'inlet'];

export async function scanFile(rows = 200_000, columns = 30, name = 'scan-200k.csv') {
  const path = join(DATA, name);
  if (existsSync(path)) return path;
  mkdirSync(DATA, { recursive: true });
  const random = mulberry32(30);
  const levels = Array.from({ length: columns }, (_v, k) => 2 + (k % 8));
  const header = Array.from({ length: columns }, (_v, k) => `q${String(k + 1).padStart(2, '0')}`).join(',');
  await writeLines(path, header, rows, () => {
    const row = [];
    for (let k = 0; k < columns; k++) {
      let level;
      if (k % 5 === 1 && random() < 0.4) level = Math.floor((row[k - 1] * levels[k]) / levels[k - 1]);
      else level = Math.floor(random() * levels[k]);
      row.push(level);
    }
    return row.map((l, k) => (random() < 0.01 ? '' : LEVEL_WORDS[l] + (k % 3 === 0 ? ' option' : ''))).join(',');
  });
  return path;
}

/**
 * A survey-sized file: 4,642 rows × 28 categorical columns of 2 to 15
 * levels with skewed (Zipf-like) shares, some columns depending on the one
 * before, 3% missing: many pairs fail the expected-count rule, as in real
 * survey exports of that size.
 */
export async function surveyFile() {
  const path = join(DATA, 'survey-4642.csv');
  if (existsSync(path)) return path;
  mkdirSync(DATA, { recursive: true });
  const random = mulberry32(4642);
  const columns = 28;
  const levels = Array.from({ length: columns }, (_v, k) => [2, 3, 4, 5, 6, 7, 9, 12, 15][k % 9]);
  const draw = (k) => {
    const weights = Array.from({ length: levels[k] }, (_v, i) => 1 / (i + 1) ** 1.3);
    let u = random() * weights.reduce((a, b) => a + b);
    for (let i = 0; i < weights.length; i++) {
      u -= weights[i];
      if (u <= 0) return i;
    }
    return levels[k] - 1;
  };
  const header = Array.from({ length: columns }, (_v, k) => `v${k + 1}`).join(',');
  await writeLines(path, header, 4642, () => {
    const row = [];
    for (let k = 0; k < columns; k++) {
      let level = draw(k);
      if (k % 4 === 1 && random() < 0.3) level = Math.min(levels[k] - 1, Math.floor((row[k - 1] * levels[k]) / levels[k - 1]));
      row.push(level);
    }
    return row.map((l) => (random() < 0.03 ? '' : `L${l}`)).join(',');
  });
  return path;
}

export async function pairFile(rows = 1_000_000, name = 'pair-1m.csv') {
  const path = join(DATA, name);
  if (existsSync(path)) return path;
  mkdirSync(DATA, { recursive: true });
  const random = mulberry32(8);
  const header = 'respondent,region,segment,channel,answer,score,basket,flag';
  await writeLines(path, header, rows, (i) => {
    const region = Math.floor(random() * 6);
    const segment = random() < 0.6 ? region % 4 : Math.floor(random() * 4);
    return [
      `U${i}`,
      LEVEL_WORDS[region],
      ['retail', 'trade', 'public', 'online'][segment],
      ['store', 'phone', 'web'][Math.floor(random() * 3)],
      ['yes', 'no', 'unsure'][Math.floor(random() * 3)],
      String(1 + Math.floor(random() * 5)),
      (random() * 200).toFixed(2),
      random() < 0.5 ? 'Y' : 'N',
    ].join(',');
  });
  return path;
}

/**
 * A year of weekly exports: 52 files of `rows` rows each (the pair file's
 * eight columns), named week-2025-W01.csv … week-2025-W52.csv, in which the
 * region × segment association drifts a little from week to week.
 */
export async function weeklyFiles(rows = 100_000, weeks = 52) {
  const dir = join(DATA, 'weekly');
  const name = (w) => join(dir, `week-2025-W${String(w).padStart(2, '0')}.csv`);
  if (existsSync(name(weeks))) return { dir, pattern: join(dir, 'week-2025-W*.csv'), files: Array.from({ length: weeks }, (_v, k) => name(k + 1)) };
  mkdirSync(dir, { recursive: true });
  const header = 'respondent,region,segment,channel,answer,score,basket,flag';
  for (let w = 1; w <= weeks; w++) {
    const random = mulberry32(1000 + w);
    const tie = 0.5 + (0.2 * w) / weeks;
    await writeLines(name(w), header, rows, (i) => {
      const region = Math.floor(random() * 6);
      const segment = random() < tie ? region % 4 : Math.floor(random() * 4);
      return [
        `W${w}-${i}`,
        LEVEL_WORDS[region],
        ['retail', 'trade', 'public', 'online'][segment],
        ['store', 'phone', 'web'][Math.floor(random() * 3)],
        ['yes', 'no', 'unsure'][Math.floor(random() * 3)],
        String(1 + Math.floor(random() * 5)),
        (random() * 200).toFixed(2),
        random() < 0.5 ? 'Y' : 'N',
      ].join(',');
    });
  }
  return { dir, pattern: join(dir, 'week-2025-W*.csv'), files: Array.from({ length: weeks }, (_v, k) => name(k + 1)) };
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  console.log(await scanFile());
  console.log(await pairFile());
  if (process.argv.includes('--large')) console.log(await pairFile(10_000_000, 'pair-10m.csv'));
}

/**
 * A weekly survey export for the banner: 100,000 respondents × 60 questions
 * (2 to 10 levels, some answers leaning on age band or region, 2% missing)
 * × 5 break variables (6 + 7 + 3 + 5 + 4 = 25 break columns) and a weight.
 */
export async function bannerFile(rows = 100_000, name = 'banner-100k.csv') {
  const path = join(DATA, name);
  if (existsSync(path)) return path;
  mkdirSync(DATA, { recursive: true });
  const random = mulberry32(2025);
  const breaks = [
    ['age_band', ['16-24', '25-34', '35-44', '45-54', '55-64', '65+']],
    ['region', ['north', 'north east', 'east', 'south', 'south west', 'west', 'capital']],
    ['membership', ['none', 'standard', 'premium']],
    ['income_band', ['under 20k', '20-35k', '35-50k', '50-75k', '75k+']],
    ['household', ['single', 'couple', 'family', 'shared']],
  ];
  const questions = 60;
  const levels = Array.from({ length: questions }, (_v, k) => 2 + (k % 9));
  const header = [...breaks.map(([n]) => n), ...Array.from({ length: questions }, (_v, k) => `q${String(k + 1).padStart(2, '0')}`), 'weight'].join(',');
  await writeLines(path, header, rows, () => {
    const codes = breaks.map(([, ls]) => Math.floor(random() * ls.length));
    const out = breaks.map(([, ls], b) => ls[codes[b]]);
    for (let k = 0; k < questions; k++) {
      let level;
      const lean = codes[k % 2] / (breaks[k % 2][1].length - 1);
      if (random() < 0.25) level = Math.min(levels[k] - 1, Math.floor(lean * levels[k]));
      else level = Math.floor(random() * levels[k]);
      out.push(random() < 0.02 ? '' : LEVEL_WORDS[level % 9] + (level >= 9 ? ' more' : ''));
    }
    out.push((0.4 + 1.6 * random()).toFixed(4));
    return out.join(',');
  });
  return path;
}

/**
 * A survey with a design, for the design-based bench: 1,000,000 rows in 50
 * strata of 2 PSUs each, a sampling weight that varies by stratum and row,
 * and 30 categorical columns of 2 to 9 levels (some depending on the column
 * before, some on the PSU, so that the design effects are not all 1; 1%
 * missing).
 */
export async function designFile(rows = 1_000_000, columns = 30, name = 'design-1m.csv') {
  const path = join(DATA, name);
  if (existsSync(path)) return path;
  mkdirSync(DATA, { recursive: true });
  const random = mulberry32(5002);
  const levels = Array.from({ length: columns }, (_v, k) => 2 + (k % 8));
  const header = ['stratum', 'psu', 'weight', ...Array.from({ length: columns }, (_v, k) => `q${String(k + 1).padStart(2, '0')}`)].join(',');
  await writeLines(path, header, rows, () => {
    const stratum = Math.floor(random() * 50);
    const psu = 1 + Math.floor(random() * 2);
    const weight = ((0.5 + 4.5 * random()) * (1 + (stratum % 3))).toFixed(3);
    const row = [];
    for (let k = 0; k < columns; k++) {
      let level;
      if (k % 5 === 1 && random() < 0.4) level = Math.floor((row[k - 1] * levels[k]) / levels[k - 1]);
      else if (random() < 0.15) level = (stratum * 2 + psu + k) % levels[k];
      else level = Math.floor(random() * levels[k]);
      row.push(level);
    }
    return [`s${String(stratum + 1).padStart(2, '0')}`, String(psu), weight, ...row.map((l, k) => (random() < 0.01 ? '' : LEVEL_WORDS[l] + (k % 3 === 0 ? ' option' : '')))].join(',');
  });
  return path;
}
