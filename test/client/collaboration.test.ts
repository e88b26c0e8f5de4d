// Pure helpers of the collaboration screens (history, what-if levels, compare, review, audit).
// The fork-at-a-level document is checked against the shared worksheet schema, so what the page
// sends is what the server accepts.
import { expect } from 'chai';
import { WorksheetSchema, type Worksheet } from '@shared/format/worksheet';
import type { ReviewVerdict } from '@shared/api/worksheets';
import {
  alphaFor,
  documentAtLevel,
  hasLevelSteps,
  parseLevel,
  statedLevels,
} from '../../client/src/app/worksheets/history/sheet-at-level';
import {
  formatAge,
  latestVerdicts,
  percentText,
  relativeChangeText,
  shortHash,
  verdictText,
} from '../../client/src/app/worksheets/history/revision-labels';
import { groupResultsByStep, isNotable, leafText, paramPathText, resultValueText } from '../../client/src/app/worksheets/compare/compare-values';
import { auditActionLabel, auditDetailPairs } from '../../client/src/app/teams/audit-trail/audit-labels';

const source = { step: 'd', column: 'x' };
const worksheet: Worksheet = WorksheetSchema.parse({
  format: 'spreadproof.worksheet',
  version: 1,
  title: 'Bores',
  steps: [
    { id: 'd', kind: 'data', params: { origin: 'inline', columns: [{ name: 'x', type: 'number', values: [1, 2, 3, 4] }] } },
    { id: 'ci', kind: 'sigma-interval', params: { source, levels: [0.9, 0.95] } },
    { id: 'tt', kind: 'target-test', params: { source, sigma0: 1 } },
    { id: 'nc', kind: 'normality-check', params: { source, alpha: 0.1 } },
    { id: 'r', kind: 'two-sample-ratio', params: { source: { ...source, groupBy: 'g' } } },
    { id: 'cap', kind: 'capability', params: { source, lsl: 0, usl: 5 } },
  ],
});

describe('client: confidence what-if', () => {
  it('sets every interval and test step to the level, and leaves the others alone', () => {
    const before = JSON.stringify(worksheet);
    const at99 = documentAtLevel(worksheet, 0.99);
    expect(JSON.stringify(worksheet), 'input not mutated').to.equal(before);
    const byId = Object.fromEntries(at99.steps.map((s) => [s.id, s]));
    expect(byId['ci']!.params).to.include({ sides: 'two-sided' });
    expect((byId['ci']!.params as { levels: number[] }).levels).to.deep.equal([0.99]);
    expect((byId['tt']!.params as { alpha: number }).alpha).to.equal(0.01);
    expect(byId['r']!.params).to.include({ level: 0.99, alpha: 0.01 });
    expect(byId['cap']!.params).to.include({ level: 0.99 });
    expect(byId['nc']).to.deep.equal(worksheet.steps[3], 'normality check keeps its own alpha');
    expect(byId['d']).to.deep.equal(worksheet.steps[0]);
  });

  it('makes documents the shared schema accepts', () => {
    for (const level of [0.5, 0.9, 0.95, 0.99, 0.999]) {
      const parsed = WorksheetSchema.safeParse(documentAtLevel(worksheet, level));
      expect(parsed.success, `level ${level}`).to.equal(true);
    }
  });

  it('refuses levels outside (0, 1)', () => {
    for (const level of [0, 1, -0.5, 1.5, Number.NaN]) {
      expect(() => documentAtLevel(worksheet, level), String(level)).to.throw(RangeError);
    }
  });

  it('computes alpha without binary noise', () => {
    expect(1 - 0.99).to.not.equal(0.01);
    expect(alphaFor(0.99)).to.equal(0.01);
    expect(alphaFor(0.9)).to.equal(0.1);
    expect(alphaFor(0.999)).to.equal(0.001);
  });

  it('reads typed levels in percent or as a fraction', () => {
    expect(parseLevel('99')).to.equal(0.99);
    expect(parseLevel(' 99.5 % ')).to.equal(0.995);
    expect(parseLevel('99,5')).to.equal(0.995);
    expect(parseLevel('0.9')).to.equal(0.9);
    expect(parseLevel('150')).to.equal(null);
    expect(parseLevel('100')).to.equal(null);
    expect(parseLevel('0')).to.equal(null);
    expect(parseLevel('')).to.equal(null);
    expect(parseLevel('abc')).to.equal(null);
    expect(parseLevel('-5')).to.equal(null);
  });

  it('lists the levels a document states', () => {
    expect(hasLevelSteps(worksheet)).to.equal(true);
    expect(statedLevels(worksheet)).to.deep.equal([0.9, 0.95]);
    expect(hasLevelSteps({ ...worksheet, steps: [worksheet.steps[0]!] })).to.equal(false);
  });
});

describe('client: revision labels', () => {
  const verdict = (id: string, reviewer: string, verdict: ReviewVerdict['verdict'], createdAt: string): ReviewVerdict => ({
    id,
    revisionId: 'r',
    reviewer: { id: reviewer, name: reviewer.toUpperCase() },
    verdict,
    comment: '',
    contentHash: 'c'.repeat(64),
    createdAt,
  });

  it('keeps the latest verdict of each reviewer, newest first', () => {
    const latest = latestVerdicts([
      verdict('1', 'p', 'changes_requested', '2025-03-01T10:00:00.000Z'),
      verdict('2', 'q', 'approved', '2025-03-02T10:00:00.000Z'),
      verdict('3', 'p', 'approved', '2025-03-03T10:00:00.000Z'),
    ]);
    expect(latest.map((v) => v.id)).to.deep.equal(['3', '2']);
    expect(verdictText(latest[0]!)).to.equal('Approved by P');
  });

  it('writes hashes, levels, changes and ages', () => {
    expect(shortHash('0123456789abcdef')).to.equal('0123456789');
    expect(shortHash(null)).to.equal('');
    expect(percentText(0.95)).to.equal('95 %');
    expect(percentText(0.999)).to.equal('99.9 %');
    expect(relativeChangeText(0.0512)).to.equal('+5.12 %');
    expect(relativeChangeText(-0.25)).to.equal('-25.0 %');
    expect(relativeChangeText(0)).to.equal('±0.000 %');
    expect(relativeChangeText(null)).to.equal('');
    const now = Date.parse('2025-03-10T12:00:00.000Z');
    expect(formatAge('2025-03-10T11:59:50.000Z', now)).to.equal('just now');
    expect(formatAge('2025-03-10T11:55:00.000Z', now)).to.equal('5 min ago');
    expect(formatAge('2025-03-10T09:00:00.000Z', now)).to.equal('3 h ago');
    expect(formatAge('2025-03-09T12:00:00.000Z', now)).to.equal('yesterday');
    expect(formatAge('2025-03-07T12:00:00.000Z', now)).to.equal('3 days ago');
  });
});

describe('client: comparison values', () => {
  it('writes parameter leaves and paths', () => {
    expect(leafText(undefined)).to.equal('(not set)');
    expect(leafText(null)).to.equal('blank');
    expect(leafText('')).to.equal('(empty text)');
    expect(leafText(0.95)).to.equal('0.95');
    expect(leafText([0.95, 0.99])).to.equal('[0.95,0.99]');
    expect(leafText('x'.repeat(300))).to.have.length(300);
    expect(leafText({ a: 'x'.repeat(300) })).to.have.length(158);
    expect(paramPathText('params.levels.0')).to.equal('levels.0');
    expect(paramPathText('title')).to.equal('title');
  });

  it('prefers the engine display string', () => {
    expect(resultValueText(0.0055129, '0.005513')).to.equal('0.005513');
    expect(resultValueText(0.0055129, null)).to.equal('0.00551290');
    expect(resultValueText(12, null)).to.equal('12');
    expect(resultValueText(null, null)).to.equal('—');
  });

  it('groups result changes by step and calls out notable ones', () => {
    const change = (stepId: string, path: string, from: number | null, to: number | null) => ({
      stepId,
      label: stepId,
      path,
      name: path,
      from,
      to,
      fromDisplay: null,
      toDisplay: null,
      relativeChange: from && to !== null ? (to - from) / Math.abs(from) : null,
    });
    const groups = groupResultsByStep([change('a', 'v.1', 1, 2), change('b', 'v.1', 1, 1.00001), change('a', 'v.2', 1, null)]);
    expect(groups.map((g) => [g.stepId, g.changes.length])).to.deep.equal([['a', 2], ['b', 1]]);
    expect(isNotable(groups[0]!.changes[0]!)).to.equal(true);
    expect(isNotable(groups[1]!.changes[0]!)).to.equal(false);
    expect(isNotable(groups[0]!.changes[1]!), 'a value that vanished').to.equal(true);
  });
});

describe('client: audit trail words', () => {
  it('names known actions and shows short details', () => {
    expect(auditActionLabel('link.revoke')).to.equal('revoked a public link');
    expect(auditActionLabel('something.new')).to.equal('something.new');
    const pairs = auditDetailPairs({
      revisionNumber: 3,
      contentHash: 'a'.repeat(64),
      nested: { x: 1 },
      revisionId: '78960fcc-d25d-4d5f-92dd-b73442e7bd13',
      message: 'm'.repeat(100),
    });
    expect(pairs).to.deep.equal([
      { key: 'revision number', value: '3' },
      { key: 'content hash', value: 'a'.repeat(10) },
      { key: 'revision id', value: '78960fcc' },
      { key: 'message', value: `${'m'.repeat(77)}…` },
    ]);
    expect(auditDetailPairs(null)).to.deep.equal([]);
  });
});
