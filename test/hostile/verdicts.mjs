// Hostile corpus, class 6: statuses and verdicts at the edges. A --where
// value or a --recode rule that no row holds is said in every format, by
// every command that takes them (a typo filters everything or nothing);
// compare of two periods with no level in common says that no comparison is
// possible and never "no change"; --exit-status never answers a question the
// report could not decide; a usage error is status 2 whatever became of
// standard error, and a closed standard output is status 1.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const expect = (condition, message) => {
  if (!condition) throw new Error(message);
};

/** The unmatched-value warnings of a JSON report. */
const unmatched = (out) => (out.warnings ?? []).filter((w) => w.code === 'unmatched-value').map((w) => w.message);

/** A JSON check: exactly these unmatched-value messages (each a pattern), in order. */
const saysUnmatched =
  (...patterns) =>
  (out) => {
    const messages = unmatched(out);
    expect(messages.length === patterns.length, `expected ${patterns.length} unmatched-value warnings, got ${JSON.stringify(messages)}`);
    patterns.forEach((p, k) => expect(p.test(messages[k]), `warning ${k + 1} ${JSON.stringify(messages[k])} does not match ${p}`));
  };

export function addVerdictCases({ dir, add }) {
  const folder = join(dir, 'verdicts');
  mkdirSync(folder, { recursive: true });
  const file = (name, content) => {
    const path = join(folder, name);
    writeFileSync(path, content);
    return path;
  };
  const lines = ['branch,member,age,year'];
  const branches = ['Old Town', 'Mill Lane', 'Northgate'];
  for (let i = 0; i < 60; i++) lines.push(`${branches[i % 3]},${i % 4 < 2 ? 'yes' : 'no'},${['16-24', '25-34', 'NA'][i % 5 === 0 ? 2 : i % 2]},${2024 + (i % 2)}`);
  const data = file('branches.csv', lines.join('\n') + '\n');
  const pair = (...rest) => ['pair', data, '--rows', 'branch', '--cols', 'member', ...rest];

  // --where and --recode values that no row holds: every command, every format.
  const typo = /^--where "branch=Nowhre,Old Town,Mill Lane": "Nowhre" never occurs in branch; it matches no row$/;
  add({ name: 'verdicts: a --where value no row holds is a warning (pair, JSON)', args: pair('--where', 'branch=Nowhre,Old Town,Mill Lane', '--format', 'json'), status: 0, json: saysUnmatched(typo) });
  add({ name: 'verdicts: a --where typo gets the closest value (pair)', args: pair('--where', 'branch!=Old Twn', '--format', 'json'), status: 0, json: saysUnmatched(/"Old Twn" never occurs in branch \(did you mean "Old Town"\?\); it drops no row$/) });
  add({ name: 'verdicts: a --where value in another case gets the value as written', args: pair('--where', 'branch=mill lane,Old Town,Northgate', '--format', 'json'), status: 0, json: saysUnmatched(/"mill lane" never occurs in branch \(did you mean "Mill Lane"\?\)/) });
  add({ name: 'verdicts: a --where value no row holds is said in text', args: pair('--where', 'branch=Nowhre,Old Town,Mill Lane'), status: 0, stdout: /Check before relying on it[^]*! --where "branch=Nowhre,Old Town,Mill Lane": "Nowhre" never occurs in\s+branch; it matches no row/ });
  add({ name: 'verdicts: a --where value no row holds is said in Markdown', args: pair('--where', 'branch=Nowhre,Old Town,Mill Lane', '--format', 'markdown'), status: 0, stdout: /- --where "branch=Nowhre,Old Town,Mill Lane": "Nowhre" never occurs in branch/ });
  add({ name: 'verdicts: a --where value no row holds is said in CSV', args: pair('--where', 'branch=Nowhre,Old Town,Mill Lane', '--format', 'csv'), status: 0, stdout: /warning,unmatched-value,.*"Nowhre"" never occurs in branch/ });
  add({ name: 'verdicts: a --where value no row holds is said in HTML', args: pair('--where', 'branch=Nowhre,Old Town,Mill Lane', '--format', 'html'), status: 0, stdout: /<p class="note">--where &quot;branch=Nowhre,Old Town,Mill Lane&quot;: &quot;Nowhre&quot; never occurs in branch/ });
  add({
    name: 'verdicts: a filter that leaves one level names the value no row holds in its one line',
    args: pair('--where', 'branch=Nowhre,Old Town'),
    status: 1,
    stderr: /^tabsight: column "branch" has a single level \("Old Town"\) in the counted rows; an association needs at least two; --where "branch=Nowhre,Old Town": "Nowhre" never occurs in branch; it matches no row$/,
  });
  add({ name: 'verdicts: a --where value that is a --missing token says it is missing', args: pair('--where', 'age=16-24,NA', '--missing', 'NA', '--format', 'json'), status: 0, json: saysUnmatched(/"NA" is read as a missing value, and a row with a missing value passes no filter; it matches no row$/) });
  add({
    name: 'verdicts: a --where value renamed by --recode says the filter reads recoded labels',
    args: pair('--recode', 'branch:Old Town=Centre', '--where', 'branch!=Old Town', '--format', 'json'),
    status: 0,
    json: saysUnmatched(/"Old Town" occurs in branch only before its recode or codebook labels, which --where reads; it drops no row$/),
  });
  add({ name: 'verdicts: a --recode rule no value takes is a warning', args: pair('--recode', 'branch:Old Twn=Centre,Mill Lane=Centre', '--format', 'json'), status: 0, json: saysUnmatched(/^--recode "branch:Old Twn=Centre": "Old Twn" never occurs in branch \(did you mean "Old Town"\?\); the rule renames nothing$/) });
  add({ name: 'verdicts: a --recode of a single number no value equals is a warning', args: ['pair', data, '--rows', 'year', '--cols', 'member', '--recode', 'year:2024=early,2042=late', '--format', 'json'], status: 0, json: saysUnmatched(/"2042" never occurs in year; the rule renames nothing$/) });
  add({ name: 'verdicts: a --recode range with no number in it is no typo', args: ['pair', data, '--rows', 'year', '--cols', 'member', '--recode', 'year:<2000=old,2024=early', '--format', 'json'], status: 0, json: saysUnmatched() });
  add({ name: 'verdicts: values that do occur give no warning', args: pair('--where', 'branch!=Northgate', '--recode', 'age:16-24=young', '--format', 'json'), status: 0, json: saysUnmatched() });
  add({ name: 'verdicts: a --where value no row holds is a warning (scan)', args: ['scan', data, '--where', 'branch!=Nowhre', '--format', 'json'], status: 0, json: saysUnmatched(/^--where "branch!=Nowhre": "Nowhre" never occurs in branch; it drops no row$/) });
  add({ name: 'verdicts: a --recode rule no value takes is a warning (scan)', args: ['scan', data, '--recode', 'age:16-2=young', '--format', 'json'], status: 0, json: saysUnmatched(/^--recode "age:16-2=young": "16-2" never occurs in age \(did you mean "16-24"\?\); the rule renames nothing$/) });
  add({ name: 'verdicts: scan text says it', args: ['scan', data, '--where', 'branch!=Nowhre'], status: 0, stdout: /Check before relying on it[^]*"Nowhre" never occurs in branch/ });
  add({ name: 'verdicts: scan Markdown says it', args: ['scan', data, '--where', 'branch!=Nowhre', '--format', 'markdown'], status: 0, stdout: /- --where "branch!=Nowhre": "Nowhre" never occurs in branch/ });
  add({ name: 'verdicts: scan HTML says it', args: ['scan', data, '--where', 'branch!=Nowhre', '--format', 'html'], status: 0, stdout: /<p class="note">--where &quot;branch!=Nowhre&quot;: &quot;Nowhre&quot; never occurs in branch/ });
  add({ name: 'verdicts: scan CSV, one line per pair, says it on standard error', args: ['scan', data, '--where', 'branch!=Nowhre', '--format', 'csv'], status: 0, stderr: /^tabsight: note: --where "branch!=Nowhre": "Nowhre" never occurs in branch; it drops no row$/m });
  add({ name: 'verdicts: count says it on standard error', args: ['count', data, '--rows', 'branch', '--cols', 'member', '--where', 'branch=Nowhre,Old Town'], status: 0, stderr: /^tabsight: note: --where "branch=Nowhre,Old Town": "Nowhre" never occurs in branch; it matches no row$/m, stdout: /^branch,member,count\nOld Town,no,10\nOld Town,yes,10\n$/ });
  add({ name: 'verdicts: compare with --period says it', args: ['compare', data, '--period', 'year', '--rows', 'branch', '--cols', 'member', '--where', 'age!=99', '--format', 'json'], status: 0, json: saysUnmatched(/^--where "age!=99": "99" never occurs in age; it drops no row$/) });
  const early = file('early.csv', 'branch,member\nOld Town,yes\nOld Town,no\nMill Lane,yes\nMill Lane,no\nMill Lane,no\nOld Town,yes\n');
  const late = file('late.csv', 'branch,member\nOld Town,yes\nOld Town,no\nNorthgate,yes\nMill Lane,no\nMill Lane,no\nOld Town,yes\n');
  add({
    name: 'verdicts: compare of two files warns of a value neither holds, not of one that one file holds',
    args: ['compare', early, late, '--rows', 'branch', '--cols', 'member', '--where', 'branch!=Northgate,Nowhre', '--format', 'json'],
    status: 0,
    json: saysUnmatched(/^--where "branch!=Northgate,Nowhre": "Nowhre" never occurs in branch; it drops no row$/),
  });
  add({ name: 'verdicts: compare text says it', args: ['compare', early, late, '--rows', 'branch', '--cols', 'member', '--where', 'branch!=Nowhre'], status: 0, stdout: /! --where "branch!=Nowhre": "Nowhre" never occurs in branch/ });
  add({ name: 'verdicts: waves says it', args: ['waves', data, '--period', 'year', '--rows', 'branch', '--cols', 'member', '--recode', 'member:yess=y', '--format', 'json'], status: 0, json: saysUnmatched(/^--recode "member:yess=y": "yess" never occurs in member \(did you mean "yes"\?\); the rule renames nothing$/) });
  add({ name: 'verdicts: waves CSV says it on standard error', args: ['waves', early, late, '--rows', 'branch', '--cols', 'member', '--where', 'branch!=Nowhre', '--format', 'csv', '--wave-order', 'given'], status: 0, stderr: /^tabsight: note: --where "branch!=Nowhre": "Nowhre" never occurs in branch; it drops no row$/m });
  add({ name: 'verdicts: banner says it', args: ['banner', data, '--break', 'member', '--questions', 'branch,age', '--where', 'branch!=Nowhre', '--format', 'json'], status: 0, json: saysUnmatched(/^--where "branch!=Nowhre": "Nowhre" never occurs in branch; it drops no row$/) });
  add({ name: 'verdicts: banner CSV says it on standard error', args: ['banner', data, '--break', 'member', '--questions', 'branch,age', '--where', 'branch!=Nowhre', '--format', 'csv'], status: 0, stderr: /^tabsight: note: --where "branch!=Nowhre": "Nowhre" never occurs in branch/m });
}
