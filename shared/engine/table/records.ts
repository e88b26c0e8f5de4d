// Splitting delimited text into records and fields (RFC 4180 quoting), without copying fields.
import { TableParseError } from './errors';

const QUOTE = 34;
const LF = 10;
const CR = 13;
const SPACE = 32;
const TAB = 9;

/** Field flag: plain text between delimiters. */
export const PLAIN = 0;
/** Field flag: quoted, bounds exclude the quotes, no doubled quotes inside. */
export const QUOTED = 1;
/** Field flag: quoted with doubled quotes inside that still need to be collapsed. */
export const QUOTED_ESCAPED = 2;

/**
 * Reads one record at a time. After `next()` returns true, fields 0..count-1 of the record are
 * text[starts[i], ends[i]) with `flags[i]`, and `line` is the physical line the record starts on
 * (1-based). Line ends are CRLF, LF or a lone CR. A quote opens a quoted field only as the first
 * character of the field (RFC 4180); elsewhere it is ordinary text.
 */
export class RecordReader {
  starts = new Int32Array(64);
  ends = new Int32Array(64);
  flags = new Uint8Array(64);
  count = 0;
  line = 0;
  /** Sample mode: why reading stopped early, if it did. */
  malformed: 'unclosed quote' | 'text after quote' | null = null;
  private pos = 0;
  private nextLine = 1;
  private readonly length: number;

  constructor(
    private readonly text: string,
    private readonly delimiter: number,
    /** Sample mode: malformed quoting ends reading (and says why in `malformed`) instead of throwing. */
    private readonly lenient = false,
  ) {
    this.length = text.length;
  }

  /** Offset just after the last record read. */
  get position(): number {
    return this.pos;
  }

  next(): boolean {
    const text = this.text;
    const length = this.length;
    const delimiter = this.delimiter;
    let pos = this.pos;
    if (pos >= length) return false;
    this.line = this.nextLine;
    this.count = 0;
    for (;;) {
      if (pos >= length) {
        // A delimiter right before the end of the text: one more, empty field.
        this.push(pos, pos, PLAIN);
        break;
      }
      let c = text.charCodeAt(pos);
      if (c === QUOTE) {
        const fieldLine = this.nextLine;
        const contentStart = pos + 1;
        let escaped = false;
        let cursor = contentStart;
        let close: number;
        for (;;) {
          close = text.indexOf('"', cursor);
          if (close < 0) {
            if (this.lenient) {
              this.pos = length;
              this.malformed = 'unclosed quote';
              return false;
            }
            throw new TableParseError(
              `A quoted field that starts on line ${fieldLine} is never closed (missing closing quote).`,
              fieldLine,
              this.count + 1,
            );
          }
          this.countLines(cursor, close);
          if (text.charCodeAt(close + 1) === QUOTE) {
            escaped = true;
            cursor = close + 2;
            continue;
          }
          break;
        }
        this.push(contentStart, close, escaped ? QUOTED_ESCAPED : QUOTED);
        pos = close + 1;
        // Spaces between the closing quote and the delimiter are tolerated; anything else is not.
        while (pos < length && ((c = text.charCodeAt(pos)) === SPACE || (c === TAB && delimiter !== TAB))) pos++;
        if (pos < length) {
          c = text.charCodeAt(pos);
          if (c !== delimiter && c !== LF && c !== CR) {
            if (this.lenient) {
              this.pos = length;
              this.malformed = 'text after quote';
              return false;
            }
            throw new TableParseError(
              `Unexpected text after a closing quote on line ${this.nextLine} (field ${this.count}); ` +
                'a quote inside a quoted field must be doubled ("").',
              this.nextLine,
              this.count,
            );
          }
        }
      } else {
        const start = pos;
        while (pos < length) {
          c = text.charCodeAt(pos);
          if (c === delimiter || c === LF || c === CR) break;
          pos++;
        }
        this.push(start, pos, PLAIN);
      }
      if (pos >= length) break;
      c = text.charCodeAt(pos);
      pos++;
      if (c === delimiter) continue;
      // Line end.
      if (c === CR && pos < length && text.charCodeAt(pos) === LF) pos++;
      this.nextLine++;
      break;
    }
    this.pos = pos;
    return true;
  }

  /** Whether field i holds only spaces (or nothing). */
  isBlank(i: number): boolean {
    const text = this.text;
    for (let k = this.starts[i]; k < this.ends[i]; k++) {
      const c = text.charCodeAt(k);
      if (c !== SPACE && c !== TAB && c !== 0xa0) return false;
    }
    return true;
  }

  /** Whether every field of the record is blank. */
  isBlankRecord(): boolean {
    for (let i = 0; i < this.count; i++) if (!this.isBlank(i)) return false;
    return true;
  }

  /** The text of field i: quoted fields as written between the quotes, plain fields trimmed. */
  fieldText(i: number): string {
    const flag = this.flags[i];
    if (flag === PLAIN) return this.text.slice(this.starts[i], this.ends[i]).trim();
    const raw = this.text.slice(this.starts[i], this.ends[i]);
    return flag === QUOTED_ESCAPED ? raw.replaceAll('""', '"') : raw;
  }

  private push(start: number, end: number, flag: number): void {
    const i = this.count;
    if (i === this.starts.length) {
      const grow = (a: Int32Array) => {
        const b = new Int32Array(a.length * 2);
        b.set(a);
        return b;
      };
      this.starts = grow(this.starts);
      this.ends = grow(this.ends);
      const f = new Uint8Array(this.flags.length * 2);
      f.set(this.flags);
      this.flags = f;
    }
    this.starts[i] = start;
    this.ends[i] = end;
    this.flags[i] = flag;
    this.count = i + 1;
  }

  private countLines(from: number, to: number): void {
    const text = this.text;
    for (let k = from; k < to; k++) {
      const c = text.charCodeAt(k);
      if (c === LF || (c === CR && text.charCodeAt(k + 1) !== LF)) this.nextLine++;
    }
  }
}
