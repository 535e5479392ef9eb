// Hostile corpus, class 1: outputs never destroy data. An output that is an
// input (by any name), a planted link, a private file, a device or FIFO, a
// signal mid-write, two runs at once, a full disk, a size limit, a closed or
// vanished standard stream: each ends with its documented status and one
// line naming the option or stream, the inputs untouched and no temporary
// file left behind.
import { execFileSync } from 'node:child_process';
import { chmodSync, linkSync, lstatSync, mkdirSync, readFileSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const expect = (condition, message) => {
  if (!condition) throw new Error(message);
};

/** A character device made here (as root) standing for /dev/null or /dev/full, so that no test ever writes near the real ones; null when it cannot be made. */
function device(path, minor) {
  try {
    execFileSync('mknod', [path, 'c', '1', String(minor)], { stdio: 'ignore' });
    chmodSync(path, 0o666);
    return path;
  } catch {
    return null;
  }
}

export function addOutputCases({ dir, add, demo }) {
  const out = join(dir, 'outputs');
  mkdirSync(out, { recursive: true });
  const file = (name, content) => {
    const path = join(out, name);
    writeFileSync(path, content);
    return path;
  };
  const table = 'a,b\nx,1\ny,2\nx,2\ny,1\nx,1\n';
  const data = file('data.csv', table);
  const pair = (input, ...rest) => ['pair', input, '--rows', 'a', '--cols', 'b', ...rest];
  const same = /is the input file .*data\.csv; writing there would destroy the data/;

  add({ name: 'outputs: --output names the input', args: pair(data, '--output', data), status: 2, stderr: same });
  add({ name: 'outputs: --plot names the input', args: pair(data, '--plot', data), status: 2, stderr: /--plot .* is the input file/ });
  const linkToData = join(out, 'link-to-data.csv');
  symlinkSync(data, linkToData);
  add({ name: 'outputs: --output is a symbolic link to the input', args: pair(data, '--output', linkToData), status: 2, stderr: same });
  add({ name: 'outputs: the input is a symbolic link to --output', args: pair(linkToData, '--output', data), status: 2, stderr: /--output .*data\.csv is the input file .*link-to-data\.csv/ });
  const hard = join(out, 'hard-link.csv');
  linkSync(data, hard);
  add({ name: 'outputs: --output is a hard link of the input', args: pair(data, '--format', 'json', '--output', hard), status: 2, stderr: same });
  add({ name: 'outputs: --output and --plot name one file', args: pair(data, '--output', join(out, 'r.txt'), '--plot', `${out}/./r.txt`), status: 2, stderr: /--output .*r\.txt and --plot .*r\.txt name the same file/ });
  add({ name: 'outputs: standard input is redirected from --output', args: pair('-', '--output', data), mode: 'shell', shell: (program) => `${program} < '${data}'`, status: 2, stderr: /--output .*data\.csv is the file on standard input/, engine: false });
  const codebook = file('codebook.json', JSON.stringify({ codebook: 1, columns: [{ name: 'a', values: [{ code: 'x', label: 'ex' }, { code: 'y', label: 'why' }] }] }));
  for (const command of ['pair', 'scan']) {
    const args = command === 'pair' ? pair(data, '--codebook', codebook, '--output', codebook) : ['scan', data, '--codebook', codebook, '--plot', codebook];
    add({ name: `outputs: ${command} writing over the codebook it reads`, args, status: 2, stderr: /is the input file .*codebook\.json/ });
  }
  const wave2 = file('week-2026-01-12.csv', table);
  add({ name: 'outputs: waves --output names one of the wave files', args: ['waves', file('week-2026-01-05.csv', table), wave2, '--rows', 'a', '--cols', 'b', '--output', wave2], status: 2, stderr: /--output .*week-2026-01-12\.csv is the input file/, engine: false });
  add({ name: 'outputs: count --output names the input', args: ['count', data, '--rows', 'a', '--cols', 'b', '--output', data], status: 2, stderr: same });
  const before = file('before.csv', table);
  add({ name: 'outputs: compare --output names the earlier file', args: ['compare', before, data, '--rows', 'a', '--cols', 'b', '--output', before], status: 2, stderr: /is the input file .*before\.csv/ });
  const countsA = file('counts-a.csv', 'a,b,count\nx,1,2\n');
  const countsB = file('counts-b.csv', 'a,b,count\nx,1,3\n');
  add({ name: 'outputs: merge --output names one of the count files', args: ['merge', countsA, countsB, '--output', countsB], status: 2, stderr: /--output .*counts-b\.csv is the input file/ });
  mkdirSync(join(out, 'weeks'), { recursive: true });
  const week1 = join(out, 'weeks', 'week-1.csv');
  writeFileSync(week1, table);
  writeFileSync(join(out, 'weeks', 'week-2.csv'), table);
  add({ name: 'outputs: --output is one of the files a pattern matches', args: pair(join(out, 'weeks', 'week-*.csv'), '--output', week1), status: 2, stderr: /--output .*week-1\.csv is the input file/, engine: 'only' });

  // A link planted where the old predictable temporary name was (".name.<pid>.tmp", this process's pid for in-process runs).
  const victim = file('victim.txt', 'precious\n');
  symlinkSync(victim, join(out, `.planted.json.${process.pid}.tmp`));
  add({
    name: 'outputs: a link planted beside the target is never followed',
    args: pair(data, '--format', 'json', '--output', join(out, 'planted.json')),
    status: 0,
    engine: false,
    after: () => {
      expect(readFileSync(victim, 'utf8') === 'precious\n', 'the planted link was followed');
      expect(JSON.parse(readFileSync(join(out, 'planted.json'), 'utf8')).n === 5, 'no report written');
    },
  });
  const privateFile = file('private.json', 'secret\n');
  chmodSync(privateFile, 0o600);
  add({
    name: 'outputs: --output over a private file keeps its mode',
    args: pair(data, '--format', 'json', '--output', privateFile),
    status: 0,
    after: () => {
      expect((statSync(privateFile).mode & 0o777) === 0o600, `mode ${(statSync(privateFile).mode & 0o777).toString(8)}`);
      expect(JSON.parse(readFileSync(privateFile, 'utf8')).n === 5, 'no report written');
    },
  });
  const realReport = file('real-report.txt', 'old\n');
  const linkedReport = join(out, 'linked-report.txt');
  symlinkSync(realReport, linkedReport);
  add({
    name: 'outputs: --output through a symbolic link replaces the file it points to and keeps the link',
    args: pair(data, '--output', linkedReport),
    status: 0,
    after: () => {
      expect(lstatSync(linkedReport).isSymbolicLink(), 'the link was replaced by a file');
      expect(readFileSync(realReport, 'utf8').includes('a × b'), 'the linked file holds no report');
    },
  });
  const nullDevice = device(join(out, 'null-device'), 3);
  if (nullDevice) {
    add({
      name: 'outputs: --output onto a device node writes to the device and leaves it a device',
      args: pair(data, '--output', nullDevice),
      status: 0,
      after: () => expect(statSync(nullDevice).isCharacterDevice(), 'the device was replaced by a file'),
    });
  }
  const fullDevice = device(join(out, 'full-device'), 7);
  if (fullDevice) {
    add({ name: 'outputs: --output onto a full device', args: pair(data, '--output', fullDevice), status: 1, stderr: /--output .*full-device: cannot write: no space left on the device \(ENOSPC\)/ });
    add({ name: 'outputs: standard output onto a full device', args: pair(data), mode: 'shell', shell: (program) => `${program} > '${fullDevice}'`, status: 1, stderr: /^tabsight: standard output: cannot write: no space left on the device \(ENOSPC\); the report is incomplete$/ });
  }
  add({
    name: 'outputs: --output onto a FIFO writes into it and leaves it a FIFO',
    args: pair(data, '--output', join(out, 'report.fifo')),
    mode: 'shell',
    shell: (program) => `rm -f '${out}/report.fifo' && mkfifo '${out}/report.fifo' && { cat '${out}/report.fifo' > '${out}/from-fifo.txt' & } && ${program}; s=$?; wait; exit $s`,
    status: 0,
    after: () => {
      expect(statSync(join(out, 'report.fifo')).isFIFO(), 'the FIFO was replaced by a file');
      expect(readFileSync(join(out, 'from-fifo.txt'), 'utf8').includes('a × b'), 'the reader of the FIFO got no report');
    },
  });
  add({ name: 'outputs: standard output past the file size limit (ulimit -f)', args: ['scan', demo, '--format', 'json'], mode: 'shell', shell: (program) => `ulimit -f 1; ${program} > '${out}/limited.json'`, status: 1, stderr: /standard output: cannot write: .*\(EFBIG\); the report is incomplete/ });
  const limited = file('limited-output.json', 'old\n');
  add({
    name: 'outputs: --output past the file size limit keeps the previous file',
    args: ['scan', demo, '--format', 'json', '--output', limited],
    mode: 'shell',
    shell: (program) => `ulimit -f 1; ${program}`,
    status: 1,
    stderr: /--output .*limited-output\.json: cannot write: .*\(EFBIG\); the previous file is untouched/,
    after: () => expect(readFileSync(limited, 'utf8') === 'old\n', 'the previous file changed'),
  });
  add({ name: 'outputs: standard output closed (>&-)', args: pair(data), mode: 'shell', shell: (program) => `${program} >&-`, status: 1, stderr: /^tabsight: standard output is closed; redirect it to a file or use --output$/ });
  add({ name: 'outputs: a reader that stops early (| head) ends the run quietly', args: ['scan', demo, '--format', 'json'], mode: 'shell', shell: (program) => `${program} | head -c 1 > /dev/null; exit \${PIPESTATUS[0]}`, status: 0 });
  add({
    name: 'outputs: a usage error keeps status 2 when standard error is a closed pipe',
    args: pair(data, '--no-such-option'),
    mode: 'shell',
    // The reader opens the FIFO and closes it at once, long before the program starts and writes its one line.
    shell: (program) => `rm -f '${out}/stderr.fifo' && mkfifo '${out}/stderr.fifo' && { (exec 3<'${out}/stderr.fifo') & } && ${program} 2>'${out}/stderr.fifo'; s=$?; wait; exit $s`,
    status: 2,
    stderrElsewhere: true,
    engine: false,
  });
  add({ name: 'outputs: --output in a folder that does not exist', args: pair(data, '--output', join(out, 'no-folder', 'r.txt')), status: 1, stderr: /--output .*r\.txt: cannot write: its directory does not exist \(ENOENT\)/ });
  add({ name: 'outputs: --output names a folder', args: pair(data, '--output', out), status: 1, stderr: /--output .*outputs: is a directory; name a file/ });
  add({ name: 'outputs: a failed --plot is named as --plot', args: pair(data, '--plot', join(out, 'no-folder', 'p.svg')), status: 1, stderr: /^tabsight: --plot .*p\.svg: cannot write/ });
  const injected = file('injected.txt', 'old\n');
  add({
    name: 'outputs: a write that fails midway keeps the previous file',
    args: ['scan', demo, '--format', 'json', '--output', injected],
    env: { TABSIGHT_FAIL_WRITE_AFTER: '1000' },
    status: 1,
    stderr: /--output .*injected\.txt: cannot write: an input\/output error \(EIO\); the previous file is untouched/,
    after: () => expect(readFileSync(injected, 'utf8') === 'old\n', 'the previous file changed'),
  });
  for (const signal of ['SIGINT', 'SIGTERM', 'SIGHUP']) {
    const target = file(`signalled-${signal}.json`, 'old\n');
    add({
      name: `outputs: ${signal} mid-write removes the temporary file and keeps the previous one`,
      args: ['scan', demo, '--format', 'json', '--output', target],
      env: { TABSIGHT_PAUSE_WRITE_AFTER: '1000' },
      mode: 'signal',
      signal,
      status: 0,
      engine: false,
      after: () => expect(readFileSync(target, 'utf8') === 'old\n', 'the previous file changed'),
    });
  }
  const shared = join(out, 'shared.json');
  add({
    name: 'outputs: two runs writing one --output at once both succeed',
    args: ['scan', demo, '--format', 'json', '--output', shared],
    mode: 'shell',
    shell: (program) => `${program} & a=$!; ${program} & b=$!; wait $a && wait $b`,
    status: 0,
    after: () => expect(JSON.parse(readFileSync(shared, 'utf8')).command === 'scan', 'the shared output is not one whole report'),
  });
}
