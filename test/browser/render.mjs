#!/usr/bin/env node
// Renders tabsight's HTML reports in a real browser (Debian's headless
// Chromium, installed here when missing) and checks that the pictures are
// laid out: every SVG and every shape in it has a non-zero box, nothing
// sticks out of the page, and a screenshot is taken; and that reports of a
// file whose labels carry script, markup and characters XML forbids are
// well-formed pages and pictures in which nothing from the data runs.
// Prints one line per check and a closing "browser: N passed, N failed"
// line for .ci/run.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const bin = join(root, 'bin', 'tabsight.js');
const demo = join(root, 'fixtures', 'demo', 'patron-survey.csv');
const chromium = '/usr/bin/chromium';
const out = mkdtempSync(join(tmpdir(), 'tabsight-browser-'));

let passed = 0;
let failed = 0;
const check = (name, ok, detail = '') => {
  if (ok) passed++;
  else failed++;
  console.log(`${ok ? 'ok  ' : 'FAIL'} ${name}${detail ? ` (${detail})` : ''}`);
};

if (!existsSync(chromium)) {
  console.log('installing Debian chromium for the browser test');
  spawnSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  spawnSync('apt-get', ['install', '-y', '-qq', 'chromium'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
}
if (!existsSync(chromium)) {
  check('chromium is available', false, 'apt-get install chromium failed');
  console.log(`browser: ${passed} passed, ${failed} failed`);
  process.exit(1);
}

const reports = [
  ['pair', ['pair', demo, '--rows', 'age_band', '--cols', 'preferred_format', '--format', 'html']],
  ['pair 2×2', ['pair', demo, '--rows', 'membership', '--cols', 'has_children', '--format', 'html']],
  ['scan', ['scan', demo, '--format', 'html']],
  ['banner', ['banner', demo, '--break', 'age_band,membership,branch', '--format', 'html']],
  ['compare', ['compare', demo, '--period', 'has_children', '--rows', 'age_band', '--cols', 'preferred_format', '--format', 'html']],
  ['waves', ['waves', join(root, 'fixtures', 'demo', 'weekly', 'patron-2026-W*.csv'), '--rows', 'age_band', '--cols', 'preferred_format', '--engine', 'builtin', '--format', 'html']],
  ['waves 2×2', ['waves', demo, '--period', 'age_band', '--rows', 'membership', '--cols', 'has_children', '--format', 'html']],
];

// Hostile labels: script and markup from the data, characters XML forbids, controls.
// No report may run them, and every page and picture must still be well-formed.
const HOSTILE = [
  '<script>window.__pwned=1</script>',
  '<img src=x onerror="window.__pwned=2">',
  '<svg onload="window.__pwned=3"></svg>',
  ']]></text><script>window.__pwned=4</script>',
  'ctrl\x01\x0b\x0c\x1b[31m',
  'not a character \ufffe',
  "quote ' and \" and &amp;",
];
const hostileRows = ['label,"<b onmouseover=window.__pwned=5>g</b>"'];
HOSTILE.forEach((label, i) => {
  for (let k = 0; k < 4; k++) hostileRows.push(`"${label.replace(/"/g, '""')}",${(i + k) % 2 === 0 ? 'one' : 'two'}`);
});
const hostile = join(out, 'hostile.csv');
writeFileSync(hostile, hostileRows.join('\n') + '\n');
const hostileCopy = join(out, 'hostile-copy.csv');
writeFileSync(hostileCopy, hostileRows.join('\n') + '\n');
const hostileArgs = ['--rows', 'label', '--cols', '<b onmouseover=window.__pwned=5>g</b>'];
const hostileReports = [
  // name, arguments, picture, a text from the data the page must show (scan shows column names, not levels)
  ['hostile pair', ['pair', hostile, ...hostileArgs, '--format', 'html'], 'pair-hostile.svg', '<script>window.__pwned=1</script>'],
  ['hostile scan', ['scan', hostile, '--format', 'html'], 'scan-hostile.svg', '<b onmouseover=window.__pwned=5>g</b>'],
  ['hostile compare', ['compare', hostile, hostile, ...hostileArgs, '--format', 'html'], 'compare-hostile.svg', '<script>window.__pwned=1</script>'],
  ['hostile waves', ['waves', hostile, hostileCopy, ...hostileArgs, '--format', 'html', '--wave-order', 'given'], 'waves-hostile.svg', '<b onmouseover=window.__pwned=5>g</b>'],
];

const { chromium: launcher } = await import('playwright-core');
const browser = await launcher.launch({
  executablePath: chromium,
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
try {
  for (const [name, args] of reports) {
    const file = join(out, `${name.replace(/\W+/g, '-')}.html`);
    const run = spawnSync(process.execPath, [bin, ...args, '--output', file], { encoding: 'utf8' });
    check(`${name}: report written`, run.status === 0 && existsSync(file), run.stderr.trim());
    if (run.status !== 0) continue;
    for (const width of [1200, 700]) {
      const page = await browser.newPage({ viewport: { width, height: 900 } });
      const requests = [];
      page.on('request', (r) => {
        if (!r.url().startsWith('file:')) requests.push(r.url());
      });
      await page.goto(pathToFileURL(file).href);
      const layout = await page.evaluate(() => {
        const svgs = [...document.querySelectorAll('svg')];
        const shapes = [...document.querySelectorAll('svg rect, svg text')];
        const box = (e) => e.getBoundingClientRect();
        const pageWidth = document.documentElement.clientWidth;
        return {
          svgs: svgs.length,
          emptySvgs: svgs.filter((s) => box(s).width <= 0 || box(s).height <= 0).length,
          shapes: shapes.length,
          // Tiles of zero count are legitimately empty; count only shapes that should show.
          emptyShapes: shapes.filter((s) => (s.tagName === 'text' ? s.textContent.trim() !== '' : Number(s.getAttribute('width')) > 0 && Number(s.getAttribute('height')) > 0) && (box(s).width <= 0 || box(s).height <= 0)).length,
          overflowing: svgs.filter((s) => box(s).right > pageWidth + 1).length,
          scrollsSideways: document.documentElement.scrollWidth > pageWidth + 1,
          contents: document.querySelectorAll('nav a[href^="#"]').length,
          targets: [...document.querySelectorAll('nav a[href^="#"]')].filter((a) => document.getElementById(a.getAttribute('href').slice(1))).length,
        };
      });
      const shot = join(out, `${name.replace(/\W+/g, '-')}-${width}.png`);
      await page.screenshot({ path: shot, fullPage: true });
      // The banner is tables only: its check is the table of contents, every entry leading to its question.
      if (name === 'banner') check(`${name} at ${width}px: the contents lead to every question`, layout.contents > 0 && layout.contents === layout.targets, `${layout.contents} entries, ${layout.targets} found`);
      else check(`${name} at ${width}px: has pictures`, layout.svgs >= 1 && layout.shapes > 10, `${layout.svgs} svg, ${layout.shapes} shapes`);
      check(`${name} at ${width}px: every picture and shape has a box`, layout.emptySvgs === 0 && layout.emptyShapes === 0, `${layout.emptySvgs} empty svg, ${layout.emptyShapes} empty shapes`);
      check(`${name} at ${width}px: nothing overflows the page`, layout.overflowing === 0 && !layout.scrollsSideways);
      check(`${name} at ${width}px: screenshot taken`, existsSync(shot) && statSync(shot).size > 5000, shot);
      check(`${name} at ${width}px: no network requests`, requests.length === 0, requests.join(' '));
      await page.close();
    }
  }
  for (const [name, args, picture, shown] of hostileReports) {
    const file = join(out, `${name.replace(/\W+/g, '-')}.html`);
    const svg = join(out, picture);
    const run = spawnSync(process.execPath, [bin, ...args, '--output', file, '--plot', svg], { encoding: 'utf8' });
    check(`${name}: report and picture written`, run.status === 0 && existsSync(file) && existsSync(svg), run.stderr.trim());
    if (run.status !== 0) continue;
    for (const [kind, path] of [['page', file], ['picture', svg]]) {
      const page = await browser.newPage({ viewport: { width: 1200, height: 900 } });
      let dialogs = 0;
      page.on('dialog', async (d) => {
        dialogs++;
        await d.dismiss();
      });
      await page.goto(pathToFileURL(path).href);
      const seen = await page.evaluate(() => ({
        pwned: window.__pwned ?? null,
        root: document.documentElement.localName,
        parseErrors: document.getElementsByTagName('parsererror').length,
        scripts: document.getElementsByTagName('script').length,
        handlers: [...document.querySelectorAll('*')].filter((e) => [...e.attributes].some((a) => a.name.startsWith('on'))).length,
        text: document.documentElement.textContent,
      }));
      check(`${name} ${kind}: well-formed`, seen.parseErrors === 0 && seen.root === (kind === 'page' ? 'html' : 'svg'), `${seen.parseErrors} parse errors, root ${seen.root}`);
      check(`${name} ${kind}: no script or handler from the data exists or runs`, seen.pwned === null && dialogs === 0 && seen.scripts === 0 && seen.handlers === 0, `pwned ${seen.pwned}, ${seen.scripts} scripts, ${seen.handlers} handlers`);
      check(`${name} ${kind}: the data's markup is shown as text`, seen.text.includes(shown), seen.text.includes(shown) ? '' : `${JSON.stringify(shown)} not found`);
      await page.close();
    }
  }
} finally {
  await browser.close();
}
console.log(`screenshots in ${out}`);
console.log(`browser: ${passed} passed, ${failed} failed`);
process.exit(failed > 0 ? 1 : 0);
