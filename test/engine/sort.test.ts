import { expect } from 'chai';
import fc from 'fast-check';
import { sortFloat64 } from '@shared/engine/sort';

// Reference: Float64Array.prototype.sort without a comparator, whose order the ECMAScript
// specification fixes (numeric, -0 before +0).
function reference(values: Float64Array): Float64Array {
  return values.slice().sort();
}

function expectSameBits(actual: Float64Array, expected: Float64Array): void {
  expect(actual.length).to.equal(expected.length);
  for (let i = 0; i < expected.length; i++) {
    if (!Object.is(actual[i], expected[i])) {
      expect.fail(`index ${i}: got ${actual[i]} (${Object.is(actual[i], -0) ? '-0' : ''}) expected ${expected[i]}`);
    }
  }
}

const specials = [0, -0, Infinity, -Infinity, Number.MIN_VALUE, -Number.MIN_VALUE, 2.2250738585072014e-308,
  -2.2250738585072014e-308, 2.225073858507201e-308, Number.MAX_VALUE, -Number.MAX_VALUE, 1, -1, 1 + Number.EPSILON];

const anyDouble = fc.oneof(
  fc.double({ noNaN: true }),
  fc.constantFrom(...specials),
  // Subnormals: exponent field zero.
  fc.double({ noNaN: true, min: -2.2250738585072014e-308, max: 2.2250738585072014e-308 }),
);

// Lengths on both sides of the small-array cut-over (2048) and of the leaf size.
const lengths = fc.oneof(fc.integer({ min: 0, max: 300 }), fc.integer({ min: 1500, max: 12000 }));

describe('sortFloat64', () => {
  it('orders any doubles exactly as Float64Array.prototype.sort (fast-check)', function () {
    this.timeout(120_000);
    fc.assert(
      fc.property(lengths, fc.array(anyDouble, { minLength: 1, maxLength: 64 }), fc.nat(), (n, pool, seed) => {
        // Fill n slots from a random pool and random fresh doubles, so duplicates are common.
        const values = new Float64Array(n);
        let s = seed;
        for (let i = 0; i < n; i++) {
          s = (Math.imul(s, 1103515245) + 12345) >>> 0;
          values[i] = pool[s % pool.length];
        }
        const before = values.slice();
        expectSameBits(sortFloat64(values), reference(values));
        expectSameBits(values, before); // input untouched
      }),
      { numRuns: 300 },
    );
  });

  it('orders arrays of fully random doubles (fast-check)', function () {
    this.timeout(120_000);
    fc.assert(
      fc.property(fc.float64Array({ noNaN: true, minLength: 2000, maxLength: 8000 }), (values) => {
        expectSameBits(sortFloat64(values), reference(values));
      }),
      { numRuns: 100 },
    );
  });

  it('orders values that differ only in the last fraction bits (deepest digit recursion)', function () {
    this.timeout(120_000);
    for (const base of [1, -1, 1e-300, -3.5e200]) {
      const values = new Float64Array(20000);
      let s = 99;
      for (let i = 0; i < values.length; i++) {
        s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
        const ulp = Math.abs(base) * Number.EPSILON;
        values[i] = base + (s % 5000) * ulp;
      }
      expectSameBits(sortFloat64(values), reference(values));
    }
  });

  it('orders readings of one sign and magnitude (first digit taken where the values differ)', function () {
    this.timeout(60_000);
    let s = 2024;
    const uniform = () => {
      s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
      return (s + 0.5) / 4294967296;
    };
    // Gauge readings 12.5 mm ± 20 um; the same negated; and values whose varying bits start in the
    // low word, straddle the two words, or lie in the high word just below the exponent.
    const cases: Array<[string, () => number]> = [
      ['gauge', () => 12.5 + 0.02 * (uniform() - 0.5)],
      ['negative gauge', () => -12.5 - 0.02 * (uniform() - 0.5)],
      ['low word', () => 1 + Math.floor(uniform() * 2 ** 20) * Number.EPSILON],
      ['straddling', () => 1 + uniform() * 2 ** -12],
      ['high word', () => 3 + uniform() * 0.5],
      ['mostly one value', () => (uniform() < 0.9 ? 7.25 : 7.25 + uniform())],
    ];
    // 30,000 values take the path for smaller arrays, 300,000 the one for large arrays.
    for (const [name, draw, length] of [...cases.map(([a, b]) => [a, b, 30000] as const), ...cases.map(([a, b]) => [a, b, 300000] as const)]) {
      const values = new Float64Array(length);
      for (let i = 0; i < values.length; i++) values[i] = draw();
      const sorted = sortFloat64(values);
      try {
        expectSameBits(sorted, reference(values));
      } catch (error) {
        throw new Error(`${name} (${length} values): ${(error as Error).message}`);
      }
    }
  });

  it('orders -0 before +0 and keeps the sign of zeros', () => {
    const values = new Float64Array(3000);
    for (let i = 0; i < values.length; i++) values[i] = i % 3 === 0 ? -0 : i % 3 === 1 ? 0 : i % 2 ? -1e-320 : 1e-320;
    const sorted = sortFloat64(values);
    expectSameBits(sorted, reference(values));
    expect(Object.is(sorted[sorted.length / 2 - 1], -0) || Object.is(sorted[sorted.length / 2], -0)).to.equal(true);
    const small = sortFloat64(new Float64Array([0, -0, 0, -0]));
    expect([...small].map((x) => Object.is(x, -0))).to.deep.equal([true, true, false, false]);
  });

  it('handles ±Infinity, the extreme finite values and subnormals in a large array', () => {
    const values = new Float64Array(5000);
    for (let i = 0; i < values.length; i++) values[i] = specials[i % specials.length] * (i % 7 === 0 ? 1 : 0.5);
    expectSameBits(sortFloat64(values), reference(values));
  });

  it('sorts a large normal sample (1e6 values) like the built-in sort', function () {
    this.timeout(120_000);
    let s = 12345;
    const uniform = () => {
      s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
      return (s + 0.5) / 4294967296;
    };
    const values = new Float64Array(1_000_000);
    for (let i = 0; i < values.length; i++) {
      values[i] = Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
    }
    expectSameBits(sortFloat64(values), reference(values));
  });

  it('returns a copy for empty, single and constant arrays', () => {
    expect(sortFloat64(new Float64Array(0)).length).to.equal(0);
    const one = new Float64Array([3]);
    const sortedOne = sortFloat64(one);
    expect(sortedOne).to.not.equal(one);
    expect([...sortedOne]).to.deep.equal([3]);
    const constant = new Float64Array(10000).fill(-2.5);
    expectSameBits(sortFloat64(constant), constant);
  });

  it('sorts a view into a larger buffer without touching the rest', () => {
    const buffer = new Float64Array(12000);
    for (let i = 0; i < buffer.length; i++) buffer[i] = Math.sin(i) * 1000;
    const copy = buffer.slice();
    const view = buffer.subarray(500, 10500);
    expectSameBits(sortFloat64(view), reference(view));
    expectSameBits(buffer, copy);
  });

  it('rejects NaN with a RangeError naming its index, on both the small and the radix path', () => {
    expect(() => sortFloat64(new Float64Array([1, NaN, 2]))).to.throw(RangeError, 'index 1');
    const large = new Float64Array(5000).map((_, i) => i);
    large[4321] = NaN;
    expect(() => sortFloat64(large)).to.throw(RangeError, 'index 4321');
    // A NaN with an unusual payload (all fraction bits set) is still NaN.
    const words = new Uint32Array(large.buffer);
    large[4321] = 0;
    words[2 * 17] = 0xffffffff;
    words[2 * 17 + 1] = 0xffffffff;
    expect(() => sortFloat64(large)).to.throw(RangeError, 'index 17');
  });
});
