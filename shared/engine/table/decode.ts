// Turning uploaded bytes into text, and refusing what is not a text table.
import { TableParseError } from './errors';

export type TextEncoding = 'utf-8' | 'utf-16le' | 'utf-16be' | 'windows-1252';

export interface DecodedText {
  text: string;
  encoding: TextEncoding;
}

/**
 * Decodes table bytes. A byte-order mark selects UTF-8, UTF-16LE or UTF-16BE (spreadsheet
 * programs write UTF-16 for their "Unicode text" exports) and is dropped. Without one the bytes
 * must be UTF-8; bytes that are not valid UTF-8 are read as Windows-1252, the usual encoding of
 * CSV files written on Windows in western locales (for a "µm" or "°C" in a header), and the
 * table reports the encoding it used. NUL bytes mean a binary file (a spreadsheet, an archive,
 * an image) and are refused with the byte offset.
 */
export function decodeTableBytes(bytes: Uint8Array): DecodedText {
  if (bytes.length >= 2 && bytes[0] === 0xff && bytes[1] === 0xfe) {
    return { text: decodeWith('utf-16le', bytes.subarray(2)), encoding: 'utf-16le' };
  }
  if (bytes.length >= 2 && bytes[0] === 0xfe && bytes[1] === 0xff) {
    return { text: decodeWith('utf-16be', bytes.subarray(2)), encoding: 'utf-16be' };
  }
  let body = bytes;
  if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) body = bytes.subarray(3);
  const nul = body.indexOf(0);
  if (nul >= 0) {
    const zipOrOffice = bytes[0] === 0x50 && bytes[1] === 0x4b; // "PK": XLSX, ODS and ZIP files
    throw new TableParseError(
      zipOrOffice
        ? 'This is not a text table: it looks like a ZIP archive or a spreadsheet workbook (XLSX). Upload it as XLSX or save it as CSV.'
        : `This is not a text table: the file contains binary data (a NUL byte at byte offset ${nul + (body === bytes ? 0 : 3)}).`,
    );
  }
  try {
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(body), encoding: 'utf-8' };
  } catch {
    return { text: decodeWith('windows-1252', body), encoding: 'windows-1252' };
  }
}

function decodeWith(encoding: string, bytes: Uint8Array): string {
  try {
    return new TextDecoder(encoding, { fatal: true }).decode(bytes);
  } catch {
    throw new TableParseError(`This is not a text table: the bytes are not valid ${encoding.toUpperCase()} text.`);
  }
}

/** Line and column (1-based) of a UTF-16 offset in `text`; CRLF, LF and lone CR end lines. */
export function positionOf(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < offset; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || (c === 13 && text.charCodeAt(i + 1) !== 10)) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: offset - lineStart + 1 };
}

// C0 control characters other than tab, line feed, form feed and carriage return, and DEL.
const CONTROL = /[\u0000-\u0008\u000B\u000E-\u0019\u001B-\u001F\u007F]/;

/**
 * Refuses text holding control characters that no table exports: a binary file in disguise.
 * U+001A (the old end-of-file mark) is allowed only as the very last character.
 */
export function assertPlainText(text: string): void {
  let at = text.search(CONTROL);
  const eof = text.indexOf('\u001a');
  if (eof >= 0 && eof < text.length - 1 && (at < 0 || eof < at)) at = eof;
  if (at < 0) return;
  const { line, column } = positionOf(text, at);
  const code = text.charCodeAt(at).toString(16).toUpperCase().padStart(4, '0');
  throw new TableParseError(
    `This is not a text table: control character U+${code} at line ${line}, column ${column} (binary data?).`,
    line,
    column,
  );
}
