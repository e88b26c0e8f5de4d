import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { fileURLToPath } from 'node:url';
import { expect } from 'chai';
import fc from 'fast-check';
import { canonicalHash, canonicalJson, sha256Hex, sha256HexPure } from '@shared/engine/hash';
import { pipelineResult } from './hash-pipeline';

// Reference for the canonical form: a deliberately naive serialiser that leans on the platform's
// JSON.stringify for every primitive and for key escaping, and only adds the sorted key order.
// (JSON.stringify itself cannot be used on a key-sorted copy: objects enumerate integer-like keys
// such as "0" before all others whatever the insertion order.)
function reference(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(reference).join(',')}]`;
  if (value !== null && typeof value === 'object') {
    const record = value as Record<string, unknown>;
    const keys = Object.keys(record).sort();
    return `{${keys.map((k) => `${JSON.stringify(k)}:${reference(record[k])}`).join(',')}}`;
  }
  return JSON.stringify(value);
}

// Rebuilds every object with its keys in a random order (drawn from `order`).
function shuffledCopy(value: unknown, order: number[], cursor = { i: 0 }): unknown {
  if (Array.isArray(value)) return value.map((v) => shuffledCopy(v, order, cursor));
  if (value !== null && typeof value === 'object') {
    const keys = Object.keys(value);
    for (let i = keys.length - 1; i > 0; i--) {
      const r = order.length ? order[cursor.i++ % order.length] % (i + 1) : 0;
      [keys[i], keys[r]] = [keys[r], keys[i]];
    }
    const out: Record<string, unknown> = {};
    // defineProperty, not assignment: a key named "__proto__" must stay an own data property.
    for (const key of keys) {
      Object.defineProperty(out, key, {
        value: shuffledCopy((value as Record<string, unknown>)[key], order, cursor),
        enumerable: true,
        writable: true,
        configurable: true,
      });
    }
    return out;
  }
  return value;
}

const nodeSha256 = (data: string | Uint8Array) => createHash('sha256').update(data).digest('hex');

describe('canonicalJson', () => {
  it('equals a naive sorted-key serialiser built on JSON.stringify for any JSON value (fast-check)', () => {
    fc.assert(
      fc.property(fc.jsonValue(), (value) => {
        expect(canonicalJson(value)).to.equal(reference(value));
      }),
      { numRuns: 500 },
    );
  });

  it('does not depend on the insertion order of keys (fast-check)', () => {
    fc.assert(
      fc.property(fc.jsonValue(), fc.array(fc.nat(), { minLength: 1, maxLength: 50 }), (value, order) => {
        expect(canonicalJson(shuffledCopy(value, order))).to.equal(canonicalJson(value));
      }),
      { numRuns: 300 },
    );
  });

  it('round-trips through JSON.parse for any JSON value (fast-check)', () => {
    fc.assert(
      fc.property(fc.jsonValue(), (value) => {
        const back = JSON.parse(canonicalJson(value));
        // -0 prints as 0; compare through one more canonical pass.
        expect(canonicalJson(back)).to.equal(canonicalJson(value));
      }),
      { numRuns: 300 },
    );
  });

  it('prints every finite double so that it parses back to the same double (fast-check)', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => {
        const text = canonicalJson(x);
        expect(Number(text)).to.equal(x === 0 ? 0 : x);
        expect(text).to.equal(String(x));
      }),
      { numRuns: 2000 },
    );
  });

  it('matches the RFC 8785 section 3.2.2 sample (input and output recalled from memory of the RFC)', () => {
    const input = JSON.parse(
      '{"numbers":[333333333.33333329,1E30,4.50,2e-3,0.000000000000000000000000001],' +
        '"string":"\\u20ac$\\u000F\\u000aA\'\\u0042\\u0022\\u005c\\\\\\"\\/","literals":[null,true,false]}',
    );
    expect(canonicalJson(input)).to.equal(
      '{"literals":[null,true,false],"numbers":[333333333.3333333,1e+30,4.5,0.002,1e-27],' +
        '"string":"€$\\u000f\\nA\'B\\"\\\\\\\\\\"/"}',
    );
  });

  it('prints numbers in the fixed form: -0 as 0, integers without exponent below 1e21', () => {
    expect(canonicalJson(-0)).to.equal('0');
    expect(canonicalJson([0, -0])).to.equal('[0,0]');
    expect(canonicalJson(1e20)).to.equal('100000000000000000000');
    expect(canonicalJson(123456789012345680000)).to.equal('123456789012345680000');
    expect(canonicalJson(1e21)).to.equal('1e+21');
    expect(canonicalJson(0.1 + 0.2)).to.equal('0.30000000000000004');
    expect(canonicalJson(5e-324)).to.equal('5e-324');
    expect(canonicalJson(1e-7)).to.equal('1e-7');
    expect(canonicalJson(0.000001)).to.equal('0.000001');
  });

  it('sorts keys by UTF-16 code units and drops undefined members', () => {
    expect(canonicalJson({ b: 1, a: 2, B: 3, é: 4, '\u{1F600}': 5, '\uFFFF': 6 })).to.equal(
      '{"B":3,"a":2,"b":1,"é":4,"\u{1F600}":5,"\uFFFF":6}',
    );
    expect(canonicalJson({ a: undefined, b: { c: undefined, d: null } })).to.equal('{"b":{"d":null}}');
    // Integer-like keys are sorted as strings too, not in the engine's enumeration order.
    expect(canonicalJson({ a: 3, 9: 2, 10: 1 })).to.equal('{"10":1,"9":2,"a":3}');
  });

  it('serialises typed arrays as arrays', () => {
    expect(canonicalJson({ v: new Float64Array([1.5, -0, 3]) })).to.equal('{"v":[1.5,0,3]}');
    expect(canonicalJson(new Int32Array([-1, 2]))).to.equal('[-1,2]');
    expect(canonicalJson(new Uint8Array([255]))).to.equal('[255]');
    expect(canonicalJson(new Float64Array(0))).to.equal('[]');
  });

  it('rejects NaN and ±Infinity with a TypeError naming the path', () => {
    expect(() => canonicalJson({ a: [1, { b: NaN }] })).to.throw(TypeError, '$.a[1].b');
    expect(() => canonicalJson({ 'odd key': Infinity })).to.throw(TypeError, '$["odd key"]');
    expect(() => canonicalJson(-Infinity)).to.throw(TypeError, 'non-finite');
    expect(() => canonicalJson({ v: new Float64Array([1, NaN]) })).to.throw(TypeError, '$.v[1]');
  });

  it('rejects values JSON would silently change', () => {
    expect(() => canonicalJson({ a: 1n })).to.throw(TypeError, 'bigint at $.a');
    expect(() => canonicalJson({ f: () => 1 })).to.throw(TypeError, 'function at $.f');
    expect(() => canonicalJson([1, undefined])).to.throw(TypeError, '$[1]');
    expect(() => canonicalJson(undefined)).to.throw(TypeError);
    expect(() => canonicalJson(new Map())).to.throw(TypeError, 'Map');
    expect(() => canonicalJson(new BigInt64Array(1))).to.throw(TypeError);
    const loop: Record<string, unknown> = {};
    loop.self = loop;
    expect(() => canonicalJson(loop)).to.throw(TypeError, 'circular');
  });

  it('allows the same object twice when it is not its own ancestor', () => {
    const shared = { x: 1 };
    expect(canonicalJson({ a: shared, b: shared })).to.equal('{"a":{"x":1},"b":{"x":1}}');
  });
});

describe('sha256Hex', () => {
  // The pure implementation is tested by name: the server installs node:crypto's in place of it
  // (server/native-hash.ts), and other suites in this process may have loaded that.
  // Known answers: FIPS 180-2 Appendix B / NIST "Examples with intermediate values" (SHA256.pdf),
  // the examples referenced by FIPS 180-4. Digests recalled from memory and also checked against
  // node:crypto below, so a misremembered digest fails this test rather than passing silently.
  const vectors: Array<[string, string]> = [
    ['abc', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'],
    [
      'abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq',
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    ],
    ['a'.repeat(1_000_000), 'cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0'],
    // Empty message: the digest of zero bytes (common practice known answer).
    ['', 'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'],
  ];
  for (const [message, digest] of vectors) {
    it(`gives the FIPS 180 known answer for ${message.length > 60 ? `${message.length} × "a"` : JSON.stringify(message)}`, () => {
      expect(sha256HexPure(message)).to.equal(digest);
      expect(nodeSha256(message)).to.equal(digest);
    });
  }

  it('agrees with node:crypto on random strings, UTF-8 encoded (fast-check)', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'binary', maxLength: 300 }), (text) => {
        expect(sha256HexPure(text)).to.equal(nodeSha256(Buffer.from(text, 'utf8')));
      }),
      { numRuns: 500 },
    );
  });

  it('agrees with node:crypto on random bytes of every length around the block size (fast-check)', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 1000 }), (bytes) => {
        expect(sha256HexPure(bytes)).to.equal(nodeSha256(bytes));
      }),
      { numRuns: 500 },
    );
    for (let n = 50; n <= 130; n++) {
      const bytes = new Uint8Array(n).map((_, i) => (i * 31 + n) & 255);
      expect(sha256HexPure(bytes), `length ${n}`).to.equal(nodeSha256(bytes));
    }
  });

  it('the installed native SHA-256 of the server computes the same digests as the pure one', async () => {
    await import('../../server/native-hash');
    for (const [message, digest] of vectors) expect(sha256Hex(message)).to.equal(digest);
    fc.assert(
      fc.property(fc.oneof(fc.string({ unit: 'binary', maxLength: 300 }), fc.uint8Array({ maxLength: 300 })), (input) => {
        expect(sha256Hex(input)).to.equal(sha256HexPure(input));
      }),
      { numRuns: 300 },
    );
  });

  it('canonicalHash is the SHA-256 of canonical JSON, stable for a fixed document', () => {
    const doc = { title: 'Bore gauge repeatability', steps: [{ id: 's1', n: 10, s: 0.42 }] };
    expect(canonicalHash(doc)).to.equal(nodeSha256(canonicalJson(doc)));
    expect(canonicalHash({ steps: [{ s: 0.42, n: 10, id: 's1' }], title: 'Bore gauge repeatability' })).to.equal(
      canonicalHash(doc),
    );
    // Fixed vector so that any change of the canonical form shows up as a failing test.
    expect(canonicalJson(doc)).to.equal('{"steps":[{"id":"s1","n":10,"s":0.42}],"title":"Bore gauge repeatability"}');
    expect(canonicalHash(doc)).to.equal(nodeSha256('{"steps":[{"id":"s1","n":10,"s":0.42}],"title":"Bore gauge repeatability"}'));
  });
});

describe('determinism across processes', () => {
  it('gives byte-identical canonical JSON and the same SHA-256 in a fresh process', function () {
    this.timeout(120_000);
    const here = pipelineResult();
    const again = pipelineResult();
    expect(again.json).to.equal(here.json);
    const script = fileURLToPath(new URL('./hash-pipeline.ts', import.meta.url));
    const child = spawnSync(process.execPath, ['--import', 'tsx', script], { encoding: 'utf8', env: { ...process.env, TZ: 'Pacific/Chatham', LANG: 'de_DE.UTF-8' } });
    expect(child.status, child.stderr).to.equal(0);
    expect(child.stdout.trim()).to.equal(here.hash);
    expect(here.hash).to.equal(nodeSha256(here.json));
  });
});
