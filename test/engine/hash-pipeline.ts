// A fixed run through the engine's infrastructure (table parser, derived column, sort, note,
// canonical JSON), used by the determinism test in hash.test.ts both in its own process and in
// a fresh child process. Prints the hash when run directly.
import { canonicalHash, canonicalJson } from '../../shared/engine/hash';
import { evaluateDerived } from '../../shared/engine/derived';
import { renderNote } from '../../shared/engine/note';
import { sortFloat64 } from '../../shared/engine/sort';
import { parseTable, presentValues, type NumberColumn } from '../../shared/engine/table/parse';

export function pipelineResult(): { json: string; hash: string } {
  const rows = ['bohrung_mm;los;temperatur_c'];
  for (let i = 0; i < 500; i++) {
    const diameter = (12.5 + Math.sin(i * 0.37) * 0.004 + (i % 7) * 1e-4).toFixed(5).replace('.', ',');
    const lot = `L${1 + (i % 4)}`;
    const temperature = i % 50 === 17 ? '' : (20 + Math.cos(i) * 0.8).toFixed(2).replace('.', ',');
    rows.push(`${diameter};${lot};${temperature}`);
  }
  const table = parseTable(new TextEncoder().encode(rows.join('\r\n')));
  const columns: Record<string, Float64Array> = {};
  for (const column of table.columns) if (column.type === 'number') columns[column.name] = column.values;
  const derived = evaluateDerived('convert(bohrung_mm, "mm", "um") - 12500 + 0.1 * log(temperatur_c)', columns);
  const sorted = sortFloat64(presentValues(derived.values));
  const note = renderNote('Bore check: $\\sigma \\le 4\\,\\mu m$ at **95 %** confidence, lots L1–L4.');
  const result = {
    table: { ...table, columns: table.columns.map((c) => ({ ...c, values: c.type === 'number' ? (c as NumberColumn).values.map((x) => (Number.isNaN(x) ? -1 : x)) : c.values })) },
    derived: { ...derived, values: derived.values.map((x) => (Number.isNaN(x) ? -1 : x)) },
    sorted: { min: sorted[0], median: sorted[sorted.length >> 1], max: sorted[sorted.length - 1], all: sorted },
    note,
  };
  return { json: canonicalJson(result), hash: canonicalHash(result) };
}

if (process.argv[1] && import.meta.url === new URL(`file://${process.argv[1]}`).href) {
  console.log(pipelineResult().hash);
}
