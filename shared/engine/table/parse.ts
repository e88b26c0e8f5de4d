// Reading measurement tables (CSV, TSV, semicolon- or pipe-separated text; rows from a
// spreadsheet reader) into columns: numbers straight into Float64Array, text as strings.
//
// Used by the engine, the CLI and the upload service. Pure: no I/O, no clock.
//
// Rules (the same for text and for rows from a spreadsheet):
// - Delimiter: the one of tab, ';', '|', ',' that splits the first records into the same number
//   (at least two) of fields most consistently; ties go to that order, so "1,25;2,50" is read as
//   semicolon-separated with decimal commas. No consistent delimiter: one column.
// - Decimal comma: when the delimiter is not ',' (or the comma cells are quoted) and the sample
//   holds numbers written with a comma ("1,25") and none with a point.
// - Header row: the first record is a header when one of its cells is text over a column whose
//   other cells are mostly numbers, or when all its cells are non-blank text.
// - Column type: a column is numeric when more of its non-blank cells are numbers than not (a
//   named column of blank cells only is numeric, all missing).
//   Blank and non-numeric cells of a numeric column are missing: NaN in `values`, counted in
//   `missing`, and listed in `skipped` with line, column and reason. Never a silent zero.
// - Records whose fields are all blank are skipped and listed; trailing ones are dropped.
// - A record with fewer fields than the header (or than the first record) is an error naming its
//   line, unless `raggedRows: 'skip'` lists it in `skipped` instead. Extra fields are accepted
//   only when blank (trailing delimiters).
// - Limits: more than `maxRows` data rows or more than `maxBytes` of input is an error.
import { assertPlainText, decodeTableBytes, positionOf, type TextEncoding } from './decode';
import { TableParseError } from './errors';
import { BLANK, NOT_A_NUMBER, OUT_OF_RANGE, readNumber } from './number';
import { PLAIN, RecordReader } from './records';

export { TableParseError } from './errors';
export type { TextEncoding } from './decode';

export type Delimiter = ',' | ';' | '\t' | '|';

export interface NumberColumn {
  name: string;
  type: 'number';
  /** One value per data row; missing cells hold NaN (use `presentValues` to drop them). */
  values: Float64Array;
  missing: number;
}

export interface TextColumn {
  name: string;
  type: 'text';
  /** One string per data row; blank cells are '' and counted in `missing`. */
  values: string[];
  missing: number;
}

export type TableColumn = NumberColumn | TextColumn;

export interface SkippedCell {
  /** Physical line of the file (1-based), or row of the sheet for `tableFromRows`. */
  line: number;
  /** Column number (1-based) for a cell; absent when a whole row was skipped. */
  column?: number;
  columnName?: string;
  reason: string;
}

export interface Table {
  columns: TableColumn[];
  rowCount: number;
  /** null for a one-column file and for rows from a sheet. */
  delimiter: Delimiter | null;
  decimalComma: boolean;
  hasHeader: boolean;
  /** The first `maxSkippedReported` skipped cells and rows, in file order. */
  skipped: SkippedCell[];
  /** All skipped cells and rows, including those beyond the reported list. */
  skippedCount: number;
  encoding: TextEncoding;
}

export interface ParseTableOptions {
  /** Fixes the delimiter instead of detecting it. */
  delimiter?: Delimiter;
  /** Fixes whether the first record is a header instead of detecting it. */
  hasHeader?: boolean;
  /** Fixes the decimal separator (true: ',') instead of detecting it. */
  decimalComma?: boolean;
  /** Largest number of data rows accepted (default 2,000,000). */
  maxRows?: number;
  /** Largest input accepted, in bytes (UTF-8 for text input; default 50 MiB). */
  maxBytes?: number;
  /** Length of the `skipped` list (default 1000); `skippedCount` always counts all. */
  maxSkippedReported?: number;
  /** 'error' (default): a short record is an error; 'skip': it is listed in `skipped`. */
  raggedRows?: 'error' | 'skip';
  /** Accept a table without any numeric column (default false: such a file is an error). */
  allowTextOnly?: boolean;
}

export const DEFAULT_MAX_ROWS = 2_000_000;
export const DEFAULT_MAX_BYTES = 50 * 1024 * 1024;
const DEFAULT_MAX_SKIPPED = 1000;

const SAMPLE_CHARS = 64 * 1024;
const SAMPLE_RECORDS = 200;
const CANDIDATES: readonly Delimiter[] = ['\t', ';', '|', ','];

/** The numeric values of a column without its missing cells, in row order. */
export function presentValues(values: Float64Array): Float64Array {
  let present = 0;
  for (let i = 0; i < values.length; i++) if (values[i] === values[i]) present++;
  if (present === values.length) return values.slice();
  const out = new Float64Array(present);
  let k = 0;
  for (let i = 0; i < values.length; i++) {
    const x = values[i];
    if (x === x) out[k++] = x;
  }
  return out;
}

/**
 * Parses a delimited text table, given as text or as the bytes of a file (UTF-8 with or without
 * byte-order mark, UTF-16 with byte-order mark, or Windows-1252). Throws TableParseError.
 */
export function parseTable(input: string | Uint8Array, options: ParseTableOptions = {}): Table {
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  let text: string;
  let encoding: TextEncoding = 'utf-8';
  if (typeof input === 'string') {
    if (utf8Length(input, maxBytes) > maxBytes) throw tooLarge(maxBytes);
    text = input.charCodeAt(0) === 0xfeff ? input.slice(1) : input;
  } else {
    if (input.length > maxBytes) throw tooLarge(maxBytes);
    ({ text, encoding } = decodeTableBytes(input));
    if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  }
  // The old end-of-file mark some DOS-era exporters append.
  if (text.charCodeAt(text.length - 1) === 0x1a) text = text.slice(0, -1);
  assertPlainText(text);
  if (text.trim() === '') throw new TableParseError('The file is empty.');

  const format = sniff(text, options);
  const reader = new RecordReader(text, format.delimiter.charCodeAt(0));
  const builder = new TableBuilder(text, format, options);
  builder.read(reader);
  return builder.finish(encoding);
}

function tooLarge(maxBytes: number): TableParseError {
  return new TableParseError(`The file is larger than the limit of ${formatBytes(maxBytes)}.`);
}

function formatBytes(bytes: number): string {
  return bytes % (1024 * 1024) === 0 ? `${bytes / (1024 * 1024)} MB` : `${bytes} bytes`;
}

const NON_ASCII = /[^\u0000-\u007f]/;

/** UTF-8 length of `text`, counted only as far as needed to compare it with `limit`. */
function utf8Length(text: string, limit: number): number {
  if (text.length > limit) return text.length;
  if (text.length * 3 <= limit) return text.length;
  if (!NON_ASCII.test(text)) return text.length;
  let bytes = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x80) bytes += 1;
    else if (c < 0x800) bytes += 2;
    else if (c >= 0xd800 && c <= 0xdbff) {
      bytes += 4;
      i++;
    } else bytes += 3;
  }
  return bytes;
}

// ---------------------------------------------------------------------------------------------
// Format detection on the first records.

interface Format {
  /** The split character, or SINGLE for a one-column file. */
  delimiter: string;
  decimalComma: boolean;
  hasHeader: boolean;
  /** Column types suggested by the sample; the whole file decides in the end. */
  sampleNumeric: boolean[];
}

/** "No delimiter": a character that cannot occur in text that passed `assertPlainText`. */
const SINGLE = '\u0000';

interface SampleCell {
  text: string;
  quoted: boolean;
}

/** The first records of `text` split with `delimiter`; `malformed` when the quoting breaks. */
function readSample(text: string, delimiter: string): SampleCell[][] & { malformed?: boolean; strayQuotes?: boolean } {
  const truncated = text.length > SAMPLE_CHARS;
  const sample = truncated ? text.slice(0, SAMPLE_CHARS) : text;
  const reader = new RecordReader(sample, delimiter.charCodeAt(0), true);
  const records: SampleCell[][] = [];
  let strayQuotes = false;
  while (records.length < SAMPLE_RECORDS + 1 && reader.next()) {
    if (reader.isBlankRecord()) continue;
    const cells: SampleCell[] = [];
    for (let i = 0; i < reader.count; i++) {
      const quoted = reader.flags[i] !== PLAIN;
      const cellText = reader.fieldText(i);
      if (!quoted && cellText.includes('"')) strayQuotes = true;
      cells.push({ text: cellText, quoted });
    }
    records.push(cells);
  }
  // The last record of a cut sample may be cut too, and a quote may be open at the cut.
  if (truncated && records.length > 1 && reader.position >= sample.length) records.pop();
  const result: SampleCell[][] & { malformed?: boolean; strayQuotes?: boolean } = records.slice(0, SAMPLE_RECORDS);
  result.strayQuotes = strayQuotes;
  // A quote still open where a cut sample ends may close later in the file.
  result.malformed = reader.malformed === 'text after quote' || (reader.malformed === 'unclosed quote' && !truncated);
  return result;
}

/** The most frequent field count of the records and the share of records that have it. */
function consistency(records: SampleCell[][]): { fields: number; share: number } {
  const tally = new Map<number, number>();
  for (const r of records) tally.set(r.length, (tally.get(r.length) ?? 0) + 1);
  let fields = 0;
  let best = 0;
  for (const [count, times] of tally) {
    if (times > best || (times === best && count > fields)) {
      fields = count;
      best = times;
    }
  }
  return { fields, share: records.length ? best / records.length : 0 };
}

const DECIMAL_COMMA_CELL = /^[+-]?\d*,\d+(?:[eE][+-]?\d+)?$/;
const DECIMAL_POINT_CELL = /^[+-]?(?:\d+\.\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/**
 * Decimal comma when some cells are numbers written with a comma and none with a point. With ','
 * as delimiter only quoted cells can hold a comma.
 */
function detectDecimalComma(records: SampleCell[][], commaDelimited: boolean): boolean {
  let comma = 0;
  let point = 0;
  for (const r of records) {
    for (const cell of r) {
      const t = cell.text.trim();
      if (DECIMAL_POINT_CELL.test(t)) point++;
      else if ((!commaDelimited || cell.quoted) && DECIMAL_COMMA_CELL.test(t)) comma++;
    }
  }
  return comma > 0 && point === 0;
}

const probe = new Float64Array(1);
function isNumberText(text: string, decimalComma: boolean): boolean {
  return readNumber(text, 0, text.length, decimalComma, probe) === 0;
}

function sniff(text: string, options: ParseTableOptions): Format {
  let delimiter: string;
  if (options.delimiter !== undefined) {
    delimiter = options.delimiter;
  } else {
    // Ranking: quoting that breaks under a delimiter puts it last (if it is still the best,
    // reading the file reports the broken quote); then quotes inside unquoted fields, the mark
    // of splitting a quoted field in the middle; then the share of records with the usual
    // field count; ties go to the order of CANDIDATES.
    let best: { delimiter: Delimiter; rank: number[]; firstFields: number; share: number } | undefined;
    for (const candidate of CANDIDATES) {
      const sample = readSample(text, candidate);
      const { fields, share } = consistency(sample);
      if (fields < 2) continue;
      const rank = [sample.malformed ? 0 : 1, sample.strayQuotes ? 0 : 1, share];
      if (!best || isBetter(rank, best.rank)) best = { delimiter: candidate, rank, firstFields: sample[0].length, share };
    }
    if (!best) delimiter = SINGLE;
    // A header "d" over lines like "1,25": one column of decimal-comma numbers, not a ragged CSV.
    else if (best.delimiter === ',' && best.firstFields === 1 && best.share < 0.9 && singleColumnIsNumeric(text)) {
      delimiter = SINGLE;
    } else delimiter = best.delimiter;
  }
  const records = readSample(text, delimiter);
  const decimalComma = options.decimalComma ?? detectDecimalComma(records, delimiter === ',');
  const first = records[0] ?? [];
  const rest = records.slice(1);
  const hasHeader = options.hasHeader ?? detectHeader(first, rest, decimalComma);
  const dataRecords = hasHeader ? rest : records;
  const sampleNumeric: boolean[] = [];
  for (let c = 0; c < first.length; c++) {
    let numbers = 0;
    let others = 0;
    for (const r of dataRecords) {
      const t = r[c]?.text ?? '';
      if (t.trim() === '') continue;
      if (isNumberText(t, decimalComma)) numbers++;
      else others++;
    }
    sampleNumeric.push(numbers > others || (numbers === 0 && others === 0));
  }
  return { delimiter, decimalComma, hasHeader, sampleNumeric };
}

function isBetter(rank: number[], than: number[]): boolean {
  for (let i = 0; i < rank.length; i++) if (rank[i] !== than[i]) return rank[i] > than[i];
  return false;
}

function singleColumnIsNumeric(text: string): boolean {
  const records = readSample(text, SINGLE);
  if (records.length < 2) return false;
  const decimalComma = detectDecimalComma(records, false);
  const data = records.slice(1);
  const numbers = data.filter((r) => isNumberText(r[0].text, decimalComma)).length;
  return numbers >= 0.9 * data.length;
}

/**
 * Header when a text cell of the first record heads a column whose other cells are mostly
 * numbers, or when every cell of the first record is non-blank text.
 */
function detectHeader(first: SampleCell[], rest: SampleCell[][], decimalComma: boolean): boolean {
  if (first.length === 0) return false;
  const numericFirst = first.map((cell) => isNumberText(cell.text, decimalComma));
  if (numericFirst.every(Boolean)) return false;
  for (let c = 0; c < first.length; c++) {
    if (numericFirst[c] || first[c].text.trim() === '') continue;
    let numbers = 0;
    let filled = 0;
    for (const r of rest) {
      const t = r[c]?.text ?? '';
      if (t.trim() === '') continue;
      filled++;
      if (isNumberText(t, decimalComma)) numbers++;
    }
    if (filled > 0 && numbers * 2 > filled) return true;
  }
  return first.every((cell, c) => !numericFirst[c] && cell.text.trim() !== '');
}

// ---------------------------------------------------------------------------------------------
// Reading all records into columns.

interface ColumnState {
  values: Float64Array;
  /** All cell texts, kept when the sample suggests text. */
  texts: string[] | null;
  numbers: number;
  others: number;
  blanks: number;
  /** The first problem cells of this column, for the report if the column ends up numeric. */
  problems: SkippedCell[];
}

class TableBuilder {
  private readonly maxRows: number;
  private readonly maxSkipped: number;
  private readonly ragged: 'error' | 'skip';
  private readonly decimalComma: boolean;
  private names: string[] = [];
  private width = 0;
  private columns: ColumnState[] = [];
  private rows = 0;
  private capacity = 0;
  private rowSkips: SkippedCell[] = [];
  private rowSkipCount = 0;
  private readonly number = new Float64Array(1);

  constructor(
    private readonly text: string,
    private readonly format: Format,
    private readonly options: ParseTableOptions,
  ) {
    this.maxRows = options.maxRows ?? DEFAULT_MAX_ROWS;
    this.maxSkipped = options.maxSkippedReported ?? DEFAULT_MAX_SKIPPED;
    this.ragged = options.raggedRows ?? 'error';
    this.decimalComma = format.decimalComma;
  }

  read(reader: RecordReader): void {
    let started = false;
    // Blank records are reported only when data follow them.
    const pendingBlank: number[] = [];
    while (reader.next()) {
      if (reader.isBlankRecord()) {
        if (started) pendingBlank.push(reader.line);
        continue;
      }
      if (!started) {
        started = true;
        this.start(reader);
        if (this.format.hasHeader) continue;
      }
      if (pendingBlank.length > 0) {
        for (const line of pendingBlank) this.skipRow(line, 'empty row');
        pendingBlank.length = 0;
      }
      this.addRecord(reader);
    }
  }

  private start(reader: RecordReader): void {
    this.width = reader.count;
    const estimate = Math.max(16, Math.ceil((this.text.length / Math.max(1, reader.position)) * 1.1));
    this.capacity = Math.min(estimate, this.maxRows + 1);
    for (let c = 0; c < this.width; c++) {
      this.columns.push({
        values: new Float64Array(this.capacity),
        texts: this.format.sampleNumeric[c] ? null : [],
        numbers: 0,
        others: 0,
        blanks: 0,
        problems: [],
      });
      this.names.push(this.format.hasHeader ? reader.fieldText(c) : '');
    }
  }

  private addRecord(reader: RecordReader): void {
    const width = this.width;
    const count = reader.count;
    if (count !== width) {
      if (count < width) {
        const message = `Line ${reader.line} has ${count} field${count === 1 ? '' : 's'} where ${width} are expected (${
          this.format.hasHeader ? 'as in the header row' : 'as in the first row'
        }); check the delimiter and the quoting.`;
        if (this.ragged === 'error') throw new TableParseError(message, reader.line);
        this.skipRow(reader.line, `${count} field${count === 1 ? "" : "s"} where ${width} are expected`);
        return;
      }
      for (let i = width; i < count; i++) {
        if (!reader.isBlank(i)) {
          const message = `Line ${reader.line} has ${count} fields where ${width} are expected (${
            this.format.hasHeader ? 'as in the header row' : 'as in the first row'
          }); check the delimiter and the quoting.`;
          if (this.ragged === 'error') throw new TableParseError(message, reader.line, i + 1);
          this.skipRow(reader.line, `${count} field${count === 1 ? "" : "s"} where ${width} are expected`);
          return;
        }
      }
    }
    const row = this.rows;
    if (row >= this.maxRows) {
      throw new TableParseError(
        `The table has more than ${this.maxRows.toLocaleString('en-US')} data rows (the limit is reached on line ${reader.line}).`,
        reader.line,
      );
    }
    if (row === this.capacity) this.grow();
    const text = this.text;
    const number = this.number;
    const decimalComma = this.decimalComma;
    const starts = reader.starts;
    const ends = reader.ends;
    for (let c = 0; c < width; c++) {
      const column = this.columns[c];
      const status = readNumber(text, starts[c], ends[c], decimalComma, number);
      if (status === 0) {
        column.values[row] = number[0];
        column.numbers++;
      } else {
        column.values[row] = NaN;
        if (status === BLANK) {
          column.blanks++;
          if (column.problems.length < this.maxSkipped) {
            column.problems.push({ line: reader.line, column: c + 1, reason: 'blank cell' });
          }
        } else {
          column.others++;
          if (column.problems.length < this.maxSkipped) {
            const cell = reader.fieldText(c);
            column.problems.push({ line: reader.line, column: c + 1, reason: problemReason(status, cell) });
          }
        }
      }
      if (column.texts) column.texts.push(reader.fieldText(c));
    }
    this.rows = row + 1;
  }

  private grow(): void {
    this.capacity = Math.min(this.capacity * 2, this.maxRows + 1);
    for (const column of this.columns) {
      const bigger = new Float64Array(this.capacity);
      bigger.set(column.values);
      column.values = bigger;
    }
  }

  private skipRow(line: number, reason: string): void {
    this.rowSkipCount++;
    if (this.rowSkips.length < this.maxSkipped) this.rowSkips.push({ line, reason });
  }

  finish(encoding: TextEncoding): Table {
    if (this.rows === 0) {
      throw new TableParseError(
        this.format.hasHeader ? 'The file has a header row but no data rows.' : 'The file has no data rows.',
      );
    }
    const rows = this.rows;
    const names = uniqueNames(this.names);
    const columns: TableColumn[] = [];
    let skipped: SkippedCell[] = [...this.rowSkips];
    let skippedCount = this.rowSkipCount;
    const rescan: number[] = [];
    const kinds: Array<'number' | 'text' | 'drop'> = [];
    for (let c = 0; c < this.width; c++) {
      const state = this.columns[c];
      if (state.numbers === 0 && state.others === 0 && this.names[c].trim() === '') kinds.push('drop');
      else if (state.numbers > state.others || (state.numbers === 0 && state.others === 0)) kinds.push('number');
      else {
        kinds.push('text');
        if (!state.texts) rescan.push(c);
      }
    }
    const rescanned = rescan.length ? this.collectTexts(rescan) : new Map<number, string[]>();
    for (let c = 0; c < this.width; c++) {
      const state = this.columns[c];
      const kind = kinds[c];
      if (kind === 'drop') continue;
      if (kind === 'number') {
        const values = state.values.length === rows ? state.values : state.values.slice(0, rows);
        const missing = state.blanks + state.others;
        columns.push({ name: names[c], type: 'number', values, missing });
        for (const p of state.problems) p.columnName = names[c];
        skipped = skipped.concat(state.problems);
        skippedCount += missing;
      } else {
        const texts = state.texts ?? rescanned.get(c)!;
        columns.push({ name: names[c], type: 'text', values: texts, missing: state.blanks });
      }
    }
    if (!this.options.allowTextOnly && !columns.some((col) => col.type === 'number')) {
      throw new TableParseError(
        columns.length <= 1
          ? 'No numeric column found: every cell is read as text. Check the delimiter (comma, semicolon, tab or pipe) and the decimal separator.'
          : 'No numeric column found: every column holds text. Check the decimal separator and that the measurements are numbers.',
      );
    }
    skipped.sort((a, b) => a.line - b.line || (a.column ?? 0) - (b.column ?? 0));
    if (skipped.length > this.maxSkipped) skipped.length = this.maxSkipped;
    const delimiter = this.format.delimiter === SINGLE ? null : (this.format.delimiter as Delimiter);
    return {
      columns,
      rowCount: rows,
      delimiter,
      decimalComma: this.decimalComma,
      hasHeader: this.format.hasHeader,
      skipped,
      skippedCount,
      encoding,
    };
  }

  /** Second pass for columns the sample took for numbers but the whole file shows to be text. */
  private collectTexts(columns: number[]): Map<number, string[]> {
    const collector = new TextCollector(this.text, this.format, columns, this.width);
    return collector.collect();
  }
}

/** Repeats the record walk of TableBuilder exactly (same rows kept), keeping texts only. */
class TextCollector {
  constructor(
    private readonly text: string,
    private readonly format: Format,
    private readonly wanted: number[],
    private readonly width: number,
  ) {}

  collect(): Map<number, string[]> {
    const out = new Map<number, string[]>(this.wanted.map((c) => [c, []]));
    const reader = new RecordReader(this.text, this.format.delimiter.charCodeAt(0));
    let started = false;
    while (reader.next()) {
      if (reader.isBlankRecord()) continue;
      if (!started) {
        started = true;
        if (this.format.hasHeader) continue;
      }
      if (reader.count < this.width) continue; // skipped as ragged in the first pass
      let extra = false;
      for (let i = this.width; i < reader.count; i++) if (!reader.isBlank(i)) extra = true;
      if (extra) continue;
      for (const c of this.wanted) out.get(c)!.push(reader.fieldText(c));
    }
    return out;
  }
}

function problemReason(status: number, cell: string): string {
  const shown = cell.length > 40 ? `${cell.slice(0, 40)}…` : cell;
  if (status === OUT_OF_RANGE) return `number out of range: "${shown}"`;
  if (status === NOT_A_NUMBER) return `not a number: "${shown}"`;
  return 'blank cell';
}

function uniqueNames(raw: string[]): string[] {
  const seen = new Map<string, number>();
  return raw.map((name, i) => {
    let base = name.trim() === '' ? `column ${i + 1}` : name.trim();
    const times = seen.get(base) ?? 0;
    seen.set(base, times + 1);
    if (times > 0) {
      base = `${base} (${times + 1})`;
      seen.set(base, 1);
    }
    return base;
  });
}

// ---------------------------------------------------------------------------------------------
// Rows from a spreadsheet reader.

export interface TableFromRowsOptions {
  hasHeader?: boolean;
  decimalComma?: boolean;
  maxRows?: number;
  maxSkippedReported?: number;
  allowTextOnly?: boolean;
}

/**
 * Builds a table from rows already split into cells (for example by an XLSX reader), with the
 * typing rules of `parseTable`. Cells may be numbers, strings (read as in a text file), booleans,
 * dates (kept as ISO text), null or undefined (blank). Short rows are padded with blanks, as
 * spreadsheet readers leave trailing empty cells out; longer rows must have blank extra cells.
 * `line` in the report is the 1-based index of the row in `rows`.
 */
export function tableFromRows(rows: unknown[][], options: TableFromRowsOptions = {}): Table {
  const maxRows = options.maxRows ?? DEFAULT_MAX_ROWS;
  const maxSkipped = options.maxSkippedReported ?? DEFAULT_MAX_SKIPPED;
  const cellText = (cell: unknown): string => {
    if (cell === null || cell === undefined) return '';
    if (typeof cell === 'string') return cell;
    if (typeof cell === 'number') return String(cell);
    if (typeof cell === 'boolean') return cell ? 'TRUE' : 'FALSE';
    if (cell instanceof Date) return Number.isNaN(cell.getTime()) ? '' : cell.toISOString();
    return String(cell);
  };
  const lines: number[] = [];
  const kept: unknown[][] = [];
  rows.forEach((row, i) => {
    if (!Array.isArray(row)) throw new TableParseError(`Row ${i + 1} is not a list of cells.`, i + 1);
    if (row.some((cell) => cellText(cell).trim() !== '')) {
      kept.push(row);
      lines.push(i + 1);
    }
  });
  if (kept.length === 0) throw new TableParseError('The sheet is empty.');

  const sample: SampleCell[][] = kept
    .slice(0, SAMPLE_RECORDS)
    .map((row) => row.map((cell) => ({ text: cellText(cell).trim(), quoted: typeof cell === 'string' })));
  const stringCells = sample.map((r) => r.filter((c) => c.quoted));
  const decimalComma = options.decimalComma ?? detectDecimalComma(stringCells, false);
  const hasHeader = options.hasHeader ?? detectHeader(sample[0], sample.slice(1), decimalComma);
  const header = hasHeader ? kept[0] : [];
  const data = hasHeader ? kept.slice(1) : kept;
  const dataLines = hasHeader ? lines.slice(1) : lines;
  if (data.length === 0) throw new TableParseError('The sheet has a header row but no data rows.');
  if (data.length > maxRows) {
    throw new TableParseError(
      `The table has more than ${maxRows.toLocaleString('en-US')} data rows (the limit is reached on row ${dataLines[maxRows]}).`,
      dataLines[maxRows],
    );
  }
  const width = hasHeader ? header.length : Math.max(...data.slice(0, SAMPLE_RECORDS).map((r) => r.length));
  const names = uniqueNames(Array.from({ length: width }, (_, c) => (hasHeader ? cellText(header[c]).trim() : '')));
  for (let r = 0; r < data.length; r++) {
    for (let c = width; c < data[r].length; c++) {
      if (cellText(data[r][c]).trim() !== '') {
        throw new TableParseError(
          `Row ${dataLines[r]} has a value in column ${c + 1}, beyond the ${width} columns ${hasHeader ? 'of the header row' : 'of the first rows'}.`,
          dataLines[r],
          c + 1,
        );
      }
    }
  }

  const number = new Float64Array(1);
  const columns: TableColumn[] = [];
  let skipped: SkippedCell[] = [];
  let skippedCount = 0;
  for (let c = 0; c < width; c++) {
    const values = new Float64Array(data.length);
    const texts: string[] = new Array(data.length);
    let numbers = 0;
    let others = 0;
    let blanks = 0;
    const problems: SkippedCell[] = [];
    for (let r = 0; r < data.length; r++) {
      const cell = data[r][c];
      let status: number;
      if (typeof cell === 'number') {
        status = Number.isFinite(cell) ? 0 : NOT_A_NUMBER;
        number[0] = cell;
      } else if (typeof cell === 'string') {
        status = readNumber(cell, 0, cell.length, decimalComma, number);
      } else if (cell === null || cell === undefined || cellText(cell).trim() === '') {
        status = BLANK;
      } else {
        status = NOT_A_NUMBER;
      }
      const t = cellText(cell).trim();
      texts[r] = t;
      if (status === 0) {
        values[r] = number[0];
        numbers++;
        continue;
      }
      values[r] = NaN;
      if (status === BLANK) blanks++;
      else others++;
      if (problems.length < maxSkipped) problems.push({ line: dataLines[r], column: c + 1, reason: problemReason(status, t) });
    }
    const unnamed = !hasHeader || cellText(header[c]).trim() === '';
    if (numbers === 0 && others === 0 && unnamed) continue; // an empty column without a name
    if (numbers > others || (numbers === 0 && others === 0)) {
      for (const p of problems) p.columnName = names[c];
      columns.push({ name: names[c], type: 'number', values, missing: blanks + others });
      skipped = skipped.concat(problems);
      skippedCount += blanks + others;
    } else {
      columns.push({ name: names[c], type: 'text', values: texts, missing: blanks });
    }
  }
  if (!options.allowTextOnly && !columns.some((col) => col.type === 'number')) {
    throw new TableParseError('No numeric column found: every column of the sheet holds text.');
  }
  skipped.sort((a, b) => a.line - b.line || (a.column ?? 0) - (b.column ?? 0));
  if (skipped.length > maxSkipped) skipped.length = maxSkipped;
  return {
    columns,
    rowCount: data.length,
    delimiter: null,
    decimalComma,
    hasHeader,
    skipped,
    skippedCount,
    encoding: 'utf-8',
  };
}

/** Line and column of an offset in a table's text, for messages of callers that scan it too. */
export { positionOf };
