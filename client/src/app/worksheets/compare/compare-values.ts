/**
 * How the comparison page writes values: parameter leaves, numbers without a display string, and
 * the grouping of result changes by step. Pure (unit-testable under mocha).
 */
import type { CompareResult } from '@shared/api/worksheets';

type ResultChange = CompareResult['results'][number];

/** A parameter leaf for display: "(not set)" for a missing one, JSON for lists and objects. */
export function leafText(value: unknown): string {
  if (value === undefined) return '(not set)';
  if (value === null) return 'blank';
  if (typeof value === 'string') return value === '' ? '(empty text)' : value;
  if (typeof value === 'number' || typeof value === 'boolean') return String(value);
  const json = JSON.stringify(value);
  return json.length > 160 ? `${json.slice(0, 157)}…` : json;
}

/** "params.levels.0" → "levels.0": every parameter path starts with "params". */
export function paramPathText(path: string): string {
  return path.startsWith('params.') ? path.slice('params.'.length) : path;
}

/** The engine's display string when it sent one, else 6 significant digits; "—" for absent. */
export function resultValueText(value: number | null, display: string | null | undefined): string {
  if (display !== null && display !== undefined && display !== '') return display;
  if (value === null) return '—';
  return Number.isInteger(value) ? String(value) : value.toPrecision(6);
}

/** A conclusion's truth for display. */
export function conclusionText(value: boolean | null): string {
  return value === null ? 'not stated' : value ? 'yes' : 'no';
}

export interface ResultGroup {
  stepId: string;
  label: string;
  changes: ResultChange[];
}

/** Result changes grouped by step, in the order the comparison lists them. */
export function groupResultsByStep(changes: readonly ResultChange[]): ResultGroup[] {
  const groups: ResultGroup[] = [];
  const byStep = new Map<string, ResultGroup>();
  for (const change of changes) {
    let group = byStep.get(change.stepId);
    if (!group) {
      group = { stepId: change.stepId, label: change.label, changes: [] };
      byStep.set(change.stepId, group);
      groups.push(group);
    }
    group.changes.push(change);
  }
  return groups;
}

/** A change large enough to call out: at least 0.1 % relative, or a value that appeared or vanished. */
export function isNotable(change: Pick<ResultChange, 'from' | 'to' | 'relativeChange'>): boolean {
  if (change.from === null || change.to === null) return true;
  if (change.relativeChange === null) return change.from !== change.to;
  return Math.abs(change.relativeChange) >= 0.001;
}
