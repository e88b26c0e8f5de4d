// Answers that splice stored JSON text (server/http/raw-json.ts) must be the same JSON as
// serialising the parsed values (RFC 8259 equality of the parsed results; no outside source).
import { expect } from 'chai';
import fc from 'fast-check';
import { RawJson, stringifyWithRaw } from '../../server/http/raw-json';

describe('answers with stored JSON spliced in', () => {
  it('parse to the same value as the parsed parts serialised, at any depth and in arrays', () => {
    fc.assert(
      fc.property(fc.jsonValue(), fc.jsonValue(), fc.string(), (a, b, title) => {
        const textA = JSON.stringify(a);
        const textB = JSON.stringify(b);
        const spliced = stringifyWithRaw({ title, revision: { document: new RawJson(textA), list: [new RawJson(textB), 1] } });
        expect(JSON.parse(spliced)).to.deep.equal(JSON.parse(JSON.stringify({ title, revision: { document: a, list: [b, 1] } })));
      }),
      { numRuns: 300 },
    );
  });

  it('leaves strings that look like placeholders alone, and plain values as JSON.stringify writes them', () => {
    const lookalike = '"0123456789abcdef0123456789abcdef:0"';
    const spliced = stringifyWithRaw({ note: lookalike, raw: new RawJson('{"x":1}') });
    expect(JSON.parse(spliced)).to.deep.equal({ note: lookalike, raw: { x: 1 } });
    expect(stringifyWithRaw({ a: [1, 'two', null], b: { c: true } })).to.equal(JSON.stringify({ a: [1, 'two', null], b: { c: true } }));
  });

  it('still gives the right JSON when sent the ordinary way (JSON.stringify, res.json)', () => {
    expect(JSON.parse(JSON.stringify({ head: { results: new RawJson('{"steps":[1,2]}') } }))).to.deep.equal({ head: { results: { steps: [1, 2] } } });
  });
});
