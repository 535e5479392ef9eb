// The escaping modules, one per format (src/escape). Each rule is checked
// against the stated rule it follows, named in the test title.
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { shellWord } from '../../src/escape/shell.js';
import { escapeXml } from '../../src/escape/markup.js';
import { markdownText } from '../../src/escape/markdown.js';
import { delimitedField, looksLikeFormula, neutraliseFormula, restoreFormula, spreadsheetField } from '../../src/escape/spreadsheet.js';
import { sqlCommentText, sqlIdentifier, sqlLiteral } from '../../src/escape/sql.js';
import { clipMessage, MESSAGE_LIMIT, messageLine, terminalSafe, terminalSafeRecord } from '../../src/escape/terminal.js';

// Every code point ECMA-48 (5th edition, 1991) treats as a control function: C0 (0x00–0x1F), DEL, C1 (0x80–0x9F).
const CONTROLS = [...Array.from({ length: 0x20 }, (_v, i) => i), 0x7f, ...Array.from({ length: 0x20 }, (_v, i) => 0x80 + i)].map((c) => String.fromCharCode(c));

describe('terminal: nothing from the data reaches the terminal as a control function (ECMA-48)', () => {
  it('every C0 and C1 control and DEL is shown as a visible escape', () => {
    for (const c of CONTROLS) {
      const shown = terminalSafe(`a${c}b`);
      expect(shown).toBe(`a\\u{${c.charCodeAt(0).toString(16)}}b`);
    }
  });
  it('window-title, screen-clearing and hyperlink sequences lose their ESC (ECMA-48 OSC and CSI)', () => {
    const title = '\x1b]0;owned\x07';
    const clear = '\x1b[2J\x1b[H';
    const link = '\x1b]8;;https://example.invalid\x1b\\click\x1b]8;;\x1b\\';
    for (const attack of [title, clear, link, '\u009b31m']) expect(terminalSafe(attack)).not.toMatch(/[\x1b\x07\u009b]/);
  });
  it('bidirectional overrides and isolates are shown (Unicode Bidirectional Algorithm, UAX #9; "Trojan Source", Boucher & Anderson 2021)', () => {
    for (const c of ['\u202a', '\u202b', '\u202c', '\u202d', '\u202e', '\u2066', '\u2067', '\u2068', '\u2069']) expect(terminalSafe(c)).toMatch(/^\\u\{20[26][0-9a-e]\}$/);
  });
  it('ordinary text, wide scripts and emoji pass unchanged', () => {
    const text = 'Zürich – 東京 – 🙂 – "quoted" – 50%';
    expect(terminalSafe(text)).toBe(text);
  });
  it('a record is copied with every string made safe and numbers left alone', () => {
    const record = { name: 'a\x1bb', n: 3, nested: [{ label: '\r' }, null, true], codes: new Uint32Array([1, 2]) };
    const safe = terminalSafeRecord(record);
    expect(safe).toEqual({ name: 'a\\u{1b}b', n: 3, nested: [{ label: '\\u{d}' }, null, true], codes: new Uint32Array([1, 2]) });
    expect(record.name).toBe('a\x1bb');
  });
  it('a message past the limit keeps its start and end and says how much was left out (common practice)', () => {
    const long = `--rows "${'z'.repeat(20_000_000)}": no such column; columns are: a, b`;
    const clipped = clipMessage(long);
    expect(clipped.length).toBeLessThanOrEqual(MESSAGE_LIMIT);
    expect(clipped.startsWith('--rows "zzz')).toBe(true);
    expect(clipped.endsWith('columns are: a, b')).toBe(true);
    expect(clipped).toMatch(/…\(19,999,\d{3} characters left out\)…/);
    expect(clipMessage('short')).toBe('short');
  });
  it('clipping never splits a surrogate pair', () => {
    const clipped = clipMessage('🙂'.repeat(5000));
    expect(clipped).not.toMatch(/[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/);
  });
  it('a message line is one line with its controls shown', () => {
    expect(messageLine('file "a\nb\x1b[2J": no such file')).toBe('file "a\\u{a}b\\u{1b}[2J": no such file');
  });
});

describe('markup: well-formed XML 1.0 with any characters, and nothing from the data becomes markup (W3C XML 1.0 §2.2, §2.4)', () => {
  it('the five markup characters become entities', () => {
    expect(escapeXml(`<script>alert("x")</script> & 'y'`)).toBe('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; &#39;y&#39;');
  });
  it('every character XML 1.0 forbids is shown as a visible escape; tab, LF and CR stay', () => {
    // Char ::= #x9 | #xA | #xD | [#x20-#xD7FF] | [#xE000-#xFFFD] | [#x10000-#x10FFFF]
    const allowed = (code: number) => code === 0x9 || code === 0xa || code === 0xd || (code >= 0x20 && code <= 0xd7ff) || (code >= 0xe000 && code <= 0xfffd);
    for (let code = 0; code < 0x10000; code++) {
      if (code >= 0xd800 && code <= 0xdfff) continue;
      const out = escapeXml(String.fromCharCode(code));
      const bad = [...out].some((ch) => !allowed(ch.codePointAt(0)!) && ch.codePointAt(0)! < 0x10000);
      expect(bad, `U+${code.toString(16)}`).toBe(false);
    }
  });
  it('unpaired surrogates are shown; a pair (an emoji) stays', () => {
    expect(escapeXml('a\ud800b')).toBe('a\\u{d800}b');
    expect(escapeXml('a\udc00b')).toBe('a\\u{dc00}b');
    expect(escapeXml('🙂')).toBe('🙂');
  });
  it('the end of a CDATA section and a closing tag from the data are text', () => {
    expect(escapeXml(']]></svg><svg onload=alert(1)>')).not.toMatch(/[<>]/);
  });
});

describe('Markdown: a label stays text and one table cell (CommonMark 0.31 §2.4 backslash escapes; GFM tables §4.10)', () => {
  it('raw HTML is escaped, so a renderer shows it instead of running it', () => {
    expect(markdownText('<img src=x onerror=alert(1)>')).toBe('\\<img src=x onerror=alert(1)>');
  });
  it('a pipe does not end the cell, and LF, CR and CRLF become spaces', () => {
    expect(markdownText('a|b\rc\nd\r\ne')).toBe('a\\|b c d e');
  });
  it('emphasis, code, links, strikethrough and entities do not start', () => {
    expect(markdownText('*a* _b_ `c` [d](e) ~~f~~ &amp; \\')).toBe('\\*a\\* \\_b\\_ \\`c\\` \\[d\\](e) \\~\\~f\\~\\~ \\&amp; \\\\');
  });
  it('other control characters are shown as visible escapes', () => {
    expect(markdownText('a\x1bb')).toBe('a\\u{1b}b');
  });
});

describe('spreadsheets: formula injection is neutralised (OWASP, "CSV Injection")', () => {
  it('a cell starting with =, +, -, @, tab or CR gets a leading apostrophe', () => {
    for (const text of ['=HYPERLINK("http://example.invalid","x")', '+cmd|/c calc', '-2+3', '@SUM(A1)', '\tx', '\rx', '＝1+1']) {
      expect(looksLikeFormula(text), text).toBe(true);
      expect(neutraliseFormula(text)).toBe(`'${text}`);
    }
  });
  it('a plain number, even negative or with an exponent, is a number, not a formula', () => {
    for (const text of ['-2', '+3', '-0.5', '1e-300', '-.5', 'x=1', '', "'=already"]) expect(neutraliseFormula(text), text).toBe(text);
  });
  it('restoreFormula undoes neutraliseFormula exactly, and leaves other texts alone', () => {
    for (const text of ['=1+1', '-x', "'plain", "'-2", 'a']) expect(restoreFormula(neutraliseFormula(text))).toBe(text);
  });
  it('RFC 4180: a field with the delimiter, a quote or a line break is quoted, inner quotes doubled', () => {
    expect(delimitedField('a,b', ',')).toBe('"a,b"');
    expect(delimitedField('say "hi"', ',')).toBe('"say ""hi"""');
    expect(delimitedField('a\tb', '\t')).toBe('"a\tb"');
    expect(delimitedField('line\rbreak', ',')).toBe('"line\rbreak"');
  });
  it('a report cell is neutralised, then quoted; raw keeps the data exactly', () => {
    expect(spreadsheetField('=1,2', ',')).toBe(`"'=1,2"`);
    expect(spreadsheetField('=1,2', ',', true)).toBe('"=1,2"');
  });
});

describe('SQL: quoted by the standard, comments never ended by data (ISO/IEC 9075-2, <delimited identifier>, <character string literal>, <simple comment>)', () => {
  it('a quote inside a literal or an identifier is doubled', () => {
    expect(sqlLiteral("it's")).toBe("'it''s'");
    expect(sqlIdentifier('say "hi"')).toBe('"say ""hi"""');
  });
  it('no line break, control character or separator survives in comment text', () => {
    const text = sqlCommentText('a\nDROP TABLE t;\r--\u2028x\u0085y');
    expect(text).not.toMatch(/[\n\r\u2028\u0085]/);
    expect(`-- ${text}`.split(/\r\n|[\n\r\u2028\u2029\u0085]/)).toHaveLength(1);
  });
});

describe('shell words: a suggested command pastes into a POSIX shell unchanged (POSIX.1-2017 Shell Command Language 2.2.2 Single-Quotes)', () => {
  const words = ['age', 'NA,.', "N'A", "'PID'", 'two words', '$HOME', '`date`', '*', '~user', 'a;b', 'x|y', '', 'line\nbreak', 'Zürich', 'a\\b', '!', '-', 'col:18,25'];
  it('plain words stay bare, others are single-quoted with a quote inside written as \'\\\'\'', () => {
    expect(shellWord('age')).toBe('age');
    expect(shellWord('NA,.')).toBe('NA,.');
    expect(shellWord('col:18,25')).toBe('col:18,25');
    expect(shellWord("N'A")).toBe(`'N'\\''A'`);
    expect(shellWord('')).toBe(`''`);
    expect(shellWord('$HOME')).toBe(`'$HOME'`);
  });
  it.runIf(existsSync('/bin/sh'))('the system shell reads each quoted word back as the word itself', () => {
    for (const word of words) {
      const echoed = spawnSync('/bin/sh', ['-c', `printf '%s' ${shellWord(word)}`], { encoding: 'utf8' });
      expect(echoed.stdout, JSON.stringify(word)).toBe(word);
    }
  });
});
