#!/usr/bin/env node
// Generates fixtures/demo/patron-survey.csv: an invented patron survey of a
// regional library network. Seeded, so the file is the same on every run.
// Built-in structure (so the demo has something to find):
//   age_band -> preferred_format      (younger patrons lean to ebooks and audio)
//   membership -> visit_frequency     (members come more often)
//   visit_frequency -> satisfaction   (ordered: frequent visitors rate higher)
//   branch is independent of preferred_format and of has_children
//   heard_via is sparse: "radio" is rare; satisfaction and heard_via have blanks
// Usage: node scripts/make-demo.mjs [rows] [seed] > file   (defaults write the fixture)
import { writeFileSync, mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { mulberry32 } from './seeded-random.mjs';

const rows = Number(process.argv[2] ?? 2400);
const seed = Number(process.argv[3] ?? 4217);

const random = mulberry32(seed);
const pick = (levels, weights) => {
  const total = weights.reduce((s, w) => s + w, 0);
  let u = random() * total;
  for (let i = 0; i < levels.length; i++) {
    u -= weights[i];
    if (u < 0) return levels[i];
  }
  return levels[levels.length - 1];
};

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

const lines = ['respondent_id,branch,age_band,membership,preferred_format,visit_frequency,satisfaction,heard_via,has_children,minutes_per_visit,survey_weight'];
for (let i = 1; i <= rows; i++) {
  const branch = pick(branches, [22, 18, 16, 15, 17, 12]);
  const age = pick(ages, ageWeights);
  const membership = pick(['member', 'non-member'], age === '65+' || age === '50-64' ? [68, 32] : [52, 48]);
  const format = pick(formats, formatByAge[age]);
  const frequency = pick(frequencies, frequencyByMembership[membership]);
  let satisfaction = pick(['1', '2', '3', '4', '5'], satisfactionByFrequency[frequency]);
  if (random() < 0.05) satisfaction = '';
  let heardVia = pick(heard, [34, 24, 20, 12, 9, 1]);
  if (random() < 0.08) heardVia = '';
  const children = pick(['yes', 'no'], [35, 65]);
  const minutes = Math.max(2, Math.round((frequency === 'weekly' ? 48 : 30) + 22 * (random() + random() + random() - 1.5) * 2 + random() * 10) + random()).toFixed(1);
  const weight = (weightByAge[age] * (0.85 + 0.3 * random())).toFixed(3);
  const quote = (s) => (s.includes(',') ? `"${s}"` : s);
  lines.push([`P${String(i).padStart(5, '0')}`, branch, age, membership, format, frequency, satisfaction, quote(heardVia), children, minutes, weight].join(','));
}
const text = lines.join('\n') + '\n';
if (process.argv[2] !== undefined) {
  process.stdout.write(text);
} else {
  const here = dirname(fileURLToPath(import.meta.url));
  const target = join(here, '..', 'fixtures', 'demo', 'patron-survey.csv');
  mkdirSync(dirname(target), { recursive: true });
  writeFileSync(target, text);
  process.stderr.write(`wrote ${target} (${rows} rows, seed ${seed})\n`);
}
