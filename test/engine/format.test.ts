// The worksheet format: the committed JSON Schema matches the zod schema, and parseWorksheet
// accepts the examples and names the field of a structural error.
import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { expect } from 'chai';
import { parseWorksheet, WORKSHEET_FORMAT } from '@shared/format';
import { worksheetSchemaText } from '@shared/format/export-schema';

const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

describe('worksheet format', () => {
  it('committed worksheet.schema.json is up to date (regenerate: npx tsx shared/format/export-schema.ts)', () => {
    const committed = readFileSync(path.join(repoRoot, 'shared/format/worksheet.schema.json'), 'utf8');
    expect(committed).to.equal(worksheetSchemaText());
  });

  it('the JSON Schema describes the format name and every step kind', () => {
    const schema = JSON.parse(worksheetSchemaText());
    const text = JSON.stringify(schema);
    expect(schema.properties.format.const).to.equal(WORKSHEET_FORMAT);
    for (const kind of ['data', 'derived-column', 'spread-summary', 'sigma-interval', 'target-test', 'two-sample-ratio',
      'group-comparison', 'normality-check', 'sample-size-plan', 'capability', 'note']) {
      expect(text).to.contain(`"const":"${kind}"`);
    }
  });

  it('fills defaults: sigma-interval sides two-sided, both methods', () => {
    const parsed = parseWorksheet({
      format: WORKSHEET_FORMAT, version: 1, title: 't',
      steps: [{ id: 'ci', kind: 'sigma-interval', params: { source: { summary: { n: 10, s: 1 } }, levels: [0.95] } }],
    });
    expect(parsed.ok).to.equal(true);
    if (!parsed.ok) return;
    const step = parsed.worksheet.steps[0];
    expect(step.kind).to.equal('sigma-interval');
    if (step.kind !== 'sigma-interval') return;
    expect(step.params.sides).to.equal('two-sided');
    expect(step.params.methods).to.deep.equal(['chi-square', 'bonett']);
  });

  it('rejects a duplicate step id, naming the field', () => {
    const parsed = parseWorksheet({
      format: WORKSHEET_FORMAT, version: 1, title: 't',
      steps: [
        { id: 'a', kind: 'note', params: { markdown: 'x' } },
        { id: 'a', kind: 'note', params: { markdown: 'y' } },
      ],
    });
    expect(parsed.ok).to.equal(false);
    if (parsed.ok) return;
    expect(parsed.issues[0].field).to.equal('steps.1.id');
    expect(parsed.issues[0].message).to.contain('"a"');
  });

  it('rejects an unknown format name and an unknown step kind', () => {
    const a = parseWorksheet({ format: 'other', version: 1, title: 't', steps: [] });
    expect(a.ok).to.equal(false);
    const b = parseWorksheet({ format: WORKSHEET_FORMAT, version: 1, title: 't', steps: [{ id: 'x', kind: 'mystery', params: {} }] });
    expect(b.ok).to.equal(false);
    if (!b.ok) expect(b.issues[0].field).to.match(/^steps\.0/);
  });

  it('accepts every example worksheet in examples/', () => {
    const dir = path.join(repoRoot, 'examples');
    const files = readdirSync(dir).filter((f) => f.endsWith('.json'));
    for (const file of files) {
      const parsed = parseWorksheet(JSON.parse(readFileSync(path.join(dir, file), 'utf8')));
      expect(parsed.ok, `${file}: ${parsed.ok ? '' : JSON.stringify(parsed.issues)}`).to.equal(true);
    }
  });
});
