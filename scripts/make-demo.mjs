#!/usr/bin/env node
// Generates fixtures/demo/patron-survey.csv: an invented patron survey of a
// regional library network. Seeded, so the file is the same on every run.
// Built-in structure (so the demo has something to find):
//   age_band -> preferred_format      (younger patrons lean to ebooks and audio)
//   membership -> visit_frequency     (members come more often)
//   visit_frequency -> satisfaction   (ordered: frequent visitors rate higher)
//   branch is independent of preferred_format and of has_children
//   heard_via is sparse: "radio" is rare; satisfaction and heard_via have blanks
// Also writes fixtures/demo/weekly/patron-2026-W01.csv … W12.csv: twelve
// invented weekly exports of the same survey (300 patrons a week, their own
// seed), in which younger patrons turn to ebooks a little more each week, so
// that age_band -> preferred_format grows over the weeks and the format
// margin drifts (for `tabsight waves`).
// Usage: node scripts/make-demo.mjs [rows] [seed] > file   (defaults write the fixtures)
import { writeFileSync, mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { mulberry32 } from './seeded-random.mjs';

const rows = Number(process.argv[2] ?? 2400);
const seed = Number(process.argv[3] ?? 4217);

const random = mulberry32(seed);

const branches = ['Harbour Street', 'Mill Lane', 'Northgate', 'Old Town', 'Riverside', 'Westfield'];
const ages = ['16-24', '25-34', '35-49', '50-64', '65+'];
const formats = ['print', 'ebook', 'audiobook', 'no preference'];
const frequencies = ['weekly', 'monthly', 'a few times a year', 'rarely'];
const heard = ['friend or family', 'website', 'social media', 'school or college', 'poster', 'radio'];

const formatByAge = {
  '16-24': [25, 40, 22, 13],
  '25-34': [32, 36, 20, 12],
  '35-49': [45, 26, 17, 12],
  '50-64': [58, 18, 13, 11],
  '65+': [70, 9, 12, 9],
};
const frequencyByMembership = {
  member: [38, 36, 18, 8],
  'non-member': [10, 24, 36, 30],
};
const satisfactionByFrequency = {
  weekly: [2, 5, 14, 39, 40],
  monthly: [3, 8, 22, 40, 27],
  'a few times a year': [6, 12, 32, 33, 17],
  rarely: [10, 18, 35, 25, 12],
};
const ageWeights = [14, 19, 25, 23, 19];
// Survey weights undo an invented over-sampling of older patrons.
const weightByAge = { '16-24': 1.42, '25-34': 1.18, '35-49': 0.97, '50-64': 0.88, '65+': 0.81 };

const HEADER = 'respondent_id,branch,age_band,membership,preferred_format,visit_frequency,satisfaction,heard_via,has_children,minutes_per_visit,survey_weight';

/** One respondent's line, drawn from `draw` (the order of the draws is part of the fixture). */
function respondent(draw, id, formatsByAge) {
  const choose = (levels, weights) => {
    const total = weights.reduce((sum, w) => sum + w, 0);
    let u = draw() * total;
    for (let i = 0; i < levels.length; i++) {
      u -= weights[i];
      if (u < 0) return levels[i];
    }
    return levels[levels.length - 1];
  };
  const branch = choose(branches, [22, 18, 16, 15, 17, 12]);
  const age = choose(ages, ageWeights);
  const membership = choose(['member', 'non-member'], age === '65+' || age === '50-64' ? [68, 32] : [52, 48]);
  const format = choose(formats, formatsByAge[age]);
  const frequency = choose(frequencies, frequencyByMembership[membership]);
  let satisfaction = choose(['1', '2', '3', '4', '5'], satisfactionByFrequency[frequency]);
  if (draw() < 0.05) satisfaction = '';
  let heardVia = choose(heard, [34, 24, 20, 12, 9, 1]);
  if (draw() < 0.08) heardVia = '';
  const children = choose(['yes', 'no'], [35, 65]);
  const minutes = Math.max(2, Math.round((frequency === 'weekly' ? 48 : 30) + 22 * (draw() + draw() + draw() - 1.5) * 2 + draw() * 10) + draw()).toFixed(1);
  const weight = (weightByAge[age] * (0.85 + 0.3 * draw())).toFixed(3);
  const quote = (text) => (text.includes(',') ? `"${text}"` : text);
  return [id, branch, age, membership, format, frequency, satisfaction, quote(heardVia), children, minutes, weight].join(',');
}

const lines = [HEADER];
for (let i = 1; i <= rows; i++) lines.push(respondent(random, `P${String(i).padStart(5, '0')}`, formatByAge));
const text = lines.join('\n') + '\n';
if (process.argv[2] !== undefined) {
  process.stdout.write(text);
} else {
  const here = dirname(fileURLToPath(import.meta.url));
  const target = join(here, '..', 'fixtures', 'demo', 'patron-survey.csv');
  mkdirSync(dirname(target), { recursive: true });
  writeFileSync(target, text);
  process.stderr.write(`wrote ${target} (${rows} rows, seed ${seed})\n`);
  // Twelve weekly waves: each week younger patrons move a little from print to ebooks.
  const weekly = join(dirname(target), 'weekly');
  mkdirSync(weekly, { recursive: true });
  const draw = mulberry32(2026);
  for (let week = 1; week <= 12; week++) {
    const shift = week - 1;
    const byAge = {
      ...formatByAge,
      '16-24': [25 - 1.5 * shift, 40 + 2.5 * shift, 22, 13],
      '25-34': [32 - 1 * shift, 36 + 1.5 * shift, 20, 12],
    };
    const out = [HEADER];
    for (let i = 1; i <= 300; i++) out.push(respondent(draw, `W${String(week).padStart(2, '0')}-${String(i).padStart(4, '0')}`, byAge));
    const name = `patron-2026-W${String(week).padStart(2, '0')}.csv`;
    writeFileSync(join(weekly, name), out.join('\n') + '\n');
  }
  process.stderr.write(`wrote ${weekly}/patron-2026-W01.csv … W12.csv (300 rows each, seed 2026)\n`);
}
