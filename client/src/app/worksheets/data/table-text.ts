/**
 * Tables typed or pasted as text (a block copied from a spreadsheet is tab-separated), and the
 * inline columns of a data step written back as text for editing. Pure (unit-tested under mocha).
 *
 * A cell is a number when it reads as one (a decimal comma is accepted when the cells are not
 * comma-separated); a numeric column keeps the other non-blank cells as text, which the engine
 * reports as skipped, never reads as zero.
 */
import type { InlineColumn } from '@shared/format/worksheet';

export type Delimiter = '\t' | ',' | ';' | '|' | ' ';

export interface ParsedTable {
  columns: InlineColumn[];
  rowCount: number;
  delimiter: Delimiter;
  hasHeader: boolean;
  decimalComma: boolean;
  /** Things the user should know (short rows filled with blanks, a column made text, ...). */
  notes: string[];
}

export class TableTextError extends Error {
  constructor(
    message: string,
    readonly line?: number,
  ) {
    super(message);
    this.name = 'TableTextError';
  }
}

/** Typed-in tables travel inside the worksheet document (a JSON body of at most 1 MB): larger ones are uploaded. */
export const MAX_TEXT_ROWS = 20_000;
export const MAX_TEXT_CELLS = 60_000;
export const MAX_TEXT_COLUMNS = 200;

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
const NUMBER_COMMA = /^[+-]?(\d+(,\d*)?|,\d+)([eE][+-]?\d+)?$/;

/** The number a cell holds, or null. */
export function cellNumber(text: string, decimalComma: boolean): number | null {
  const t = text.trim().replace(/\u00a0/g, '');
  if (t === '') return null;
  if (NUMBER.test(t)) {
    const n = Number(t);
    return Number.isFinite(n) ? n : null;
  }
  if (decimalComma && NUMBER_COMMA.test(t)) {
    const n = Number(t.replace(',', '.'));
    return Number.isFinite(n) ? n : null;
  }
  return null;
}

/** Splits lines into cells, honouring double quotes (a quote inside a quoted cell is doubled). */
export function splitRows(text: string, delimiter: Delimiter): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = '';
  let quoted = false;
  let line = 1;
  let quoteLine = 0;
  let atCellStart = true;
  const pushCell = () => {
    row.push(delimiter === ' ' ? cell.trim() : cell);
    cell = '';
    atCellStart = true;
  };
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"') {
        if (text[i + 1] === '"') {
          cell += '"';
          i++;
        } else {
          quoted = false;
        }
      } else {
        if (ch === '\n') line++;
        cell += ch;
      }
      continue;
    }
    if (ch === '"' && atCellStart) {
      quoted = true;
      quoteLine = line;
      atCellStart = false;
      continue;
    }
    if (delimiter === ' ' ? ch === ' ' || ch === '\t' : ch === delimiter) {
      if (delimiter === ' ' && atCellStart && cell === '') continue; // runs of spaces
      pushCell();
      continue;
    }
    if (ch === '\r') continue;
    if (ch === '\n') {
      pushCell();
      rows.push(row);
      row = [];
      line++;
      continue;
    }
    cell += ch;
    atCellStart = false;
  }
  if (quoted) throw new TableTextError(`A quoted cell that starts on line ${quoteLine} is never closed (a " is missing).`, quoteLine);
  if (cell !== '' || row.length > 0) {
    pushCell();
    rows.push(row);
  }
  // Drop fully blank lines at the end (and trailing spaces-only lines).
  while (rows.length > 0 && rows[rows.length - 1]!.every((c) => c.trim() === '')) rows.pop();
  return rows;
}

/** The delimiter of pasted text: tabs (spreadsheets), then semicolons, commas, bars, spaces; else one column. */
export function detectDelimiter(text: string): Delimiter {
  const sample = text.split('\n').slice(0, 20).join('\n');
  if (sample.includes('\t')) return '\t';
  const count = (ch: string) => sample.split(ch).length - 1;
  const lines = Math.max(1, sample.split('\n').filter((l) => l.trim() !== '').length);
  if (count(';') >= lines) return ';';
  if (count(',') >= lines) {
    // "1,5" on every line with no other delimiter is one column with decimal commas, not two.
    const everyLineOneComma = sample
      .split('\n')
      .filter((l) => l.trim() !== '')
      .every((l) => /^\s*[+-]?\d+,\d+\s*$/.test(l));
    if (!everyLineOneComma) return ',';
  }
  if (count('|') >= lines) return '|';
  if (/\S +\S/.test(sample)) return ' ';
  // No delimiter at all: one column (a tab never splits it, and decimal commas stay readable).
  return '\t';
}

/** Parses pasted or typed text into inline columns. */
export function parseTableText(text: string, options: { delimiter?: Delimiter; hasHeader?: boolean } = {}): ParsedTable {
  if (text.trim() === '') throw new TableTextError('There is nothing to read: paste or type a table, one row per line.');
  const delimiter = options.delimiter ?? detectDelimiter(text);
  const rows = splitRows(text.replace(/^\uFEFF/, ''), delimiter);
  if (rows.length === 0) throw new TableTextError('There is nothing to read: paste or type a table, one row per line.');
  const notes: string[] = [];
  const width = Math.max(...rows.map((r) => r.length));
  if (width > MAX_TEXT_COLUMNS) throw new TableTextError(`The table has ${width} columns; at most ${MAX_TEXT_COLUMNS} can be typed in. Upload it as a file instead.`);
  const decimalComma = delimiter !== ',' && rows.some((r) => r.some((c) => !NUMBER.test(c.trim()) && NUMBER_COMMA.test(c.trim())));

  const first = rows[0]!;
  const firstHasText = first.some((c) => c.trim() !== '' && cellNumber(c, decimalComma) === null);
  const laterNumeric = rows.length > 1 && rows.slice(1, 6).some((r) => r.some((c) => cellNumber(c, decimalComma) !== null));
  const hasHeader = options.hasHeader ?? (firstHasText && (laterNumeric || rows.length === 1));
  const body = hasHeader ? rows.slice(1) : rows;
  if (body.length === 0) throw new TableTextError('The table has a header row but no data rows.', 1);
  if (body.length > MAX_TEXT_ROWS) {
    throw new TableTextError(`The table has ${body.length} rows; at most ${MAX_TEXT_ROWS} can be typed in. Upload it as a file instead.`);
  }

  if (body.length * width > MAX_TEXT_CELLS) {
    throw new TableTextError(`The table has ${body.length * width} cells; at most ${MAX_TEXT_CELLS} can be typed in. Upload it as a file instead.`);
  }

  let shortRows = 0;
  let firstLong: number | null = null;
  body.forEach((r, i) => {
    if (r.length < width) shortRows++;
    if (hasHeader && r.length > first.length && firstLong === null) firstLong = i + 2;
  });
  if (firstLong !== null) {
    throw new TableTextError(
      `Line ${firstLong} has more cells than the header (${first.length}). Check the delimiter, or quote cells that contain one.`,
      firstLong,
    );
  }
  if (shortRows > 0) notes.push(`${shortRows} row${shortRows === 1 ? ' was' : 's were'} shorter than the others; the missing cells are blank.`);

  const names = uniqueNames(
    Array.from({ length: width }, (_, j) => (hasHeader ? (first[j] ?? '').trim() : '') || (width === 1 ? 'value' : `column ${j + 1}`)),
  );
  const columns: InlineColumn[] = names.map((name, j) => {
    const cells = body.map((r) => r[j] ?? '');
    const nonBlank = cells.filter((c) => c.trim() !== '');
    const numeric = nonBlank.filter((c) => cellNumber(c, decimalComma) !== null).length;
    if (nonBlank.length > 0 && numeric >= Math.max(1, 0.8 * nonBlank.length)) {
      const skipped = nonBlank.length - numeric;
      if (skipped > 0) notes.push(`Column “${name}”: ${skipped} cell${skipped === 1 ? ' is' : 's are'} not a number and will be left out.`);
      return {
        name,
        type: 'number',
        values: cells.map((c) => (c.trim() === '' ? null : (cellNumber(c, decimalComma) ?? c.trim()))),
      };
    }
    return { name, type: 'text', values: cells.map((c) => (c.trim() === '' ? null : c.trim())) };
  });
  return { columns, rowCount: body.length, delimiter, hasHeader, decimalComma, notes };
}

function uniqueNames(names: string[]): string[] {
  const seen = new Map<string, number>();
  return names.map((name) => {
    const base = name.slice(0, 200);
    const count = seen.get(base) ?? 0;
    seen.set(base, count + 1);
    return count === 0 ? base : `${base} (${count + 1})`;
  });
}

function quoteCell(text: string, delimiter: string): string {
  return text.includes(delimiter) || text.includes('"') || text.includes('\n') || /^\s|\s$/.test(text)
    ? `"${text.replace(/"/g, '""')}"`
    : text;
}

/** Inline columns as text with a header row (tab- or comma-separated), for editing as text. */
export function columnsToText(columns: readonly InlineColumn[], delimiter: '\t' | ',' = ','): string {
  const rowCount = Math.max(0, ...columns.map((c) => c.values.length));
  const lines = [columns.map((c) => quoteCell(c.name, delimiter)).join(delimiter)];
  for (let i = 0; i < rowCount; i++) {
    lines.push(
      columns
        .map((c) => {
          const v = c.values[i];
          return v === null || v === undefined ? '' : quoteCell(String(v), delimiter);
        })
        .join(delimiter),
    );
  }
  return lines.join('\n') + '\n';
}

/** Keeps units and types the user set on columns that still exist (by name) after re-reading the text. */
export function keepColumnSettings(previous: readonly InlineColumn[], next: InlineColumn[]): InlineColumn[] {
  const byName = new Map(previous.map((c) => [c.name, c]));
  return next.map((c) => {
    const old = byName.get(c.name);
    if (old?.type === 'number' && c.type === 'number' && old.unit) return { ...c, unit: old.unit };
    return c;
  });
}
