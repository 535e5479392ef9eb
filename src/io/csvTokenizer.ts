/**
 * The byte-level RFC 4180 CSV tokenizer of the built-in reader, and the
 * detection of the delimiter from the header line.
 */
import { dataError } from '../errors.js';

/**
 * A byte-level tokenizer for RFC 4180 CSV (Shafranovich 2005): fields split
 * by a one-byte delimiter, records ended by LF, CRLF or a lone CR, fields
 * optionally quoted with '"', a quote inside a quoted field written twice,
 * delimiters and line breaks allowed inside quotes. Strict where RFC 4180 is:
 * a quote inside an unquoted field, or anything but a delimiter or line end
 * after a closing quote, is an error naming the line.
 *
 * It works on a sliding window of bytes so that memory does not grow with
 * the file, decodes only the fields a caller asked for, and counts physical
 * lines so that errors can name them. Blank lines are skipped and counted.
 */

export interface TokenizerHandlers {
  /** The first record. Returns, for each field index, the slot to deliver it to (or −1 to skip). */
  header(fields: string[], line: number): Int32Array;
  /** A wanted field as raw bytes buf[start, end) (unquoted, or quoted without doubled quotes). */
  fieldBytes(slot: number, buf: Uint8Array, view: Buffer, start: number, end: number): void;
  /** A wanted field that had to be unescaped. */
  fieldText(slot: number, value: string): void;
  /** The end of a record: how many fields it had, and the line it started on. */
  record(fieldCount: number, line: number): void;
}

const NO_FIELDS: string[] = [];

/**
 * The longest record, in bytes (a quoted field with line breaks in it
 * counts whole): one endless field or line cannot grow memory past it.
 * 64 MiB (README, "Failures and what the tool guarantees").
 */
export const RECORD_BYTE_LIMIT = 64 * 1024 * 1024;

/** The most columns a header may have (README, "Failures and what the tool guarantees"). */
export const COLUMN_LIMIT = 1_000_000;
const QUOTE = 0x22;
/** A pending record up to this length is completed before a chunk is parsed in place (a longer one waits for the whole chunk; see retryAt). */
const PENDING_COMPLETED_FIRST = 1 << 16;
const LF = 0x0a;
const CR = 0x0d;

export class CsvTokenizer {
  private window: Uint8Array = new Uint8Array(1 << 16);
  private view = Buffer.from(this.window.buffer, 0, this.window.length);
  private start = 0;
  private end = 0;
  private line = 1;
  private slots: Int32Array | null = null;
  /** The last field index anyone asked for; past it only the fields are counted. */
  private lastWanted = -1;
  private columnOfSlot = new Int32Array(0);
  /** Offset (from the first byte pushed) of window[0]. */
  private base = 0;
  /**
   * With a stop offset: no record starting at or past it is parsed (a worker
   * reading a range of a file ends at the first record boundary there).
   */
  stopAt = Infinity;
  /** True once a record boundary at or past stopAt was reached. */
  stopped = false;
  private fieldStarts = new Int32Array(0);
  private fieldEnds = new Int32Array(0);
  private retryAt = 0;
  /** Blank (empty or whitespace-only) lines skipped. */
  blankLines = 0;
  /** Records seen after the header. */
  records = 0;

  private readonly special = new Uint8Array(256);
  /** Every byte above this is an ordinary one (the delimiter, CR, LF and the quote are not above it). */
  private readonly ordinaryAbove: number;
  /** The first quote at or after the parse position in the window (the window's end when none), found natively once per parse. */
  private quoteAt = -1;

  constructor(
    private readonly delimiter: number,
    private readonly handlers: TokenizerHandlers,
    private readonly label: string,
  ) {
    for (const b of [delimiter, LF, CR, QUOTE]) this.special[b] = 1;
    this.ordinaryAbove = Math.max(delimiter, LF, CR, QUOTE);
  }

  push(chunk: Uint8Array): void {
    if (this.end === this.start && chunk.length >= this.retryAt) {
      this.pushInPlace(chunk);
      return;
    }
    const pending = this.end - this.start;
    if (pending <= PENDING_COMPLETED_FIRST && this.slots !== null && !this.stopped) {
      // The record cut at the end of the last chunk is completed with the
      // chunk's first line, and the rest is parsed where it lies (else every
      // chunk would be copied into the window behind that record).
      const lineEnd = chunk.indexOf(LF);
      if (lineEnd >= 0 && lineEnd + 1 < chunk.length) {
        this.append(chunk.subarray(0, lineEnd + 1));
        this.parse(false);
        if (this.end === this.start && !this.stopped) {
          this.pushInPlace(chunk.subarray(lineEnd + 1));
          return;
        }
        chunk = chunk.subarray(lineEnd + 1);
      }
    }
    this.append(chunk);
    // A long partial record is only re-scanned once the window has grown
    // enough, so one huge field costs linear, not quadratic, time.
    if (this.end - this.start >= this.retryAt) this.parse(false);
    this.checkRecordLength();
  }

  /**
   * With nothing pending, the chunk is parsed where it lies (copying every
   * block into the window cost about a tenth of the reading time) and only
   * the record it ends inside is copied into the window, to be completed by
   * the next chunk.
   */
  private pushInPlace(chunk: Uint8Array): void {
    const window = this.window;
    const view = this.view;
    const offset = this.base + this.start;
    // The window is always a plain Uint8Array (a Buffer too would make every byte access polymorphic).
    this.window = chunk instanceof Buffer ? new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.length) : chunk;
    this.view = chunk instanceof Buffer ? chunk : Buffer.from(chunk.buffer, chunk.byteOffset, chunk.length);
    this.base = offset;
    this.start = 0;
    this.end = chunk.length;
    let rest = chunk;
    try {
      this.parse(false);
    } finally {
      rest = chunk.subarray(this.start);
      this.window = window;
      this.view = view;
      this.base = offset + this.start;
      this.start = 0;
      this.end = 0;
    }
    this.append(rest);
    this.checkRecordLength();
  }

  private checkRecordLength(): void {
    if (this.end - this.start > RECORD_BYTE_LIMIT) {
      this.fail(`a record longer than ${RECORD_BYTE_LIMIT / (1024 * 1024)} MiB, the limit for one record (a quoted field with its line breaks included); a closing quote may be missing, or the file has no line breaks`, this.line);
    }
  }

  finish(): void {
    this.parse(true);
  }

  /** The physical line the next record starts on (1: the first line pushed). */
  get nextLine(): number {
    return this.line;
  }

  /** Bytes pushed and parsed so far: the offset, from the first byte pushed, where the next record starts. */
  get position(): number {
    return this.base + this.start;
  }

  /**
   * Starts with known columns (the header was read elsewhere): data records
   * from the first byte, delivered to `slots` as `header` would have chosen.
   */
  presetSlots(slots: Int32Array): void {
    this.useSlots(slots);
  }

  private append(chunk: Uint8Array): void {
    const pending = this.end - this.start;
    if (this.end + chunk.length > this.window.length) {
      this.base += this.start;
      if (pending + chunk.length <= this.window.length && this.start > 0) {
        this.window.copyWithin(0, this.start, this.end);
      } else {
        const grown = new Uint8Array(Math.max(this.window.length * 2, pending + chunk.length));
        grown.set(this.window.subarray(this.start, this.end));
        this.window = grown;
        this.view = Buffer.from(grown.buffer, 0, grown.length);
      }
      this.start = 0;
      this.end = pending;
    }
    this.window.set(chunk, this.end);
    this.end += chunk.length;
  }

  /** The slot of each field index (−1: skipped), as the header callback chose them. */
  private useSlots(slots: Int32Array): void {
    this.slots = slots;
    this.lastWanted = -1;
    let count = 0;
    slots.forEach((slot, index) => {
      if (slot >= 0) {
        this.lastWanted = index;
        count = Math.max(count, slot + 1);
      }
    });
    this.columnOfSlot = new Int32Array(count).fill(-1);
    slots.forEach((slot, index) => {
      if (slot >= 0) this.columnOfSlot[slot] = index;
    });
    this.fieldStarts = new Int32Array(count);
    this.fieldEnds = new Int32Array(count);
  }

  /**
   * The fast path of data records: from p, every record without a quote,
   * ended by LF or CRLF, is read here; the wanted fields' positions are noted
   * and delivered once the record is known to be plain. Returns where it
   * stopped: at the end of the window, or at a record for the general path
   * (a quote, a lone CR, a record cut by the end of the window).
   */
  private parsePlain(p: number, end: number): number {
    // Whole lines before the next quote are read by the quote-free path.
    if (this.quoteAt < p) {
      const at = this.view.indexOf(QUOTE, p);
      this.quoteAt = at < 0 || at > end ? end : at;
    }
    if (this.quoteAt > p) {
      const lineEnd = this.view.lastIndexOf(LF, this.quoteAt - 1);
      if (lineEnd >= p) {
        p = this.parseQuoteFree(p, lineEnd + 1);
        if (this.stopped) return p;
      }
    }
    const buf = this.window;
    const view = this.view;
    const special = this.special;
    const delimiter = this.delimiter;
    const slots = this.slots as Int32Array;
    const width = slots.length;
    const lastWanted = this.lastWanted;
    const starts = this.fieldStarts;
    const ends = this.fieldEnds;
    const columnOfSlot = this.columnOfSlot;
    const wanted = columnOfSlot.length;
    const handlers = this.handlers;
    const stop = this.stopAt - this.base;
    while (p < end) {
      if (p >= stop) {
        this.stopped = true;
        return p;
      }
      const recordStart = p;
      let q = p;
      let field = 0;
      let firstEnd = p;
      let plain = false;
      for (;;) {
        const s = q;
        while (q < end && special[buf[q]] === 0) q++;
        if (q >= end) break;
        const b = buf[q];
        if (b === QUOTE) break;
        if (field === 0) firstEnd = q;
        if (field < width) {
          const slot = slots[field];
          if (slot >= 0) {
            starts[slot] = s;
            ends[slot] = q;
          }
        }
        field++;
        if (b === delimiter) {
          q++;
          if (field <= lastWanted) continue;
          // Past the last wanted field only the delimiters are counted.
          let more = 1;
          for (; q < end; q++) {
            const c = buf[q];
            if (special[c] !== 0) {
              if (c !== delimiter) break;
              more++;
            }
          }
          if (q < end && buf[q] === LF) {
            field += more;
            q++;
            plain = true;
          }
          break;
        }
        if (b === LF) {
          q++;
          plain = true;
        } else if (q + 1 < end && buf[q + 1] === LF) {
          q += 2;
          plain = true;
        }
        break;
      }
      if (!plain) return recordStart;
      const line = this.line;
      this.line = line + 1;
      p = q;
      this.start = p;
      if (field === 1 && onlyBlanks(buf, recordStart, firstEnd)) {
        this.blankLines++;
        continue;
      }
      for (let slot = 0; slot < wanted; slot++) {
        const column = columnOfSlot[slot];
        if (column >= 0 && column < field) handlers.fieldBytes(slot, buf, view, starts[slot], ends[slot]);
      }
      this.retryAt = 0;
      this.records++;
      handlers.record(field, line);
    }
    return p;
  }

  /**
   * The quote-free path: window[p, regionEnd) holds whole records and no
   * quote (regionEnd is just past a line feed), so every delimiter separates
   * fields and every LF, CRLF or lone CR ends a record, and nothing needs to
   * be checked for later bytes. One test per byte for most bytes (above the
   * delimiter and the line ends every byte is ordinary); past the last wanted
   * field only the delimiters are counted. Returns where it stopped: at
   * regionEnd, or at the first record starting at or past stopAt.
   */
  private parseQuoteFree(p: number, regionEnd: number): number {
    const buf = this.window;
    const view = this.view;
    const special = this.special;
    const above = this.ordinaryAbove;
    const delimiter = this.delimiter;
    const slots = this.slots as Int32Array;
    const lastWanted = this.lastWanted;
    const starts = this.fieldStarts;
    const ends = this.fieldEnds;
    const columnOfSlot = this.columnOfSlot;
    const wanted = columnOfSlot.length;
    const handlers = this.handlers;
    const stop = this.stopAt - this.base;
    while (p < regionEnd) {
      if (p >= stop) {
        this.stopped = true;
        break;
      }
      const recordStart = p;
      let q = p;
      let field = 0;
      let b = 0;
      // The fields up to the last wanted one, their bounds noted.
      for (;;) {
        const s = q;
        while ((b = buf[q]) > above || special[b] === 0) q++;
        // (field ≤ lastWanted < width here.)
        const slot = slots[field];
        if (slot >= 0) {
          starts[slot] = s;
          ends[slot] = q;
        }
        field++;
        if (b !== delimiter) break;
        q++;
        if (field > lastWanted) {
          // Past the last wanted field: only the delimiters up to the line end are counted.
          let more = 1;
          for (;;) {
            b = buf[q];
            if (b > above) q++;
            else if (b === delimiter) {
              more++;
              q++;
            } else if (special[b] === 0) q++;
            else break;
          }
          field += more;
          break;
        }
      }
      // b is LF or CR here, at q: a one-field record spans [recordStart, q).
      const contentEnd = q;
      q += b === CR && buf[q + 1] === LF ? 2 : 1;
      const line = this.line;
      this.line = line + 1;
      p = q;
      this.start = p;
      if (field === 1 && onlyBlanks(buf, recordStart, contentEnd)) {
        this.blankLines++;
        continue;
      }
      for (let slot = 0; slot < wanted; slot++) {
        const column = columnOfSlot[slot];
        if (column >= 0 && column < field) handlers.fieldBytes(slot, buf, view, starts[slot], ends[slot]);
      }
      this.records++;
      handlers.record(field, line);
    }
    this.retryAt = 0;
    return p;
  }

  private fail(message: string, line: number): never {
    throw dataError(`${this.label}, line ${line}: ${message}`);
  }

  /** Parses as many complete records as the window holds. */
  private parse(final: boolean): void {
    const buf = this.window;
    const end = this.end;
    const delimiter = this.delimiter;
    const special = this.special;
    const view = this.view;
    this.quoteAt = -1;
    let p = this.start;
    while (p < end) {
      if (this.base + p >= this.stopAt) {
        this.stopped = true;
        break;
      }
      if (this.slots !== null) {
        p = this.parsePlain(p, end);
        if (p >= end || this.stopped) break;
      }
      const recordStart = p;
      const recordLine = this.line;
      let line = this.line;
      // Blank line
      if (buf[p] === LF || buf[p] === CR) {
        if (buf[p] === CR) {
          if (p + 1 >= end && !final) break;
          p += buf[p + 1] === LF ? 2 : 1;
        } else p++;
        this.line = line + 1;
        this.blankLines++;
        this.start = p;
        continue;
      }
      const slots = this.slots;
      const handlers = this.handlers;
      // Only the header record collects its fields as strings; no allocation per data record.
      const headerFields: string[] = slots === null ? [] : NO_FIELDS;
      let field = 0;
      let complete = false;
      let onlyWhitespace = true;
      for (;;) {
        const slot = slots === null ? -1 : field < slots.length ? slots[field] : -1;
        const wanted = slots === null || slot >= 0;
        if (p < end && buf[p] === QUOTE) {
          // Quoted field
          const quoteLine = line;
          let q = p + 1;
          const contentStart = q;
          let segmentStart = q;
          let text = '';
          let escaped = false;
          let contentEnd = q;
          let closed = false;
          while (q < end) {
            const b = buf[q];
            if (b === QUOTE) {
              if (q + 1 < end && buf[q + 1] === QUOTE) {
                if (wanted) text += this.view.toString('utf8', segmentStart, q + 1);
                escaped = true;
                q += 2;
                segmentStart = q;
                continue;
              }
              if (q + 1 >= end && !final) break; // cannot tell yet
              if (wanted && escaped) text += this.view.toString('utf8', segmentStart, q);
              contentEnd = q;
              q++;
              closed = true;
              break;
            }
            if (b === LF) line++;
            q++;
          }
          if (!closed) {
            if (final) this.fail(`a quoted field (column ${field + 1}) opens here and is never closed`, quoteLine);
            break; // need more data
          }
          p = q;
          if (p < end && buf[p] !== delimiter && buf[p] !== LF && buf[p] !== CR) {
            this.fail(`unexpected character after the closing quote of field ${field + 1}; a quote inside a quoted field must be doubled ("")`, line);
          }
          if (slots === null) headerFields.push(escaped ? text : this.view.toString('utf8', contentStart, contentEnd));
          else if (wanted) {
            if (escaped) handlers.fieldText(slot, text);
            else handlers.fieldBytes(slot, buf, this.view, contentStart, contentEnd);
          }
          onlyWhitespace = false;
        } else {
          const s = p;
          // One table look-up per byte: 1 marks the delimiter, line breaks and the quote.
          while (p < end && special[buf[p]] === 0) p++;
          if (p < end && buf[p] === QUOTE) this.fail(`a quote inside the unquoted field ${field + 1}; quote the whole field and double the inner quotes`, line);
          if (p >= end && !final) break;
          if (slots === null) headerFields.push(this.view.toString('utf8', s, p));
          else if (wanted) handlers.fieldBytes(slot, buf, this.view, s, p);
          if (onlyWhitespace) {
            for (let k = s; k < p; k++) {
              const b = buf[k];
              if (b !== 0x20 && b !== 0x09) {
                onlyWhitespace = false;
                break;
              }
            }
          }
        }
        field++;
        if (slots === null && field > COLUMN_LIMIT) this.fail(`the header has more than ${COLUMN_LIMIT.toLocaleString('en-US')} columns, the limit`, recordLine);
        if (p >= end) {
          if (!final) break;
          complete = true;
          break;
        }
        const b = buf[p];
        if (b === delimiter) {
          p++;
          onlyWhitespace = false;
          // Fast path: past the last wanted field, the rest of the line is
          // only counted for its delimiters, up to a line feed; a quote or a
          // carriage return first sends it back to the general path.
          if (slots !== null && field > this.lastWanted) {
            let k = p;
            let more = 1;
            for (; k < end; k++) {
              const c = buf[k];
              if (special[c] !== 0) {
                if (c !== delimiter) break;
                more++;
              }
            }
            if (k < end && buf[k] === LF) {
              field += more;
              p = k + 1;
              line++;
              complete = true;
              break;
            }
          }
          continue;
        }
        if (b === LF) {
          p++;
          line++;
          complete = true;
          break;
        }
        // CR
        if (p + 1 >= end && !final) break;
        p += buf[p + 1] === LF ? 2 : 1;
        line++;
        complete = true;
        break;
      }
      if (!complete) {
        this.retryAt = end - recordStart > 1 << 20 ? 2 * (end - recordStart) : 0;
        p = recordStart;
        break;
      }
      this.retryAt = 0;
      this.line = line;
      this.start = p;
      if (field === 1 && onlyWhitespace) {
        this.blankLines++;
        continue;
      }
      if (this.slots === null) {
        this.useSlots(this.handlers.header(headerFields, recordLine));
      } else {
        this.records++;
        this.handlers.record(field, recordLine);
      }
    }
    this.start = p;
    if (final && this.start < this.end && !this.stopped) {
      this.fail('the file ends inside a record', this.line);
    }
  }
}

/** Whether buf[start, end) holds only spaces and tabs. */
function onlyBlanks(buf: Uint8Array, start: number, end: number): boolean {
  for (let k = start; k < end; k++) if (buf[k] !== 0x20 && buf[k] !== 0x09) return false;
  return true;
}

/** Counts a delimiter candidate's occurrences outside quotes in a line. */
function countOutsideQuotes(line: string, ch: string): number {
  let inQuotes = false;
  let count = 0;
  for (const c of line) {
    if (c === '"') inQuotes = !inQuotes;
    else if (c === ch && !inQuotes) count++;
  }
  return count;
}

export const DELIMITER_CANDIDATES = [',', ';', '\t', '|'];

/**
 * Picks the delimiter from the header line: the candidate among , ; tab |
 * that occurs most often outside quotes (ties go to the earlier candidate);
 * a comma when none occurs (a one-column file).
 */
export function detectDelimiter(headerLine: string): string {
  let best = ',';
  let bestCount = 0;
  for (const candidate of DELIMITER_CANDIDATES) {
    const count = countOutsideQuotes(headerLine, candidate);
    if (count > bestCount) {
      best = candidate;
      bestCount = count;
    }
  }
  return best;
}
