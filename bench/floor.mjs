#!/usr/bin/env node
// The floor of the language for pair: a plain Node.js byte loop that reads a
// file through one reused buffer and finds its line ends (no parsing, no
// counting of values). npm run bench times pair against it:
//   node bench/floor.mjs FILE   prints the number of lines
import { closeSync, openSync, readSync } from 'node:fs';

const fd = openSync(process.argv[2], 'r');
const block = Buffer.allocUnsafe(1 << 20);
let lines = 0;
for (;;) {
  const n = readSync(fd, block, 0, block.length, null);
  if (n === 0) break;
  for (let i = 0; i < n; i++) if (block[i] === 0x0a) lines++;
}
closeSync(fd);
console.log(lines);
