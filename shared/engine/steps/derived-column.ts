/** Derived-column step: a new numeric column from a math.js expression over an earlier step's columns. */
import type { StepOfKind } from '../../format/worksheet';
import { DerivedExpressionError, evaluateDerived } from '../derived';
import { countValue, type StepResult } from '../result';
import { plural } from './common';
import { lookupData, StepFailure, type ColumnState, type RunContext, type StepData } from './context';
import { describeTable } from './data';

export function runDerivedColumn(step: StepOfKind<'derived-column'>, ctx: RunContext, result: StepResult): StepData {
  const { name, expression, unit } = step.params;
  const source = lookupData(ctx, step.params.step, 'params.step');
  if (source.kind !== 'table') throw new StepFailure('wrong-step-kind', 'params.step', `step "${step.params.step}" holds summary statistics, not columns`);
  const table = source.table;
  if (table.columns.some((c) => c.name === name)) {
    throw new StepFailure('invalid-parameter', 'params.name', `step "${step.params.step}" already has a column "${name}"; choose another name`);
  }
  const numeric: Record<string, Float64Array> = {};
  for (const c of table.columns) if (c.type === 'number') numeric[c.name] = c.values;
  let derived;
  try {
    derived = evaluateDerived(expression, numeric, { rowCount: table.rowCount });
  } catch (e) {
    if (e instanceof DerivedExpressionError) {
      const at = e.position !== undefined ? ` (at character ${e.position + 1})` : '';
      throw new StepFailure('expression', 'params.expression', `${e.message}${at}`);
    }
    throw e;
  }
  // Rows whose inputs were all present but whose result is not finite (log(0), 1/0, sqrt(-1)) are
  // computed non-finite values: a later step that uses them gets a typed error naming the row.
  // Rows with a blank input stay blank.
  const nonFinite: number[] = [];
  let missing = 0;
  for (let r = 0; r < derived.values.length; r++) {
    if (!Number.isNaN(derived.values[r])) continue;
    if (derived.uses.some((u) => Number.isNaN(numeric[u][r]))) missing++;
    else nonFinite.push(r);
  }
  const column: ColumnState = { name, type: 'number', values: derived.values, missing: missing + nonFinite.length, skipped: 0, nonFinite };
  if (unit) column.unit = unit;
  const out = { rowCount: table.rowCount, columns: [...table.columns, column] };
  describeTable(out, result);
  result.values.push(countValue('nonFinite', 'rows without a finite result', nonFinite.length));
  result.formulas.push({ id: 'expression', label: `definition of ${name}`, symbolic: `\\text{${texText(name)}} = \\text{${texText(expression)}}`, substituted: `\\text{${texText(name)}} = \\text{${texText(expression)}}` });
  result.reading = `Column "${name}"${unit ? ` (${unit})` : ''} = ${expression}, computed for ${plural(table.rowCount - missing - nonFinite.length, 'row')}${missing ? `; ${plural(missing, 'row')} left blank because an input was blank` : ''}. ${result.reading}`;
  if (nonFinite.length) {
    result.warnings.push({ code: 'non-finite', message: `${plural(nonFinite.length, 'row')} (first: row ${nonFinite[0] + 1}) give no finite result (e.g. log of 0, division by 0); steps that use "${name}" will report an error until they are fixed.` });
  }
  return { kind: 'table', table: out };
}

function texText(s: string): string {
  return s.replace(/[\\{}$&#^_%~]/g, (c) => `\\${c === '\\' ? 'backslash ' : c}`).replace(/\\\^/g, '\\^{}').replace(/\\~/g, '\\~{}');
}
