/** Data step: inline columns, an uploaded dataset (by SHA-256), or summary statistics. */
import type { InlineColumn, StepOfKind } from '../../format/worksheet';
import { countValue, type StepResult } from '../result';
import { plural } from './common';
import { StepFailure, type ColumnState, type RunContext, type StepData, type TableState } from './context';

const NUMBER_TEXT = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export function runData(step: StepOfKind<'data'>, ctx: RunContext, result: StepResult): StepData {
  const params = step.params;
  if (params.origin === 'summary') {
    params.groups.forEach((g, i) => {
      const label = g.label ?? `group ${i + 1}`;
      if (!Number.isInteger(g.n) || g.n < 2) throw new StepFailure('insufficient-data', `params.groups.${i}.n`, `${label}: n must be an integer of at least 2 (got ${g.n})`);
      if (!Number.isFinite(g.s) || g.s < 0) throw new StepFailure('invalid-parameter', `params.groups.${i}.s`, `${label}: the standard deviation s must be ≥ 0 (got ${g.s})`);
    });
    const labels = params.groups.map((g, i) => g.label ?? `group ${i + 1}`);
    const dup = labels.find((l, i) => labels.indexOf(l) !== i);
    if (dup !== undefined) throw new StepFailure('invalid-parameter', 'params.groups', `the group label "${dup}" is used twice`);
    result.data = {
      rowCount: 0,
      columns: [],
      groups: params.groups.map((g, i) => ({ label: labels[i], n: g.n, mean: g.mean ?? null, s: g.s })),
    };
    result.values.push(countValue('groups', 'groups', params.groups.length));
    result.reading = `Summary statistics of ${plural(params.groups.length, 'group')} (${params.groups.map((g, i) => `${labels[i]}: n = ${g.n}, s = ${g.s}${params.unit ? ' ' + params.unit : ''}`).join('; ')}). Methods that need the individual values (Bonett, Levene, Shapiro-Wilk, ...) are not available for them.`;
    return { kind: 'summary', unit: params.unit, groups: params.groups };
  }

  let table: TableState;
  if (params.origin === 'inline') {
    table = inlineTable(params.columns);
  } else {
    table = ctx.datasetTable(params.datasetId);
    if (params.columns) {
      const units = new Map<string, string | undefined>();
      params.columns.forEach((meta, i) => {
        if (!table.columns.some((c) => c.name === meta.name)) {
          throw new StepFailure('missing-column', `params.columns.${i}.name`, `the dataset has no column "${meta.name}" (columns: ${table.columns.map((c) => `"${c.name}"`).join(', ')})`);
        }
        units.set(meta.name, meta.unit);
      });
      table = {
        rowCount: table.rowCount,
        columns: table.columns.map((c) => (c.type === 'number' && units.get(c.name) ? { ...c, unit: units.get(c.name) } : c)),
      };
    }
  }
  describeTable(table, result);
  return { kind: 'table', table };
}

function inlineTable(columns: InlineColumn[]): TableState {
  const names = new Set<string>();
  const rowCount = columns[0].values.length;
  const states: ColumnState[] = columns.map((col, i) => {
    if (names.has(col.name)) throw new StepFailure('invalid-parameter', `params.columns.${i}.name`, `the column name "${col.name}" is used twice`);
    names.add(col.name);
    if (col.values.length !== rowCount) {
      throw new StepFailure('invalid-parameter', `params.columns.${i}.values`, `column "${col.name}" has ${col.values.length} values but column "${columns[0].name}" has ${rowCount}; columns must be equally long`);
    }
    if (col.type === 'text') {
      let missing = 0;
      const values = col.values.map((v) => {
        if (v === null || v.trim() === '') {
          missing++;
          return null;
        }
        return v;
      });
      return { name: col.name, type: 'text', values, missing, skipped: 0 };
    }
    const values = new Float64Array(rowCount);
    let missing = 0;
    let skipped = 0;
    col.values.forEach((v, r) => {
      if (v === null) {
        missing++;
        values[r] = NaN;
      } else if (typeof v === 'number') {
        values[r] = v;
      } else {
        const t = v.trim();
        if (t === '') {
          missing++;
          values[r] = NaN;
        } else if (NUMBER_TEXT.test(t) && Number.isFinite(Number(t))) {
          values[r] = Number(t);
        } else {
          skipped++;
          values[r] = NaN;
        }
      }
    });
    const state: ColumnState = { name: col.name, type: 'number', values, missing, skipped, nonFinite: [] };
    if (col.unit) state.unit = col.unit;
    return state;
  });
  return { rowCount, columns: states };
}

export function describeTable(table: TableState, result: StepResult): void {
  result.data = {
    rowCount: table.rowCount,
    columns: table.columns.map((c) => {
      const count = c.type === 'number' ? table.rowCount - c.missing - c.skipped : table.rowCount - c.missing;
      const summary = { name: c.name, type: c.type, count, missing: c.missing, skipped: c.skipped } as NonNullable<StepResult['data']>['columns'][number];
      if (c.unit) summary.unit = c.unit;
      return summary;
    }),
  };
  result.values.push(countValue('rows', 'rows', table.rowCount), countValue('columns', 'columns', table.columns.length));
  const parts = table.columns.map((c) => {
    if (c.type === 'text') return `${c.name}: text`;
    const notes: string[] = [];
    if (c.missing) notes.push(`${plural(c.missing, 'blank cell')}`);
    if (c.skipped) notes.push(`${plural(c.skipped, 'non-numeric cell')} skipped`);
    return `${c.name}${c.unit ? ` (${c.unit})` : ''}: ${table.rowCount - c.missing - c.skipped} numbers${notes.length ? ', ' + notes.join(', ') : ''}`;
  });
  result.reading = `${plural(table.rowCount, 'row')} in ${plural(table.columns.length, 'column')}: ${parts.join('; ')}. Blank and non-numeric cells are left out of every calculation, never read as zero.`;
  const excluded = table.columns.reduce((s, c) => s + c.skipped, 0);
  if (excluded > 0) {
    result.warnings.push({ code: 'skipped-cells', message: `${plural(excluded, 'non-numeric cell')} in numeric columns ${excluded === 1 ? 'is' : 'are'} left out of the calculations; check that they are not mistyped measurements.` });
  }
}
