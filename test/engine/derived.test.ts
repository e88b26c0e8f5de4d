import { expect } from 'chai';
import fc from 'fast-check';
import { all, create } from 'mathjs';
import {
  ALLOWED_FUNCTIONS,
  DISABLED_FUNCTIONS,
  DerivedExpressionError,
  derivedColumnsUsed,
  evaluateDerived,
  restrictedMath,
} from '@shared/engine/derived';

// Reference: a separate, unrestricted math.js instance with the same number configuration,
// evaluating the same expression row by row through its own evaluator.
const reference = create(all, { number: 'number', predictable: true });

function derivedError(run: () => unknown): DerivedExpressionError {
  try {
    run();
  } catch (error) {
    if (!(error instanceof DerivedExpressionError)) expect.fail(`expected a DerivedExpressionError, got ${String(error)}`);
    return error;
  }
  return expect.fail('expected a DerivedExpressionError');
}

/** |a − b| ≤ n·ε·|b|, or both NaN; failure message shows everything. */
function expectClose(actual: number, expected: number, n: number, label: string): void {
  if (Number.isNaN(expected) && Number.isNaN(actual)) return;
  if (Object.is(actual, expected)) return;
  const tolerance = n * Number.EPSILON * Math.abs(expected);
  if (!(Math.abs(actual - expected) <= tolerance)) {
    expect.fail(`${label}: got ${actual}, expected ${expected}, difference ${actual - expected}, tolerance ${tolerance}`);
  }
}

const finite = fc.double({ min: -1e6, max: 1e6, noNaN: true });
const positive = fc.double({ min: 1e-6, max: 1e6, noNaN: true });

describe('evaluateDerived: allowed expressions agree with math.js', () => {
  // Tolerance in multiples of machine epsilon per expression: 0 where math.js calls the same
  // Math function on numbers, a few eps where math.js has its own algorithm (hypot, nthRoot, log
  // with a base).
  const cases: Array<[string, number]> = [
    ['a + b * 2 - a / b', 0],
    ['-a^2 + 3', 0],
    ['2 pi a', 0],
    ['abs(a) + sign(b)', 0],
    ['sqrt(abs(a))', 0],
    ['cbrt(a)', 0],
    ['exp(b / 1e5)', 0],
    ['log(abs(a) + 1)', 0],
    ['log(abs(a) + 1, 10)', 2],
    ['log10(abs(b) + 1) + log2(abs(a) + 1)', 0],
    ['pow(abs(a), 0.5)', 0],
    ['nthRoot(abs(a), 3)', 4],
    ['round(a, 3)', 0],
    ['round(b)', 0],
    ['sin(a) + cos(b) + tan(a / 1e6)', 0],
    ['asin(a / 1e6) + acos(b / 1e6) + atan(a) + atan2(a, b)', 0],
    ['sinh(a / 1e5) + cosh(b / 1e5) + tanh(a)', 0],
    ['expm1(a / 1e6) + log1p(abs(b))', 0],
    ['square(a) - cube(b / 100)', 0],
  ];
  for (const [expression, eps] of cases) {
    it(`${expression} (within ${eps} eps)`, () => {
      const compiled = reference.compile(expression);
      fc.assert(
        fc.property(fc.array(fc.tuple(finite, finite), { minLength: 1, maxLength: 30 }), (pairs) => {
          const a = Float64Array.from(pairs.map((p) => p[0]));
          const b = Float64Array.from(pairs.map((p) => p[1]));
          const result = evaluateDerived(expression, { a, b });
          for (let row = 0; row < pairs.length; row++) {
            let expected = Number(compiled.evaluate({ a: a[row], b: b[row] }));
            if (!Number.isFinite(expected)) expected = NaN;
            expectClose(result.values[row], expected, eps, `${expression} at a=${a[row]}, b=${b[row]}`);
          }
        }),
        { numRuns: 60 },
      );
    });
  }

  // Comparisons, conditions, min, max, hypot, floor-like functions and mod are exact IEEE-754 operations in the
  // engine, while math.js by default takes values within 1e-12 relative as equal (so that
  // 5e-324 > 0 is false there). Their reference is therefore the ECMAScript operator or Math
  // function itself.
  const exact: Array<[string, (a: number, b: number) => number]> = [
    ['a > b ? a - b : b - a', (a, b) => (a > b ? a - b : b - a)],
    ['(a >= 0) + (b < 0) + (a == b) + (a != b)', (a, b) => +(a >= 0) + +(b < 0) + +(a === b) + +(a !== b)],
    ['a > 0 and b > 0 or not (a < b)', (a, b) => ((a > 0 && b > 0) || !(a < b) ? 1 : 0)],
    ['floor(a) + ceil(b) + fix(a)', (a, b) => Math.floor(a) + Math.ceil(b) + Math.trunc(a)],
    ['mod(a, 7) + b % 3', (a, b) => a - 7 * Math.floor(a / 7) + (b - 3 * Math.floor(b / 3))],
    ['min(a, b, 3) + max(a, b)', (a, b) => Math.min(a, b, 3) + Math.max(a, b)],
    ['hypot(a, b)', (a, b) => Math.hypot(a, b)],
  ];
  for (const [expression, js] of exact) {
    it(`${expression} (exact, against the ECMAScript operations)`, () => {
      fc.assert(
        fc.property(fc.array(fc.tuple(finite, finite), { minLength: 1, maxLength: 30 }), (pairs) => {
          const a = Float64Array.from(pairs.map((p) => p[0]));
          const b = Float64Array.from(pairs.map((p) => p[1]));
          const result = evaluateDerived(expression, { a, b });
          pairs.forEach(([x, y], row) => expectClose(result.values[row], js(x, y), 0, `${expression} at a=${x}, b=${y}`));
        }),
        { numRuns: 100 },
      );
    });
  }

  it('floor keeps a value just below an integer below it (math.js would round it up first)', () => {
    expect(evaluateDerived('floor(x)', { x: new Float64Array([999999.9999999991]) }).values[0]).to.equal(999999);
    expect(evaluateDerived('x > y', { x: new Float64Array([5e-324]), y: new Float64Array([0]) }).values[0]).to.equal(1);
  });

  it('lists exactly the functions it implements', () => {
    expect(ALLOWED_FUNCTIONS).to.include.members(['sqrt', 'log', 'log10', 'exp', 'round', 'min', 'max', 'convert', 'col']);
    for (const name of ALLOWED_FUNCTIONS.filter((n) => n !== 'col' && n !== 'convert')) {
      // Each allowed name is a function of the same name in math.js, with the same meaning.
      expect(typeof (reference as unknown as Record<string, unknown>)[name], name).to.equal('function');
    }
  });
});

describe('evaluateDerived: columns, missing values and units', () => {
  it('computes differences and unit conversions per row', () => {
    const columns = {
      before: new Float64Array([10.002, 10.004, 9.998]),
      after: new Float64Array([10.001, 10.006, 9.999]),
      'bore dia (mm)': new Float64Array([12.5, 12.25, 12.75]),
    };
    const difference = evaluateDerived('after - before', columns);
    expect(Array.from(difference.values)).to.deep.equal([10.001 - 10.002, 10.006 - 10.004, 9.999 - 9.998]);
    expect(difference.uses).to.deep.equal(['after', 'before']);
    const microns = evaluateDerived('convert(col("bore dia (mm)"), "mm", "um")', columns);
    expect(Array.from(microns.values)).to.deep.equal([12500, 12250, 12750]);
    expect(microns.uses).to.deep.equal(['bore dia (mm)']);
  });

  it('converts units by their definitions (NIST SP 811, Appendix B; °F = °C·1.8 + 32)', () => {
    const x = { x: new Float64Array([1, 100, -40, 0]) };
    expect(Array.from(evaluateDerived('convert(x, "mm", "um")', x).values)).to.deep.equal([1000, 100000, -40000, 0]);
    expect(Array.from(evaluateDerived('convert(x, "in", "mm")', x).values)).to.deep.equal([25.4, 2540, -1016, 0]);
    expect(Array.from(evaluateDerived('convert(x, "degC", "degF")', x).values)).to.deep.equal([33.8, 212, -40, 32]);
    expect(Array.from(evaluateDerived('convert(x, "degF", "degC")', x).values).map((v) => +v.toFixed(12))).to.deep.equal([
      -17.222222222222, 37.777777777778, -40, -17.777777777778,
    ]);
    expect(evaluateDerived('convert(x, "degC", "K")', x).values[0]).to.equal(274.15);
    expect(evaluateDerived('convert(x, "lb", "kg")', x).values[0]).to.equal(0.45359237);
    // SP 811 B.8: pound-force per square inch = 6.894 757 E+03 Pa.
    expect(evaluateDerived('convert(x, "psi", "kPa")', x).values[0]).to.be.closeTo(6.894757, 5e-7);
    expect(evaluateDerived('convert(x, "lbf", "N")', x).values[0]).to.be.closeTo(4.448222, 5e-7);
  });

  it('reports rows without a finite result as missing, with the row index, never as a number', () => {
    const columns = { r: new Float64Array([2, 0, -1, NaN, 4]) };
    const result = evaluateDerived('log10(r) + 1 / r', columns);
    expect(result.missing).to.equal(3);
    expect(Number.isNaN(result.values[1]) && Number.isNaN(result.values[2]) && Number.isNaN(result.values[3])).to.equal(true);
    expect(result.values[4]).to.equal(Math.log10(4) + 0.25);
    expect(result.skipped).to.deep.equal([
      { row: 1, reason: 'the result is not a finite number (NaN)' },
      { row: 2, reason: 'the result is not a finite number (NaN)' },
      { row: 3, reason: 'an input value is missing' },
    ]);
  });

  it('keeps a missing input missing through comparisons and conditions', () => {
    const result = evaluateDerived('x > 0 ? x : 0', { x: new Float64Array([1, NaN, -1]) });
    expect(result.values[0]).to.equal(1);
    expect(Number.isNaN(result.values[1])).to.equal(true);
    expect(result.values[2]).to.equal(0);
    expect(Number.isNaN(evaluateDerived('1 < x < 3', { x: new Float64Array([NaN]) }).values[0])).to.equal(true);
    expect(Number.isNaN(evaluateDerived('not x', { x: new Float64Array([NaN]) }).values[0])).to.equal(true);
  });

  it('refuses columns of different lengths and names unknown columns, functions and units', () => {
    expect(derivedError(() => evaluateDerived('a + b', { a: new Float64Array(3), b: new Float64Array(4) })).message).to.match(/"b" has 4 rows where 3/);
    const unknown = derivedError(() => evaluateDerived('diameter * 2 + dia', { diameter: new Float64Array(2) }));
    expect(unknown.message).to.contain('Unknown column or constant "dia"');
    expect(unknown.position).to.equal(15);
    const fn = derivedError(() => evaluateDerived('1 + sqrtt(x)', { x: new Float64Array(2) }));
    expect(fn.message).to.contain('The function "sqrtt" is not available');
    expect(fn.position).to.equal(4);
    const unit = derivedError(() => evaluateDerived('convert(x, "mm", "furlong")', { x: new Float64Array(2) }));
    expect(unit.message).to.contain('Unknown unit "furlong"');
    expect(unit.position).to.equal(17);
    const dims = derivedError(() => evaluateDerived('convert(x, "mm", "kg")', { x: new Float64Array(2) }));
    expect(dims.message).to.contain('cannot turn mm (length) into kg (mass)');
    const col = derivedError(() => evaluateDerived('col("no such")', { x: new Float64Array(2) }));
    expect(col.message).to.contain('Unknown column "no such"');
    expect(derivedError(() => evaluateDerived('sqrt(x, 2)', { x: new Float64Array(2) })).message).to.contain('sqrt() takes 1 argument, not 2');
  });

  it('reports the position of a syntax error (from the math.js parser)', () => {
    const open = derivedError(() => evaluateDerived('sqrt(x', { x: new Float64Array(1) }));
    expect(open.message).to.match(/cannot be read.*Parenthesis \) expected/);
    expect(open.position).to.equal(6);
    const stray = derivedError(() => evaluateDerived('x + * 2', { x: new Float64Array(1) }));
    expect(stray.position).to.equal(4);
  });

  it('finds the columns an expression uses without rows', () => {
    expect(derivedColumnsUsed('a - col("b c") + a', ['a', 'b c', 'unused'])).to.deep.equal(['a', 'b c']);
  });

  it('gives the same values with or without a clock (the clock only guards the limit)', () => {
    const x = new Float64Array(20000).map((_, i) => i / 7);
    const plain = evaluateDerived('sin(x) * exp(-x / 1000)', { x });
    let t = 0;
    const clocked = evaluateDerived('sin(x) * exp(-x / 1000)', { x }, { timeLimitMs: 1e9, now: () => (t += 3) });
    expect(Array.from(clocked.values)).to.deep.equal(Array.from(plain.values));
  });
});

describe('evaluateDerived: limits', () => {
  it('rejects expressions over the length limit', () => {
    const long = Array.from({ length: 200 }, () => 'x').join(' + ');
    const error = derivedError(() => evaluateDerived(long, { x: new Float64Array(1) }));
    expect(error.message).to.contain(`${long.length} characters long; the limit is 500`);
    expect(error.position).to.equal(500);
    expect(evaluateDerived(long, { x: new Float64Array([1]) }, { maxLength: 2000 }).values[0]).to.equal(200);
    expect(derivedError(() => evaluateDerived('x + 1', { x: new Float64Array(1) }, { maxLength: 3 })).position).to.equal(3);
  });

  it('rejects empty and deeply nested expressions', () => {
    expect(derivedError(() => evaluateDerived('  ', {})).message).to.contain('empty');
    const deep = `${'('.repeat(5000)}1${')'.repeat(5000)}`;
    expect(derivedError(() => evaluateDerived(deep, {}, { maxLength: 20000 })).message).to.match(/nested too deeply|cannot be read/);
  });

  it('stops with an error at the time limit (deterministic clock)', () => {
    const x = new Float64Array(100_000).fill(1.5);
    let t = 0;
    const now = () => (t += 10); // every look at the clock costs 10 ms
    const error = derivedError(() => evaluateDerived('sqrt(x) + log(x)', { x }, { timeLimitMs: 35, now }));
    expect(error.message).to.contain('time limit of 35 ms');
    expect(error.message).to.contain('stopped after 12,288 of 100,000 rows');
  });

  it('stops a slow expression on a real clock', function () {
    this.timeout(30_000);
    const x = new Float64Array(2_000_000).fill(0.5);
    const heavy = Array.from({ length: 40 }, (_, i) => `sin(x + ${i}) * cos(x * ${i})`).join(' + ');
    const error = derivedError(() => evaluateDerived(heavy, { x }, { maxLength: 5000, timeLimitMs: 5, now: () => performance.now() }));
    expect(error.message).to.contain('time limit of 5 ms');
  });
});

describe('evaluateDerived: nothing outside the allow-list is reachable', () => {
  const x = { x: new Float64Array([1, 2]) };
  const hostile: Array<[string, RegExp]> = [
    ['import({}, {})', /"import" is not available/],
    ['import({x: 1}, {override: true})', /not allowed|not available/],
    ['createUnit("smoot", "1.7018 m")', /"createUnit" is not available/],
    ['evaluate("1 + 1")', /"evaluate" is not available/],
    ['parse("1 + 1")', /"parse" is not available/],
    ['compile("1 + 1")', /"compile" is not available/],
    ['simplify("x + x")', /"simplify" is not available/],
    ['derivative("x^2", "x")', /"derivative" is not available/],
    ['resolve(x)', /"resolve" is not available/],
    ['reviver()', /"reviver" is not available/],
    ['chain(3)', /"chain" is not available/],
    ['config({number: "BigNumber"})', /not allowed|not available/],
    ['typed("f", {})', /not allowed|not available/],
    ['help(sqrt)', /"help" is not available/],
    ['format(x)', /"format" is not available/],
    ['unit("5 mm")', /"unit" is not available/],
    ['matrix([1, 2])', /not allowed|not available/],
    ['f = evaluate', /Assignments are not allowed/],
    ['f(t) = t', /Function definitions are not allowed/],
    ['x = 5', /Assignments are not allowed/],
    ['evaluate', /Unknown column or constant "evaluate"/],
    ['import', /Unknown column or constant "import"|cannot be read/],
    ['sqrt.constructor', /Property access/],
    ['cos.constructor("return process")', /Only the functions of the allowed list/],
    ['cos.constructor("return process")()', /cannot be read|Only the functions|Property access/],
    ['(cos.constructor)("return 1")', /Property access|Only the functions/],
    ['x["constructor"]', /Property access|Indexing/],
    ['x.constructor.constructor("return 1")', /Only the functions|Property access/],
    ['[1, 2, 3]', /Matrices and lists/],
    ['{a: 1}', /Objects are not allowed/],
    ['1:3', /Ranges are not allowed/],
    ['x; x', /Only one expression/],
    ['x\n x', /Only one expression/],
    ['5 mm', /Unknown column or constant "mm"/],
    ['5 mm to um', /Unknown column or constant "mm"|operator "to"/],
    ['x!', /operator "!"/],
    ["x'", /operator "'"/],
    ['"text"', /Text is allowed only/],
    ['true', /true is not allowed/],
    ['col(x)', /col\(\) takes one column name in quotes/],
    ['col("constructor")', /Unknown column "constructor"/],
    ['col("__proto__")', /Unknown column "__proto__"/],
    ['constructor', /Unknown column or constant "constructor"/],
    ['__proto__', /Unknown column or constant "__proto__"/],
    ['Infinity', /Infinity is not allowed: constants must be finite/],
    ['NaN', /NaN is not allowed/],
    ['null', /null is not allowed/],
    ['x(2)', /Only the functions|not available/],
    ['sqrt', /sqrt is a function/],
    ['convert(x, "mm")', /convert\(\) takes a value and two unit names/],
  ];
  for (const [expression, message] of hostile) {
    it(`refuses ${JSON.stringify(expression)}`, () => {
      const before = Object.keys(restrictedMath).length;
      const error = derivedError(() => evaluateDerived(expression, x));
      expect(error.message).to.match(message);
      expect(Object.keys(restrictedMath).length).to.equal(before);
    });
  }

  it('leaves no trace in the global object', () => {
    for (const expression of ['cos.constructor("globalThis.pwned = 1")()', 'evaluate("pwned = 1")', 'import({pwned: 1})']) {
      try {
        evaluateDerived(expression, x);
      } catch {
        // refused, as the cases above show
      }
    }
    expect((globalThis as Record<string, unknown>).pwned).to.equal(undefined);
    expect((restrictedMath as unknown as Record<string, unknown>).pwned).to.equal(undefined);
  });

  it('the restricted math.js instance has every dangerous function replaced (math.js security advice)', function () {
    this.timeout(30_000);
    for (const name of DISABLED_FUNCTIONS) {
      const fn = (restrictedMath as unknown as Record<string, (...args: unknown[]) => unknown>)[name];
      expect(() => fn('1 + 1'), name).to.throw(DerivedExpressionError, 'not available');
    }
    // The reference instance shows what the override took away.
    expect(reference.evaluate('1 + 1')).to.equal(2);
  });

  it('refuses random strings with a DerivedExpressionError or evaluates them, never anything else (fast-check)', function () {
    this.timeout(120_000);
    const token = fc.constantFrom('x', 'y', '1', '2.5', '+', '-', '*', '/', '^', '(', ')', ',', '.', '[', ']', '{', '}', '=', ';', ':',
      '"', 'sqrt', 'evaluate', 'import', 'constructor', 'col', 'convert', '"mm"', '?', '!', ' ', 'e', 'pi', 'to', 'and', 'not');
    fc.assert(
      fc.property(fc.array(token, { minLength: 1, maxLength: 25 }), (tokens) => {
        const expression = tokens.join('');
        try {
          const result = evaluateDerived(expression, { x: new Float64Array([1, 2]), y: new Float64Array([3, 4]) });
          expect(result.values).to.be.instanceOf(Float64Array);
          expect(result.values.length).to.equal(2);
        } catch (error) {
          if (!(error instanceof DerivedExpressionError)) expect.fail(`${JSON.stringify(expression)} threw ${String(error)}`);
        }
      }),
      { numRuns: 1000 },
    );
  });
});
