// Hostile corpus, class 6: statuses and verdicts at the edges. A --where
// value or a --recode rule that no row holds is said in every format, by
// every command that takes them (a typo filters everything or nothing);
// compare of two periods with no level in common says that no comparison is
// possible and never "no change"; --exit-status never answers a question the
// report could not decide; a usage error is status 2 whatever became of
// standard error, and a closed standard output is status 1.
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
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

  // compare of periods with no level in common: no comparison, in every format; --exit-status has no answer (status 1, one line).
  const strong = file('strong.csv', 'a,b\nx,1\nx,1\nx,1\ny,2\ny,2\ny,2\n');
  const otherRows = file('other-rows.csv', 'a,b\np,1\np,2\nq,1\nq,2\np,1\np,2\nq,1\nq,2\n');
  const otherBoth = file('other-both.csv', 'a,b\np,3\np,4\nq,3\nq,4\np,3\np,4\nq,3\nq,4\n');
  const compare = (after, ...rest) => ['compare', strong, after, '--rows', 'a', '--cols', 'b', ...rest];
  const noComparison = (columns) => (out) => {
    expect(JSON.stringify(out.noSharedLevel) === JSON.stringify(columns), `noSharedLevel ${JSON.stringify(out.noSharedLevel)}`);
    expect(out.verdict === null && out.change === null && out.interaction === null, 'a change was tested');
    expect(out.warnings[0].code === 'no-shared-level' && /share no level of a.*, so no comparison of the periods is possible/.test(out.warnings[0].message), `first warning ${JSON.stringify(out.warnings[0])}`);
  };
  add({ name: 'verdicts: compare of periods sharing no row level says no comparison is possible (JSON)', args: compare(otherRows, '--format', 'json'), status: 0, json: (out) => { noComparison(['a'])(out); expect(out.rowShift === null && out.colShift !== null, 'the shift of the side with no shared level was tested'); } });
  add({ name: 'verdicts: compare of periods sharing no level at all (JSON)', args: compare(otherBoth, '--format', 'json'), status: 0, json: (out) => { noComparison(['a', 'b'])(out); expect(out.rowShift === null && out.colShift === null, 'a shift was tested'); } });
  add({ name: 'verdicts: compare of periods sharing no level leads with it in text', args: compare(otherBoth), status: 0, stdout: /\n□ No comparison is possible: [^]*other-both\.csv share\s+no\s+level\s+of\s+a\s+or\s+of\s+b\n/ });
  add({ name: 'verdicts: compare of periods sharing no level leads with it in HTML', args: compare(otherBoth, '--format', 'html'), status: 0, stdout: /<p class="lead">No comparison is possible: [^<]*share no level of a or of b<\/p>/ });
  add({ name: 'verdicts: compare of periods sharing no level: --exit-status has no answer (status 1, never 3)', args: compare(otherRows, '--exit-status', '--format', 'json'), status: 1, stderr: /^tabsight: --exit-status has no answer: .*strong\.csv and .*other-rows\.csv share no level of a, so no comparison of the periods is possible$/, json: noComparison(['a']) });
  const periods = file('periods.csv', 'p,a,b\n1,x,1\n1,x,2\n1,y,1\n1,y,2\n1,x,1\n2,z,1\n2,w,2\n2,z,2\n2,w,1\n2,w,2\n');
  add({ name: 'verdicts: compare --period of levels sharing no level', args: ['compare', periods, '--period', 'p', '--rows', 'a', '--cols', 'b', '--exit-status', '--format', 'json'], status: 1, stderr: /^tabsight: --exit-status has no answer: p 1 and p 2 share no level of a, so no comparison/, json: noComparison(['a']) });
  const oneLevel = file('one-level.csv', 'a,b\nx,1\nx,2\nx,1\n');
  const oneLevelToo = file('one-level-too.csv', 'a,b\nx,1\nx,2\nx,2\n');
  add({ name: 'verdicts: compare whose change cannot be tested: --exit-status has no answer', args: ['compare', oneLevel, oneLevelToo, '--rows', 'a', '--cols', 'b', '--exit-status'], status: 1, stderr: /^tabsight: --exit-status has no answer: whether the association changed cannot be tested for these tables$/ });
  add({ name: 'verdicts: compare that can be compared keeps 0 or 3 under --exit-status', args: ['compare', early, late, '--rows', 'branch', '--cols', 'member', '--exit-status'], status: 3, stderrElsewhere: true });

  const untestable = file('untestable.csv', 'a,b\nx,\ny,\n,1\n,2\nx,\n,1\n');
  add({ name: 'verdicts: a scan in which no pair could be tested: --exit-status has no answer', args: ['scan', untestable, '--exit-status', '--format', 'json'], status: 1, stderr: /^tabsight: --exit-status has no answer: no pair could be tested \(1 untestable\), so none was found or ruled out$/, json: (out) => expect(out.pairsTested === 0 && out.untestable.length === 1, `tested ${out.pairsTested}`) });

  const minutes = file('minutes.csv', 'member,minutes\nyes,10\nno,12\nyes,14\nno,9\nyes,11\nno,13\n');
  add({ name: 'verdicts: a banner with no test of association (means only): --exit-status has no answer', args: ['banner', minutes, '--break', 'member', '--questions', 'minutes', '--means', 'minutes', '--exit-status', '--format', 'json'], status: 1, stderr: /^tabsight: --exit-status has no answer: no question × break variable has a test of association/, engine: false });

  // waves: a wave sharing no level with the others is left out of the tests across waves; with fewer than two left, no answer.
  const w1 = file('w1.csv', 'a,b\nx,1\nx,1\nx,2\ny,2\ny,2\ny,1\nx,1\ny,2\n');
  const w2 = file('w2.csv', 'a,b\np,1\np,1\np,2\nq,2\nq,2\nq,1\np,1\nq,1\n');
  const w3 = file('w3.csv', 'a,b\nx,1\nx,2\nx,2\ny,2\ny,1\ny,1\nx,1\ny,2\n');
  const waves = (...files) => ['waves', ...files, '--rows', 'a', '--cols', 'b', '--wave-order', 'given'];
  add({
    name: 'verdicts: waves leave a wave sharing no level out of the tests across waves',
    args: [...waves(w1, w2, w3), '--format', 'json'],
    status: 0,
    json: (out) => {
      expect(JSON.stringify(out.isolatedWaves) === '["w2"]', `isolated ${JSON.stringify(out.isolatedWaves)}`);
      expect(out.warnings[0].code === 'wave-shares-no-level' && /wave w2 shares no level of a or of b with the other waves/.test(out.warnings[0].message), JSON.stringify(out.warnings[0]));
      const pattern = out.statements.find((st) => st.kind === 'pattern');
      expect(pattern.waves === 2 && pattern.first === 'w1' && pattern.last === 'w3', `compared ${JSON.stringify(pattern)}`);
      expect(JSON.stringify(out.latest.noSharedLevel) === '["a"]' && out.latest.verdict === null, 'the last two waves were compared');
    },
  });
  add({ name: 'verdicts: waves of two waves sharing no level: no comparison, --exit-status has no answer', args: [...waves(w1, w2), '--exit-status', '--format', 'json'], status: 1, stderr: /^tabsight: --exit-status has no answer: fewer than two of the 2 waves share levels of both sides with another wave, so no comparison over the waves is possible$/, json: (out) => expect(out.verdict.pattern === 'untestable' && out.sameAssociation === null && out.trend === null, `verdict ${JSON.stringify(out.verdict)}`) });
  add({ name: 'verdicts: waves of two waves sharing no level say so in text', args: waves(w1, w2), status: 0, stdout: /□ No comparison is possible from w1 to w2: the two waves share no level of a\n[^]*□ No comparison over the 2 waves is possible/ });

  // Usage errors keep status 2 whatever became of standard error; a closed standard output is status 1.
  add({ name: 'verdicts: a usage error with standard error closed (2>&-) is status 2', args: ['pair', 'x', '--bogus'], mode: 'shell', shell: (p) => `${p} 2>&-`, status: 2, stderrElsewhere: true, engine: false });
  add({ name: 'verdicts: a missing column with standard error closed is status 2', args: pair('--rows', 'nosuch'), mode: 'shell', shell: (p) => `${p} 2>&-`, status: 2, stderrElsewhere: true, engine: false });
  add({ name: 'verdicts: a data error with standard error closed is status 1', args: ['pair', join(folder, 'missing.csv'), '--rows', 'a', '--cols', 'b'], mode: 'shell', shell: (p) => `${p} 2>&-`, status: 1, stderrElsewhere: true, engine: false });
  add({ name: 'verdicts: no association under --exit-status with standard error closed is status 3', args: ['pair', early, '--rows', 'branch', '--cols', 'member', '--exit-status'], mode: 'shell', shell: (p) => `${p} 2>&- >/dev/null`, status: 3, stderrElsewhere: true, engine: false });
  add({ name: 'verdicts: standard output and standard error both closed is status 1', args: pair(), mode: 'shell', shell: (p) => `${p} >&- 2>&-`, status: 1, stderrElsewhere: true, engine: false });
  add({ name: 'verdicts: a usage error with standard output closed is still status 2', args: pair('--bogus'), mode: 'shell', shell: (p) => `${p} >&-`, status: 2, stderr: /^tabsight: unknown option '--bogus'$/, engine: false });

  // Found by a fresh look at the other classes: side inputs are inputs too, standard input is read once, threads are bounded.
  const book = file('codebook.json', JSON.stringify({ codebook: 1, columns: [{ name: 'branch', question: 'Which branch?' }] }));
  add({ name: 'outputs: banner --output naming its --codebook is refused', args: ['banner', data, '--break', 'member', '--codebook', book, '--format', 'json', '--output', book], status: 2, stderr: /--output .*codebook\.json is the input file .*codebook\.json; writing there would destroy the data/, after: () => expect(readFileSync(book, 'utf8').includes('Which branch?'), 'the codebook was overwritten') });
  add({ name: 'outputs: count --output naming its --codebook is refused', args: ['count', data, '--rows', 'branch', '--cols', 'member', '--codebook', book, '--output', book], status: 2, stderr: /--output .*codebook\.json is the input file/ });
  const weighted = file('replicates.csv', 'a,b,w,r1,r2\nx,1,1,1,1\ny,2,1,1,1\nx,2,1,1,1\ny,1,1,1,1\nx,1,1,1,1\n');
  const scales = file('scales.txt', '0.5\n0.5\n');
  add({
    name: 'outputs: --output naming the --replicate-scales file is refused',
    args: ['pair', weighted, '--rows', 'a', '--cols', 'b', '--weight', 'w', '--replicate-weights', 'r1,r2', '--replicate-method', 'jkn', '--replicate-scales', scales, '--output', scales],
    status: 2,
    stderr: /--output .*scales\.txt is the input file/,
    after: () => expect(readFileSync(scales, 'utf8') === '0.5\n0.5\n', 'the scales file was overwritten'),
    engine: false,
  });
  add({ name: 'streams: compare - - is refused (standard input is read once)', args: ['compare', '-', '-', '--rows', 'branch', '--cols', 'member'], stdin: readFileSync(data), status: 2, stderr: /^tabsight: standard input is named 2 times \(-, -\); it is read once/ });
  add({ name: 'streams: merge - - is refused (standard input is read once)', args: ['merge', '-', '-'], stdin: 'a,b,count\nx,1,1\n', status: 2, stderr: /^tabsight: standard input is named 2 times/ });
  add({ name: 'limits: --threads is bounded (each thread a worker with its own memory)', args: pair('--threads', '100000'), status: 2, stderr: /^tabsight: --threads "100000": at most 32/ });
}

