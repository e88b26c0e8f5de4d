// Reading an uploaded file into a table: CSV, TSV and other delimited text through the engine's
// parseTable, XLSX workbooks through read-excel-file and the engine's tableFromRows. The same
// function runs when the file is uploaded and when a worksheet that uses it is evaluated, so what
// the upload reported is what the steps see.
//
// Every way a file can be wrong ends in an UploadProblem with a 4xx status and a message naming
// the problem (and the line and column where there is one), never in an unhandled error.
import { readSheet } from 'read-excel-file/node';
import { parseTable, tableFromRows, TableParseError, type Table } from '@shared/engine/table/parse';
import type { ParsedInfo } from './store';

export const MAX_UPLOAD_BYTES = 50 * 1024 * 1024;
export const MAX_UPLOAD_ROWS = 2_000_000;
/** How many skipped cells and rows an upload reports one by one (all are counted). */
export const SKIPPED_REPORTED = 100;

export const XLSX_MEDIA_TYPE = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';

export type UploadProblemCode = 'empty_file' | 'unsupported_file' | 'file_too_large' | 'too_many_rows' | 'bad_file';

export class UploadProblem extends Error {
  override readonly name = 'UploadProblem';
  constructor(
    readonly status: number,
    readonly code: UploadProblemCode,
    message: string,
    readonly line?: number,
    readonly column?: number,
  ) {
    super(message);
  }
}

const isZip = (bytes: Uint8Array) => bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04;
/** The old binary Excel format (an OLE2 compound file). */
const isOle2 = (bytes: Uint8Array) => bytes.length >= 8 && bytes[0] === 0xd0 && bytes[1] === 0xcf && bytes[2] === 0x11 && bytes[3] === 0xe0;

/** The media type the file is stored and read as, from its bytes (names and browsers' types lie). */
export function detectMediaType(bytes: Uint8Array, name: string): string {
  if (isZip(bytes)) return XLSX_MEDIA_TYPE;
  return /\.tsv$/i.test(name) ? 'text/tab-separated-values' : 'text/csv';
}

function fromTableError(error: TableParseError): UploadProblem {
  const m = error.message;
  if (/is empty|no data rows/i.test(m)) return new UploadProblem(422, 'empty_file', m, error.line, error.column);
  if (/not a text table|not valid .* text/i.test(m)) return new UploadProblem(415, 'unsupported_file', m, error.line, error.column);
  if (/larger than the limit/i.test(m)) return new UploadProblem(413, 'file_too_large', m);
  if (/more than .* data rows/i.test(m)) return new UploadProblem(422, 'too_many_rows', m, error.line, error.column);
  return new UploadProblem(422, 'bad_file', m, error.line, error.column);
}

/** Parses a stored or uploaded file. Throws UploadProblem. */
export async function readTable(bytes: Uint8Array, mediaType: string): Promise<{ table: Table; sheet?: string }> {
  if (bytes.length === 0) throw new UploadProblem(422, 'empty_file', 'The file is empty.');
  if (bytes.length > MAX_UPLOAD_BYTES) {
    throw new UploadProblem(413, 'file_too_large', `The file is larger than the limit of ${MAX_UPLOAD_BYTES / 1048576} MB.`);
  }
  if (isOle2(bytes)) {
    throw new UploadProblem(415, 'unsupported_file', 'This is an old-format Excel workbook (.xls). Save it as .xlsx or CSV and upload that.');
  }
  if (mediaType === XLSX_MEDIA_TYPE) {
    let rows: unknown[][];
    try {
      rows = (await readSheet(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), 1)) as unknown[][];
    } catch (error) {
      const e = error as { name?: string; code?: string; message?: string };
      if (e.name === 'InvalidInputError' || e.name === 'InvalidSpreadsheetError' || e.name === 'SheetNotFoundError') {
        throw new UploadProblem(
          415,
          'unsupported_file',
          e.code === 'NO_DATA'
            ? 'The workbook has no sheet with data.'
            : 'The file looks like a ZIP archive but is not a readable XLSX workbook. Save it again as .xlsx or as CSV.',
        );
      }
      throw new UploadProblem(415, 'unsupported_file', 'The workbook could not be read. Save it again as .xlsx or as CSV.');
    }
    if (rows.length === 0) throw new UploadProblem(422, 'empty_file', 'The first sheet of the workbook is empty.');
    try {
      return { table: tableFromRows(rows, { maxRows: MAX_UPLOAD_ROWS, maxSkippedReported: SKIPPED_REPORTED }), sheet: '1' };
    } catch (error) {
      if (error instanceof TableParseError) throw fromTableError(error);
      throw error;
    }
  }
  try {
    return {
      table: parseTable(bytes, { maxRows: MAX_UPLOAD_ROWS, maxBytes: MAX_UPLOAD_BYTES, maxSkippedReported: SKIPPED_REPORTED }),
    };
  } catch (error) {
    if (error instanceof TableParseError) throw fromTableError(error);
    throw error;
  }
}

export function parsedInfo(table: Table, sheet?: string): ParsedInfo {
  const info: ParsedInfo = {
    rowCount: table.rowCount,
    delimiter: table.delimiter,
    decimalComma: table.decimalComma,
    hasHeader: table.hasHeader,
    columns: table.columns.map((c) => ({ name: c.name, type: c.type, missing: c.missing })),
    skipped: table.skipped.slice(0, SKIPPED_REPORTED).map((s) => {
      const row: ParsedInfo['skipped'][number] = { line: s.line, reason: s.columnName ? `${s.columnName}: ${s.reason}` : s.reason };
      if (s.column !== undefined) row.column = s.column;
      return row;
    }),
    skippedCount: table.skippedCount,
  };
  if (sheet !== undefined) info.sheet = sheet;
  return info;
}
