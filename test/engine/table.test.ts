import { existsSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { expect } from 'chai';
import fc from 'fast-check';
import Papa from 'papaparse';
import { BLANK, NOT_A_NUMBER, OUT_OF_RANGE, readNumber } from '@shared/engine/table/number';
import {
  parseTable,
  presentValues,
  tableFromRows,
  TableParseError,
  type Delimiter,
  type NumberColumn,
  type Table,
  type TextColumn,
} from '@shared/engine/table/parse';

function numberColumn(table: Table, name: string): NumberColumn {
  const column = table.columns.find((c) => c.name === name);
  if (!column || column.type !== 'number') expect.fail(`no numeric column ${name}`);
  return column as NumberColumn;
}

function textColumn(table: Table, name: string): TextColumn {
  const column = table.columns.find((c) => c.name === name);
  if (!column || column.type !== 'text') expect.fail(`no text column ${name}`);
  return column as TextColumn;
}

function parseError(run: () => unknown): TableParseError {
  try {
    run();
  } catch (error) {
    expect(error).to.be.instanceOf(TableParseError);
    return error as TableParseError;
  }
  return expect.fail('expected a TableParseError');
}

const encoder = new TextEncoder();

describe('readNumber (table cells)', () => {
  const out = new Float64Array(1);
  const read = (text: string, decimalComma = false) => {
    const status = readNumber(text, 0, text.length, decimalComma, out);
    return status === 0 ? out[0] : status;
  };

  it('equals Number() on every printed form of random doubles (fast-check)', function () {
    this.timeout(60_000);
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 20 }), (x, digits) => {
        const forms = [String(x), x.toExponential(Math.min(digits, 20)), x.toPrecision(Math.max(1, digits))];
        if (Math.abs(x) < 1e21) forms.push(x.toFixed(Math.min(digits, 20)));
        for (const form of forms) {
          const expected = Number(form);
          const got = read(form);
          if (!Number.isFinite(expected)) expect(got, form).to.equal(OUT_OF_RANGE); // "-2e+308"
          else if (!Object.is(got, expected)) expect.fail(`"${form}": got ${got}, Number() gives ${expected}`);
        }
      }),
      { numRuns: 3000 },
    );
  });

  it('equals Number() on random digit strings with separators and exponents (fast-check)', function () {
    this.timeout(60_000);
    const digitString = fc.string({ unit: fc.constantFrom(...'0123456789'), minLength: 1, maxLength: 25 });
    fc.assert(
      fc.property(
        fc.constantFrom('', '-', '+'),
        digitString,
        fc.option(digitString),
        fc.option(fc.tuple(fc.constantFrom('e', 'E'), fc.constantFrom('', '-', '+'), fc.integer({ min: 0, max: 400 }))),
        (sign, whole, fraction, exponent) => {
          const text = `${sign}${whole}${fraction === null ? '' : `.${fraction}`}${
            exponent === null ? '' : `${exponent[0]}${exponent[1]}${exponent[2]}`
          }`;
          const expected = Number(text);
          const got = read(text);
          if (expected === Infinity || expected === -Infinity) expect(got).to.equal(OUT_OF_RANGE);
          else if (!Object.is(got, expected)) expect.fail(`"${text}": got ${got}, Number() gives ${expected}`);
          // The same number written with a decimal comma.
          const comma = text.replace('.', ',');
          const gotComma = read(comma, true);
          if (Number.isFinite(expected) && !Object.is(gotComma, expected)) expect.fail(`"${comma}" with decimal comma: got ${gotComma}`);
        },
      ),
      { numRuns: 3000 },
    );
  });

  it('accepts the usual forms and trims spaces', () => {
    expect(read('1.006')).to.equal(1.006);
    expect(read('  -0.25  ')).to.equal(-0.25);
    expect(read('+3')).to.equal(3);
    expect(read('.5')).to.equal(0.5);
    expect(read('5.')).to.equal(5);
    expect(read('1e-3')).to.equal(0.001);
    expect(read('2.5E+2')).to.equal(250);
    expect(Object.is(read('-0'), -0)).to.equal(true);
    expect(read('0.1')).to.equal(0.1);
    expect(read('1,25', true)).to.equal(1.25);
    expect(read('9007199254740993')).to.equal(9007199254740992); // 2^53 + 1 rounds to even
    expect(read('1e-400')).to.equal(0);
  });

  it('refuses what Number() would accept but a measurement table should not hold', () => {
    for (const text of ['0x1A', 'Infinity', '-Infinity', 'NaN', '1_000', '1.2.3', '1e', 'e5', '-', '.', '1 000', '12abc', '1,5', '0b101', '1e+']) {
      expect(read(text), text).to.equal(NOT_A_NUMBER);
    }
    expect(read('1.5', true)).to.equal(NOT_A_NUMBER);
    expect(read('   ')).to.equal(BLANK);
    expect(read('')).to.equal(BLANK);
    expect(read('1e400')).to.equal(OUT_OF_RANGE);
    expect(read('-1e400')).to.equal(OUT_OF_RANGE);
  });
});

// --- Random well-formed tables, with papaparse as the reference reader. -------------------------

interface RandomTable {
  delimiter: Delimiter;
  newline: '\n' | '\r\n';
  names: string[];
  kinds: Array<'number' | 'text'>;
  cells: string[][]; // as written, before quoting
}

const letters = fc.constantFrom(...'abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ');
const textChars = fc.constantFrom(...'abcXYZ _-.()µ°%/,;|\t"\n\r0123456789'.split(''));
const textCell = fc
  .tuple(letters, fc.string({ unit: textChars, maxLength: 12 }), letters)
  .map(([a, body, b]) => `${a}${body}${b}`);
const numberCell = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => String(x)),
  fc.double({ min: -1e6, max: 1e6, noNaN: true }).map((x) => x.toFixed(4)),
  fc.integer({ min: -100000, max: 100000 }).map(String),
  fc.double({ min: -10, max: 10, noNaN: true }).map((x) => x.toExponential(6)),
);

const randomTable: fc.Arbitrary<RandomTable> = fc
  .record({
    delimiter: fc.constantFrom<Delimiter>(',', ';', '\t', '|'),
    newline: fc.constantFrom<'\n' | '\r\n'>('\n', '\r\n'),
    kinds: fc.array(fc.constantFrom<'number' | 'text'>('number', 'text'), { minLength: 1, maxLength: 5 }),
    rows: fc.integer({ min: 1, max: 40 }),
  })
  .chain(({ delimiter, newline, kinds, rows }) => {
    const allKinds: Array<'number' | 'text'> = ['number', ...kinds]; // at least one numeric column
    const row = fc.tuple(
      ...allKinds.map((kind, c) =>
        // The first column is never blank, so no row is blank as a whole.
        kind === 'number' ? (c === 0 ? numberCell : fc.oneof({ weight: 6, arbitrary: numberCell }, { weight: 1, arbitrary: fc.constant('') })) : textCell,
      ),
    );
    return fc.record({
      delimiter: fc.constant(delimiter),
      newline: fc.constant(newline),
      names: fc.tuple(...allKinds.map((_, c) => textCell.map((t) => `${t}${c}`))),
      kinds: fc.constant(allKinds),
      cells: fc.array(row, { minLength: rows, maxLength: rows }),
    });
  });

function quote(cell: string): string {
  return /[,;|\t"\n\r]/.test(cell) || cell !== cell.trim() ? `"${cell.replaceAll('"', '""')}"` : cell;
}

function writeTable(t: RandomTable, trailingNewline: boolean): string {
  const lines = [t.names, ...t.cells].map((row) => row.map(quote).join(t.delimiter));
  return lines.join(t.newline) + (trailingNewline ? t.newline : '');
}

describe('parseTable against papaparse on well-formed random tables', () => {
  it('reads the same cells, types numeric and text columns and detects the format (fast-check)', function () {
    this.timeout(120_000);
    fc.assert(
      fc.property(randomTable, fc.boolean(), (t, trailingNewline) => {
        const text = writeTable(t, trailingNewline);
        const papa = Papa.parse<string[]>(text, { delimiter: t.delimiter, header: false, skipEmptyLines: true });
        expect(papa.errors, JSON.stringify(papa.errors)).to.deep.equal([]);
        const table = parseTable(text);
        expect(table.delimiter).to.equal(t.delimiter);
        expect(table.hasHeader).to.equal(true);
        expect(table.decimalComma).to.equal(false);
        expect(table.rowCount).to.equal(papa.data.length - 1);
        expect(table.columns.map((c) => c.name)).to.deep.equal(papa.data[0]);
        let blanks = 0;
        table.columns.forEach((column, c) => {
          expect(column.type, `column ${c}`).to.equal(t.kinds[c]);
          for (let r = 0; r < table.rowCount; r++) {
            const reference = papa.data[r + 1][c];
            if (column.type === 'number') {
              const expected = reference === '' ? NaN : Number(reference);
              if (!Object.is(column.values[r], expected) && !(Number.isNaN(expected) && Number.isNaN(column.values[r]))) {
                expect.fail(`row ${r} column ${c}: "${reference}" read as ${column.values[r]}`);
              }
              if (reference === '') blanks++;
            } else {
              expect(column.values[r]).to.equal(reference);
            }
          }
        });
        expect(table.skippedCount).to.equal(blanks);
        expect(table.skipped.every((s) => s.reason === 'blank cell' && s.column !== undefined)).to.equal(true);
      }),
      { numRuns: 400 },
    );
  });

  it('reads the same table from UTF-8 bytes, with and without a byte-order mark (fast-check)', function () {
    this.timeout(60_000);
    fc.assert(
      fc.property(randomTable, fc.boolean(), (t, bom) => {
        const text = writeTable(t, true);
        const bytes = encoder.encode(text);
        const input = bom ? new Uint8Array([0xef, 0xbb, 0xbf, ...bytes]) : bytes;
        const fromBytes = parseTable(input);
        const fromText = parseTable(text);
        expect(fromBytes.encoding).to.equal('utf-8');
        expect(fromBytes.columns.map((c) => [c.name, c.type, Array.from(c.values as ArrayLike<unknown>)])).to.deep.equal(
          fromText.columns.map((c) => [c.name, c.type, Array.from(c.values as ArrayLike<unknown>)]),
        );
      }),
      { numRuns: 100 },
    );
  });

  it('agrees with papaparse (header, dynamic typing) on a semicolon file with decimal commas after conversion', () => {
    const text = 'bore_mm;lot\n12,003;A\n11,998;B\n12,010;A\n';
    const table = parseTable(text);
    expect(table.delimiter).to.equal(';');
    expect(table.decimalComma).to.equal(true);
    const papa = Papa.parse<Record<string, string>>(text.replaceAll(',', '.'), { header: true, dynamicTyping: true, skipEmptyLines: true });
    expect(Array.from(numberColumn(table, 'bore_mm').values)).to.deep.equal(papa.data.map((r) => r.bore_mm));
    expect(textColumn(table, 'lot').values).to.deep.equal(papa.data.map((r) => r.lot));
  });
});

describe('parseTable formats', () => {
  it('detects tab, pipe and comma delimiters, CRLF line ends and quoted fields with newlines', () => {
    const tsv = parseTable('part\tlength_mm\r\n"bracket, left"\t10.5\r\n"say ""hi""\r\nthere"\t11\r\n');
    expect(tsv.delimiter).to.equal('\t');
    expect(textColumn(tsv, 'part').values).to.deep.equal(['bracket, left', 'say "hi"\r\nthere']);
    expect(Array.from(numberColumn(tsv, 'length_mm').values)).to.deep.equal([10.5, 11]);
    const pipe = parseTable('a|b\n1|2\n3|4');
    expect(pipe.delimiter).to.equal('|');
    expect(Array.from(numberColumn(pipe, 'b').values)).to.deep.equal([2, 4]);
  });

  it('reads decimal commas with semicolon, tab and pipe delimiters, and in quoted comma-separated cells', () => {
    for (const d of [';', '\t', '|']) {
      const table = parseTable(`x${d}y\n1,25${d}2,5\n-0,5${d}3\n`);
      expect(table.delimiter).to.equal(d);
      expect(table.decimalComma).to.equal(true);
      expect(Array.from(numberColumn(table, 'x').values)).to.deep.equal([1.25, -0.5]);
    }
    const quoted = parseTable('x,y\n"1,25","2,5"\n"3,0","4"\n');
    expect(quoted.delimiter).to.equal(',');
    expect(quoted.decimalComma).to.equal(true);
    expect(Array.from(numberColumn(quoted, 'y').values)).to.deep.equal([2.5, 4]);
    const single = parseTable('diameter\n1,25\n2,5\n3\n');
    expect(single.delimiter).to.equal(null);
    expect(Array.from(numberColumn(single, 'diameter').values)).to.deep.equal([1.25, 2.5, 3]);
  });

  it('detects a missing header and names the columns', () => {
    const table = parseTable('1.5,2\n2.5,3\n');
    expect(table.hasHeader).to.equal(false);
    expect(table.columns.map((c) => c.name)).to.deep.equal(['column 1', 'column 2']);
    expect(table.rowCount).to.equal(2);
    const options = parseTable('1.5,2\n2.5,3\n', { hasHeader: true });
    expect(options.columns.map((c) => c.name)).to.deep.equal(['1.5', '2']);
  });

  it('makes header names unique and fills blank ones', () => {
    const table = parseTable('d,d,,lot\n1,2,3,A\n4,5,6,B\n');
    expect(table.columns.map((c) => c.name)).to.deep.equal(['d', 'd (2)', 'column 3', 'lot']);
  });

  it('drops a trailing column that is unnamed and empty (trailing delimiters)', () => {
    const table = parseTable('a,b,\n1,2,\n3,4,\n');
    expect(table.columns.map((c) => c.name)).to.deep.equal(['a', 'b']);
  });

  it('keeps a group column of codes as text and a column of lot numbers as numbers', () => {
    const table = parseTable('lot,code,value\n1,A7,0.5\n2,B2,0.7\n3,A7,0.6\n');
    expect(numberColumn(table, 'lot').values.length).to.equal(3);
    expect(textColumn(table, 'code').values).to.deep.equal(['A7', 'B2', 'A7']);
  });

  it('types a column by the whole file, not by its first rows', () => {
    // 300 numbers then 700 texts: text column, although the sample saw only numbers.
    const lines = ['v,code'];
    for (let i = 0; i < 1000; i++) lines.push(`${i},${i < 300 ? i : `L${i}`}`);
    const table = parseTable(lines.join('\n'));
    const code = textColumn(table, 'code');
    expect(code.values[0]).to.equal('0');
    expect(code.values[999]).to.equal('L999');
    expect(table.skippedCount).to.equal(0);
    // 300 texts then 700 numbers: numeric column with 300 missing cells reported.
    const lines2 = ['v,reading'];
    for (let i = 0; i < 1000; i++) lines2.push(`${i},${i < 300 ? 'n/a' : i / 10}`);
    const table2 = parseTable(lines2.join('\n'));
    const reading = numberColumn(table2, 'reading');
    expect(reading.missing).to.equal(300);
    expect(Number.isNaN(reading.values[0])).to.equal(true);
    expect(reading.values[999]).to.equal(99.9);
    expect(table2.skipped[0]).to.deep.equal({ line: 2, column: 2, columnName: 'reading', reason: 'not a number: "n/a"' });
  });

  it('decodes UTF-16 with byte-order mark and Windows-1252 text', () => {
    const text = 'Länge_µm\tLos\n1,5\tA\n2,5\tB\n';
    const utf16 = new Uint8Array(2 + text.length * 2);
    utf16[0] = 0xff;
    utf16[1] = 0xfe;
    for (let i = 0; i < text.length; i++) {
      utf16[2 + 2 * i] = text.charCodeAt(i) & 0xff;
      utf16[3 + 2 * i] = text.charCodeAt(i) >> 8;
    }
    const table = parseTable(utf16);
    expect(table.encoding).to.equal('utf-16le');
    expect(Array.from(numberColumn(table, 'Länge_µm').values)).to.deep.equal([1.5, 2.5]);
    // "µm" in Windows-1252 is the single byte 0xB5, which is not valid UTF-8.
    const cp1252 = new Uint8Array([...encoder.encode('d_'), 0xb5, ...encoder.encode('m\n1.5\n')]);
    const latin = parseTable(cp1252);
    expect(latin.encoding).to.equal('windows-1252');
    expect(latin.columns[0].name).to.equal('d_µm');
  });

  it('reads the NIST gear data: 100 values whose sd matches R (REFERENCES.md: s = 0.006278905 from the file)', function () {
    const path = fileURLToPath(new URL('../../../shared/reference-data/nist-gear-diameter.csv', import.meta.url));
    if (!existsSync(path)) {
      console.log(`      skipped: reference data not found at ${path}`);
      this.skip();
    }
    const table = parseTable(new Uint8Array(readFileSync(path)));
    expect(table.rowCount).to.equal(100);
    const diameter = numberColumn(table, 'diameter').values;
    const batch = numberColumn(table, 'batch').values;
    expect(new Set(batch).size).to.equal(10);
    const mean = diameter.reduce((a, b) => a + b, 0) / diameter.length;
    const variance = diameter.reduce((a, x) => a + (x - mean) ** 2, 0) / (diameter.length - 1);
    expect(Math.abs(Math.sqrt(variance) - 0.006278905)).to.be.lessThan(5e-10);
  });
});

describe('parseTable missing cells', () => {
  it('counts blank and non-numeric cells of a numeric column as missing and reports line and column', () => {
    const table = parseTable('d,lot\n1.5,A\n,B\nabc,C\n2.5,D\n1e999,E\n3.5,F\n4.5,G\n');
    const d = numberColumn(table, 'd');
    expect(d.missing).to.equal(3);
    expect(Array.from(d.values).map((x) => (Number.isNaN(x) ? 'NaN' : x))).to.deep.equal([1.5, 'NaN', 'NaN', 2.5, 'NaN', 3.5, 4.5]);
    expect(Array.from(presentValues(d.values))).to.deep.equal([1.5, 2.5, 3.5, 4.5]);
    expect(table.skipped).to.deep.equal([
      { line: 3, column: 1, columnName: 'd', reason: 'blank cell' },
      { line: 4, column: 1, columnName: 'd', reason: 'not a number: "abc"' },
      { line: 6, column: 1, columnName: 'd', reason: 'number out of range: "1e999"' },
    ]);
    expect(table.skippedCount).to.equal(3);
  });

  it('never turns a non-numeric cell into zero', () => {
    fc.assert(
      fc.property(fc.array(fc.oneof(fc.constant('x'), fc.constant(''), fc.constant('-'), fc.double({ min: 1, max: 2, noNaN: true }).map(String)), { minLength: 3, maxLength: 60 }), (cells) => {
        const rows = cells.map((c, i) => `${i + 1},${c}`);
        const table = parseTable(`i,v\n${rows.join('\n')}\n`, { allowTextOnly: true });
        const v = table.columns[1];
        if (v.type !== 'number') return;
        for (let i = 0; i < cells.length; i++) {
          const numeric = cells[i] !== 'x' && cells[i] !== '' && cells[i] !== '-';
          expect(Number.isNaN(v.values[i])).to.equal(!numeric);
          if (!numeric) expect(v.values[i]).to.not.equal(0);
        }
        expect(v.missing).to.equal(cells.filter((c) => c === 'x' || c === '' || c === '-').length);
      }),
      { numRuns: 200 },
    );
  });

  it('caps the skipped list but counts everything', () => {
    const lines = ['v'];
    for (let i = 0; i < 6000; i++) lines.push(i % 3 === 1 ? 'bad' : String(i));
    const table = parseTable(lines.join('\n'), { maxSkippedReported: 10 });
    expect(table.skipped).to.have.length(10);
    expect(table.skippedCount).to.equal(2000);
    expect(numberColumn(table, 'v').missing).to.equal(2000);
    expect(table.skipped[0].line).to.equal(3);
    expect(table.skipped[9].line).to.equal(30);
  });

  it('reports empty rows between data rows and drops trailing ones', () => {
    const table = parseTable('x,y\n1,2\n\n,\n3,4\n\n\n');
    expect(table.rowCount).to.equal(2);
    expect(table.skipped).to.deep.equal([
      { line: 3, reason: 'empty row' },
      { line: 4, reason: 'empty row' },
    ]);
  });
});

describe('parseTable malformed input', () => {
  it('an empty file', () => {
    expect(parseError(() => parseTable('')).message).to.match(/empty/);
    expect(parseError(() => parseTable(' \r\n\n  ')).message).to.match(/empty/);
    expect(parseError(() => parseTable(new Uint8Array(0))).message).to.match(/empty/);
    expect(parseError(() => parseTable(new Uint8Array([0xef, 0xbb, 0xbf]))).message).to.match(/empty/);
  });

  it('a header-only file', () => {
    expect(parseError(() => parseTable('diameter,batch\n')).message).to.match(/header row but no data rows/);
    expect(parseError(() => parseTable('diameter;batch')).message).to.match(/header row but no data rows/);
  });

  it('ragged rows, with the line number', () => {
    const short = parseError(() => parseTable('a,b,c\n1,2,3\n4,5,6\n7,8\n9,10,11\n'));
    expect(short.line).to.equal(4);
    expect(short.message).to.contain('Line 4 has 2 fields where 3 are expected');
    const long = parseError(() => parseTable('a,b\n1,2\n3,4,5\n'));
    expect(long.line).to.equal(3);
    expect(long.column).to.equal(3);
    // A newline inside quotes moves the line count on.
    const afterQuotes = parseError(() => parseTable('a,b\n"x\ny",2\n3\n'));
    expect(afterQuotes.line).to.equal(4);
    const skipped = parseTable('a,b,c\n1,2,3\n4,5\n7,8,9\n', { raggedRows: 'skip' });
    expect(skipped.rowCount).to.equal(2);
    expect(skipped.skipped).to.deep.equal([{ line: 3, reason: '2 fields where 3 are expected' }]);
  });

  it('a wrong delimiter given by the caller', () => {
    const error = parseError(() => parseTable('a;b\n1,5;2\n3;4\n', { delimiter: ',' }));
    expect(error.message).to.match(/Line 2 has 2 fields where 1 are expected/);
    expect(error.message).to.match(/delimiter/);
  });

  it('a space-separated file (no supported delimiter): no numeric column', () => {
    expect(parseError(() => parseTable('diameter batch\n1.006 1\n0.996 1\n')).message).to.match(/No numeric column.*delimiter/);
  });

  it('text in every column', () => {
    expect(parseError(() => parseTable('part,finish\nbracket,matte\nhousing,gloss\n')).message).to.match(/No numeric column/);
    expect(parseTable('part,finish\nbracket,matte\n', { allowTextOnly: true }).columns).to.have.length(2);
  });

  it('binary garbage: NUL bytes, control characters, a workbook', function () {
    this.timeout(60_000);
    const nul = parseError(() => parseTable(new Uint8Array([0x61, 0x0a, 0x31, 0x00, 0x32])));
    expect(nul.message).to.match(/binary data.*NUL byte at byte offset 3/);
    const zip = parseError(() => parseTable(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x06, 0x00])));
    expect(zip.message).to.match(/ZIP archive or a spreadsheet workbook/);
    const control = parseError(() => parseTable('a,b\n1,2\n3,\u0007\n'));
    expect(control.message).to.match(/control character U\+0007/);
    expect([control.line, control.column]).to.deep.equal([3, 3]);
    // Random bytes: always refused with a TableParseError, never another exception.
    fc.assert(
      fc.property(fc.uint8Array({ minLength: 1, maxLength: 400 }), (bytes) => {
        const withNul = new Uint8Array([...bytes.subarray(0, bytes.length >> 1), 0, ...bytes.subarray(bytes.length >> 1)]);
        // (UTF-16 with a byte-order mark legitimately holds NUL bytes.)
        const utf16 = (withNul[0] === 0xff && withNul[1] === 0xfe) || (withNul[0] === 0xfe && withNul[1] === 0xff);
        if (!utf16) expect(parseError(() => parseTable(withNul)).message).to.match(/not a text table/);
        try {
          parseTable(bytes);
        } catch (error) {
          expect(error).to.be.instanceOf(TableParseError);
        }
      }),
      { numRuns: 300 },
    );
  });

  it('a file over the byte limit or the row limit', () => {
    expect(parseError(() => parseTable(new Uint8Array(2000).fill(0x31), { maxBytes: 1000 })).message).to.match(/larger than the limit of 1000 bytes/);
    expect(parseError(() => parseTable('µ'.repeat(600), { maxBytes: 1000 })).message).to.match(/larger than the limit/);
    const lines = ['v'];
    for (let i = 0; i < 101; i++) lines.push(String(i));
    const rows = parseError(() => parseTable(lines.join('\n'), { maxRows: 100 }));
    expect(rows.message).to.contain('more than 100 data rows');
    expect(rows.line).to.equal(102);
    expect(parseTable(lines.slice(0, 101).join('\n'), { maxRows: 100 }).rowCount).to.equal(100);
  });

  it('the default limits: 2,000,000 rows and 50 MB', function () {
    this.timeout(60_000);
    const over = 'v\n' + '1\n'.repeat(2_000_001);
    const error = parseError(() => parseTable(over));
    expect(error.message).to.contain('more than 2,000,000 data rows');
    expect(error.line).to.equal(2_000_002);
    expect(parseError(() => parseTable(new Uint8Array(50 * 1024 * 1024 + 1))).message).to.contain('50 MB');
  });

  it('broken quoting', () => {
    const open = parseError(() => parseTable('a,b\n1,"2\n3,4\n'));
    expect(open.message).to.match(/starts on line 2 is never closed/);
    const after = parseError(() => parseTable('a,b\n1,"2"3\n'));
    expect(after.message).to.match(/after a closing quote on line 2/);
    expect(after.column).to.equal(2);
  });
});

describe('tableFromRows (rows from a spreadsheet reader)', () => {
  it('applies the typing rules of parseTable to typed cells', () => {
    const table = tableFromRows([
      ['diameter_mm', 'lot', 'checked', 'when'],
      [1.006, 'A', true, new Date('2024-03-01T00:00:00Z')],
      [0.996, 'B', false, null],
      [null, 'A'],
      ['1.002', 'C', true, undefined],
      ['n/a', 'C'],
    ]);
    expect(table.hasHeader).to.equal(true);
    expect(table.rowCount).to.equal(5);
    expect(Array.from(numberColumn(table, 'diameter_mm').values).map((x) => (Number.isNaN(x) ? null : x))).to.deep.equal([
      1.006, 0.996, null, 1.002, null,
    ]);
    expect(textColumn(table, 'lot').values).to.deep.equal(['A', 'B', 'A', 'C', 'C']);
    expect(textColumn(table, 'checked').values).to.deep.equal(['TRUE', 'FALSE', '', 'TRUE', '']);
    expect(textColumn(table, 'when').values[0]).to.equal('2024-03-01T00:00:00.000Z');
    expect(table.skipped).to.deep.equal([
      { line: 4, column: 1, columnName: 'diameter_mm', reason: 'blank cell' },
      { line: 6, column: 1, columnName: 'diameter_mm', reason: 'not a number: "n/a"' },
    ]);
  });

  it('agrees with parseTable on the same random table split into rows (fast-check)', function () {
    this.timeout(60_000);
    fc.assert(
      fc.property(randomTable, (t) => {
        const fromText = parseTable(writeTable(t, true));
        const fromRows = tableFromRows([t.names, ...t.cells]);
        expect(fromRows.rowCount).to.equal(fromText.rowCount);
        expect(fromRows.skippedCount).to.equal(fromText.skippedCount);
        expect(fromRows.columns.map((c) => [c.name, c.type, Array.from(c.values as ArrayLike<unknown>)])).to.deep.equal(
          fromText.columns.map((c) => [c.name, c.type, Array.from(c.values as ArrayLike<unknown>)]),
        );
      }),
      { numRuns: 150 },
    );
  });

  it('skips blank rows, detects a missing header and reads decimal-comma strings', () => {
    const table = tableFromRows([[], [null, null], ['1,5', 2], ['2,5', 3]]);
    expect(table.hasHeader).to.equal(false);
    expect(table.decimalComma).to.equal(true);
    expect(Array.from(numberColumn(table, 'column 1').values)).to.deep.equal([1.5, 2.5]);
  });

  it('refuses empty sheets, header-only sheets, values beyond the header and too many rows', () => {
    expect(parseError(() => tableFromRows([])).message).to.match(/empty/);
    expect(parseError(() => tableFromRows([['a', 'b']])).message).to.match(/header row but no data rows/);
    const beyond = parseError(() => tableFromRows([['a'], [1], [2, 3]]));
    expect([beyond.line, beyond.column]).to.deep.equal([3, 2]);
    const many = parseError(() => tableFromRows([['v'], [1], [2], [3]], { maxRows: 2 }));
    expect(many.message).to.contain('more than 2 data rows');
    expect(parseError(() => tableFromRows([['a'], ['x'], ['y']])).message).to.match(/No numeric column/);
  });
});
