// Derived columns: a new column computed row by row from a math.js expression over other columns
// ("diameter_mm * 1000", "log10(resistance)", "after - before", "convert(temp, \"degF\", \"degC\")").
//
// Safety, in three layers:
// 1. The math.js instance follows the library's own security advice (mathjs.org, "Expression
//    parser security", and its example more_secure_eval.js): `import`, `createUnit`, `evaluate`,
//    `parse`, `simplify`, `derivative` and the other functions that parse, compile or change the
//    instance are replaced by functions that throw. Only the parser, taken before the override,
//    is used, and only here.
// 2. The expression tree is checked against an allow-list before anything runs: numbers,
//    column names, the constants pi, e and tau, the operators below, parentheses, the conditional
//    `a ? b : c`, and calls of the functions in FUNCTIONS by name. Everything else is refused:
//    property access (`cos.constructor`, `x["constructor"]`), assignments and function
//    definitions, blocks, matrices, objects, ranges, units, strings outside `col` and `convert`.
// 3. The checked tree is not handed to math.js for evaluation: it is compiled into closures over
//    plain numbers that can only reach the functions of this file. There is no path from an
//    expression to `evaluate`, `import`, `Function` or any object property.
// Numbers: comparisons, floor, ceil, fix and mod are exact IEEE-754 operations (math.js by default
// treats values within 1e-12 relative as equal); round is math.js round.
// Limits: the length of the expression, and an optional time limit checked every CHECK_EVERY
// rows with a clock passed in by the caller (the engine itself reads no clock). A limit hit is an
// error, never a partial column.
import { all, create, type MathNode } from 'mathjs';

export interface DerivedOptions {
  /** Longest expression accepted, in characters (default 500). */
  maxLength?: number;
  /** Time limit in milliseconds; needs `now`. */
  timeLimitMs?: number;
  /** Clock for the time limit only (e.g. performance.now); never affects the values. */
  now?: () => number;
  /** Number of rows when the expression uses no column (default: the length of the columns). */
  rowCount?: number;
  /** Length of the `skipped` list (default 1000); `missing` counts all. */
  maxSkippedReported?: number;
}

export interface DerivedRowSkip {
  /** 0-based row index. */
  row: number;
  reason: string;
}

export interface DerivedColumn {
  /** One value per row; rows without a finite result hold NaN. */
  values: Float64Array;
  /** Number of rows without a finite result. */
  missing: number;
  /** The first rows without a finite result, with the reason. */
  skipped: DerivedRowSkip[];
  /** The columns the expression reads. */
  uses: string[];
}

/** A refused or failed expression. `position` is the 0-based character offset, when known. */
export class DerivedExpressionError extends Error {
  override readonly name = 'DerivedExpressionError';

  constructor(
    message: string,
    readonly position?: number,
  ) {
    super(message);
  }
}

export const DEFAULT_MAX_LENGTH = 500;
const DEFAULT_MAX_SKIPPED = 1000;
/** Rows between two looks at the clock. */
const CHECK_EVERY = 4096;

// --- The restricted math.js instance ------------------------------------------------------------

const math = create(all, { number: 'number', predictable: true });
const parseExpression = math.parse.bind(math);

function disabled(name: string) {
  return () => {
    throw new DerivedExpressionError(`The function ${name} is not available in derived-column expressions.`);
  };
}

// Everything that parses, compiles, evaluates or changes the instance, as listed in the math.js
// security advice plus the functions that expose the parser or the type system in other ways.
export const DISABLED_FUNCTIONS = [
  'import',
  'createUnit',
  'evaluate',
  'parse',
  'compile',
  'simplify',
  'simplifyConstant',
  'simplifyCore',
  'derivative',
  'resolve',
  'reviver',
  'replacer',
  'chain',
  'parser',
  'rationalize',
  'leafCount',
  'symbolicEqual',
  'help',
  'config',
  'typed',
] as const;

math.import(Object.fromEntries(DISABLED_FUNCTIONS.map((name) => [name, disabled(name)])), { override: true });

/** The restricted instance, exported so tests can prove its dangerous functions are gone. */
export const restrictedMath = math;

// --- The allow-list -----------------------------------------------------------------------------

type NumberFunction = (...args: number[]) => number;

interface AllowedFunction {
  /** Allowed argument counts (inclusive range). */
  arity: [number, number];
  fn: NumberFunction;
}

const mathRound = math.round as unknown as (x: number, digits?: number) => number;

/** math.js `round` (half away from zero, on the shortest decimal form) to 0..15 decimals. */
function roundTo(x: number, digits = 0): number {
  if (!Number.isFinite(x)) return x;
  if (!Number.isInteger(digits) || digits < 0 || digits > 15) return NaN;
  return mathRound(x, digits);
}

const FUNCTIONS: Record<string, AllowedFunction> = {
  abs: { arity: [1, 1], fn: Math.abs },
  sqrt: { arity: [1, 1], fn: Math.sqrt },
  cbrt: { arity: [1, 1], fn: Math.cbrt },
  square: { arity: [1, 1], fn: (x) => x * x },
  cube: { arity: [1, 1], fn: (x) => x * x * x },
  exp: { arity: [1, 1], fn: Math.exp },
  expm1: { arity: [1, 1], fn: Math.expm1 },
  log: { arity: [1, 2], fn: (x, base) => (base === undefined ? Math.log(x) : Math.log(x) / Math.log(base)) },
  log10: { arity: [1, 1], fn: Math.log10 },
  log2: { arity: [1, 1], fn: Math.log2 },
  log1p: { arity: [1, 1], fn: Math.log1p },
  pow: { arity: [2, 2], fn: Math.pow },
  nthRoot: { arity: [2, 2], fn: (x, n) => (x < 0 && n % 2 === 1 ? -Math.pow(-x, 1 / n) : Math.pow(x, 1 / n)) },
  hypot: { arity: [1, 16], fn: Math.hypot },
  min: { arity: [1, 16], fn: Math.min },
  max: { arity: [1, 16], fn: Math.max },
  round: { arity: [1, 2], fn: roundTo },
  floor: { arity: [1, 1], fn: Math.floor },
  ceil: { arity: [1, 1], fn: Math.ceil },
  fix: { arity: [1, 1], fn: Math.trunc },
  sign: { arity: [1, 1], fn: Math.sign },
  mod: { arity: [2, 2], fn: (x, y) => (y === 0 ? x : x - y * Math.floor(x / y)) },
  sin: { arity: [1, 1], fn: Math.sin },
  cos: { arity: [1, 1], fn: Math.cos },
  tan: { arity: [1, 1], fn: Math.tan },
  asin: { arity: [1, 1], fn: Math.asin },
  acos: { arity: [1, 1], fn: Math.acos },
  atan: { arity: [1, 1], fn: Math.atan },
  atan2: { arity: [2, 2], fn: Math.atan2 },
  sinh: { arity: [1, 1], fn: Math.sinh },
  cosh: { arity: [1, 1], fn: Math.cosh },
  tanh: { arity: [1, 1], fn: Math.tanh },
};

const CONSTANTS: Record<string, number> = { pi: Math.PI, e: Math.E, tau: 2 * Math.PI };

/** Operators by the math.js function name of their OperatorNode. */
const OPERATORS: Record<string, NumberFunction> = {
  add: (a, b) => a + b,
  subtract: (a, b) => a - b,
  multiply: (a, b) => a * b,
  divide: (a, b) => a / b,
  pow: Math.pow,
  mod: FUNCTIONS.mod.fn,
  unaryMinus: (a) => -a,
  unaryPlus: (a) => a,
  // Comparisons and logic give 1 or 0, and NaN when an operand is missing, so that a missing
  // value never turns into a branch of a condition.
  equal: (a, b) => (a !== a || b !== b ? NaN : a === b ? 1 : 0),
  unequal: (a, b) => (a !== a || b !== b ? NaN : a !== b ? 1 : 0),
  smaller: (a, b) => (a !== a || b !== b ? NaN : a < b ? 1 : 0),
  larger: (a, b) => (a !== a || b !== b ? NaN : a > b ? 1 : 0),
  smallerEq: (a, b) => (a !== a || b !== b ? NaN : a <= b ? 1 : 0),
  largerEq: (a, b) => (a !== a || b !== b ? NaN : a >= b ? 1 : 0),
  and: (a, b) => (a !== a || b !== b ? NaN : a !== 0 && b !== 0 ? 1 : 0),
  or: (a, b) => (a !== a || b !== b ? NaN : a !== 0 || b !== 0 ? 1 : 0),
  xor: (a, b) => (a !== a || b !== b ? NaN : (a !== 0) !== (b !== 0) ? 1 : 0),
  not: (a) => (a !== a ? NaN : a === 0 ? 1 : 0),
};

/** The names an expression may call, for the editor's help and for error messages. */
export const ALLOWED_FUNCTIONS = [...Object.keys(FUNCTIONS), 'col', 'convert'].sort();
export const ALLOWED_CONSTANTS = Object.keys(CONSTANTS);

// --- Units for convert(x, "from", "to") ---------------------------------------------------------

interface UnitDef {
  dimension: string;
  /** Size of the unit in the SI unit of its dimension: mantissa · 10^exponent. */
  mantissa: number;
  exponent: number;
}

// Definitions: inch = 0.0254 m, foot = 0.3048 m, pound = 0.45359237 kg, ounce = pound / 16 (the
// 1959 international yard and pound); pound-force = 0.45359237 kg · 9.80665 m/s² (standard
// gravity); psi = lbf / inch². Exact decimal definitions are kept as mantissa and power of ten so
// that decimal prefixes convert exactly (mm → um multiplies by exactly 1000).
const UNITS: Record<string, UnitDef> = {
  m: { dimension: 'length', mantissa: 1, exponent: 0 },
  cm: { dimension: 'length', mantissa: 1, exponent: -2 },
  mm: { dimension: 'length', mantissa: 1, exponent: -3 },
  um: { dimension: 'length', mantissa: 1, exponent: -6 },
  µm: { dimension: 'length', mantissa: 1, exponent: -6 },
  nm: { dimension: 'length', mantissa: 1, exponent: -9 },
  in: { dimension: 'length', mantissa: 254, exponent: -4 },
  mil: { dimension: 'length', mantissa: 254, exponent: -7 },
  ft: { dimension: 'length', mantissa: 3048, exponent: -4 },
  kg: { dimension: 'mass', mantissa: 1, exponent: 0 },
  g: { dimension: 'mass', mantissa: 1, exponent: -3 },
  mg: { dimension: 'mass', mantissa: 1, exponent: -6 },
  ug: { dimension: 'mass', mantissa: 1, exponent: -9 },
  lb: { dimension: 'mass', mantissa: 45359237, exponent: -8 },
  oz: { dimension: 'mass', mantissa: 28349523125, exponent: -12 },
  s: { dimension: 'time', mantissa: 1, exponent: 0 },
  ms: { dimension: 'time', mantissa: 1, exponent: -3 },
  us: { dimension: 'time', mantissa: 1, exponent: -6 },
  min: { dimension: 'time', mantissa: 60, exponent: 0 },
  h: { dimension: 'time', mantissa: 3600, exponent: 0 },
  Pa: { dimension: 'pressure', mantissa: 1, exponent: 0 },
  kPa: { dimension: 'pressure', mantissa: 1, exponent: 3 },
  MPa: { dimension: 'pressure', mantissa: 1, exponent: 6 },
  GPa: { dimension: 'pressure', mantissa: 1, exponent: 9 },
  bar: { dimension: 'pressure', mantissa: 1, exponent: 5 },
  mbar: { dimension: 'pressure', mantissa: 1, exponent: 2 },
  psi: { dimension: 'pressure', mantissa: (0.45359237 * 9.80665) / (0.0254 * 0.0254), exponent: 0 },
  N: { dimension: 'force', mantissa: 1, exponent: 0 },
  kN: { dimension: 'force', mantissa: 1, exponent: 3 },
  lbf: { dimension: 'force', mantissa: 0.45359237 * 9.80665, exponent: 0 },
  Nm: { dimension: 'torque', mantissa: 1, exponent: 0 },
  rad: { dimension: 'angle', mantissa: 1, exponent: 0 },
  deg: { dimension: 'angle', mantissa: Math.PI / 180, exponent: 0 },
  V: { dimension: 'voltage', mantissa: 1, exponent: 0 },
  mV: { dimension: 'voltage', mantissa: 1, exponent: -3 },
  uV: { dimension: 'voltage', mantissa: 1, exponent: -6 },
  A: { dimension: 'current', mantissa: 1, exponent: 0 },
  mA: { dimension: 'current', mantissa: 1, exponent: -3 },
  uA: { dimension: 'current', mantissa: 1, exponent: -6 },
  ohm: { dimension: 'resistance', mantissa: 1, exponent: 0 },
  kohm: { dimension: 'resistance', mantissa: 1, exponent: 3 },
  Mohm: { dimension: 'resistance', mantissa: 1, exponent: 6 },
};

/** Temperatures are affine: through degrees Celsius, °F = °C · 1.8 + 32, K = °C + 273.15. */
const TEMPERATURES: Record<string, { toCelsius: (x: number) => number; fromCelsius: (c: number) => number }> = {
  degC: { toCelsius: (x) => x, fromCelsius: (c) => c },
  degF: { toCelsius: (x) => (x - 32) / 1.8, fromCelsius: (c) => c * 1.8 + 32 },
  K: { toCelsius: (x) => x - 273.15, fromCelsius: (c) => c + 273.15 },
};

/** Unit names accepted by convert(), for the editor's help. */
export const CONVERTIBLE_UNITS = [...Object.keys(UNITS), ...Object.keys(TEMPERATURES)];

function unitConverter(from: string, to: string, fromPos: number, toPos: number): (x: number) => number {
  const known = (u: string) => Object.hasOwn(UNITS, u) || Object.hasOwn(TEMPERATURES, u);
  if (!known(from)) throw new DerivedExpressionError(`Unknown unit "${from}" in convert(); known units: ${CONVERTIBLE_UNITS.join(', ')}.`, fromPos);
  if (!known(to)) throw new DerivedExpressionError(`Unknown unit "${to}" in convert(); known units: ${CONVERTIBLE_UNITS.join(', ')}.`, toPos);
  const dimension = (u: string) => (Object.hasOwn(TEMPERATURES, u) ? 'temperature' : UNITS[u].dimension);
  if (dimension(from) !== dimension(to)) {
    throw new DerivedExpressionError(`convert() cannot turn ${from} (${dimension(from)}) into ${to} (${dimension(to)}).`, toPos);
  }
  if (Object.hasOwn(TEMPERATURES, from)) {
    const { toCelsius } = TEMPERATURES[from];
    const { fromCelsius } = TEMPERATURES[to];
    return from === to ? (x) => x : (x) => fromCelsius(toCelsius(x));
  }
  const a = UNITS[from];
  const b = UNITS[to];
  const shift = a.exponent - b.exponent;
  const ratio = shift >= 0 ? (a.mantissa / b.mantissa) * 10 ** shift : a.mantissa / b.mantissa / 10 ** -shift;
  return (x) => x * ratio;
}

// --- Checking and compiling ---------------------------------------------------------------------

type RowFunction = (row: number) => number;

interface CompileContext {
  expression: string;
  columns: Record<string, Float64Array>;
  uses: Set<string>;
}

/**
 * Evaluates `expression` for every row of `columns` (all of one length). Missing input values
 * (NaN) and non-finite results give NaN in that row, counted and listed with the row index.
 * Throws DerivedExpressionError for a refused expression, an unknown column, function or unit, a
 * mismatch of column lengths, or the time limit.
 */
export function evaluateDerived(
  expression: string,
  columns: Record<string, Float64Array>,
  options: DerivedOptions = {},
): DerivedColumn {
  const maxLength = options.maxLength ?? DEFAULT_MAX_LENGTH;
  if (typeof expression !== 'string' || expression.trim() === '') {
    throw new DerivedExpressionError('The expression is empty.', 0);
  }
  if (expression.length > maxLength) {
    throw new DerivedExpressionError(
      `The expression is ${expression.length} characters long; the limit is ${maxLength}.`,
      maxLength,
    );
  }

  let tree: MathNode;
  try {
    tree = parseExpression(expression);
  } catch (error) {
    if (error instanceof RangeError) throw new DerivedExpressionError('The expression is nested too deeply.');
    const char = (error as { char?: unknown }).char;
    const message = error instanceof Error ? error.message : String(error);
    throw new DerivedExpressionError(
      `The expression cannot be read: ${message}`,
      typeof char === 'number' ? Math.max(0, char - 1) : undefined,
    );
  }

  const context: CompileContext = { expression, columns, uses: new Set() };
  const evaluate = compile(tree, context);
  const uses = [...context.uses];

  let rows = options.rowCount;
  for (const name of uses) {
    const length = columns[name].length;
    if (rows === undefined) rows = length;
    else if (length !== rows) {
      throw new DerivedExpressionError(`Column "${name}" has ${length} rows where ${rows} are expected.`);
    }
  }
  if (rows === undefined) {
    const first = Object.values(columns)[0];
    rows = first ? first.length : 0;
  }

  const values = new Float64Array(rows);
  const maxSkipped = options.maxSkippedReported ?? DEFAULT_MAX_SKIPPED;
  const skipped: DerivedRowSkip[] = [];
  let missing = 0;
  const { timeLimitMs, now } = options;
  const limited = timeLimitMs !== undefined && now !== undefined;
  const started = limited ? now() : 0;
  const inputs = uses.map((name) => columns[name]);

  for (let start = 0; start < rows; start += CHECK_EVERY) {
    if (limited && now() - started > timeLimitMs) {
      throw new DerivedExpressionError(
        `The expression did not finish within the time limit of ${timeLimitMs} ms (stopped after ${start.toLocaleString('en-US')} of ${rows.toLocaleString('en-US')} rows).`,
      );
    }
    const end = Math.min(rows, start + CHECK_EVERY);
    for (let row = start; row < end; row++) {
      const value = evaluate(row);
      if (Number.isFinite(value)) {
        values[row] = value;
        continue;
      }
      values[row] = NaN;
      missing++;
      if (skipped.length < maxSkipped) {
        const inputMissing = inputs.some((column) => Number.isNaN(column[row]));
        skipped.push({
          row,
          reason: inputMissing ? 'an input value is missing' : `the result is not a finite number (${value})`,
        });
      }
    }
  }
  return { values, missing, skipped, uses };
}

/** The column names an expression reads, without evaluating it (for dependency checks). */
export function derivedColumnsUsed(expression: string, columnNames: readonly string[]): string[] {
  const columns: Record<string, Float64Array> = Object.create(null);
  for (const name of columnNames) columns[name] = new Float64Array(0);
  return evaluateDerived(expression, columns, { rowCount: 0 }).uses;
}

function compile(node: MathNode, context: CompileContext): RowFunction {
  switch (node.type) {
    case 'ConstantNode': {
      const value = (node as MathNode & { value: unknown }).value;
      if (typeof value !== 'number' || !Number.isFinite(value)) {
        throw new DerivedExpressionError(
          typeof value === 'string'
            ? 'Text is allowed only as a column name in col("…") or as a unit in convert(x, "from", "to").'
            : `The value ${String(value)} is not allowed: constants must be finite numbers.`,
          findToken(context.expression, typeof value === 'string' ? '"' : String(value)),
        );
      }
      return () => value;
    }
    case 'SymbolNode': {
      const name = (node as MathNode & { name: string }).name;
      return symbol(name, context);
    }
    case 'ParenthesisNode':
      return compile((node as MathNode & { content: MathNode }).content, context);
    case 'OperatorNode': {
      const op = node as MathNode & { fn: string; op: string; args: MathNode[] };
      const fn = Object.hasOwn(OPERATORS, op.fn) ? OPERATORS[op.fn] : undefined;
      if (!fn) {
        throw new DerivedExpressionError(
          `The operator "${op.op}" is not allowed in derived-column expressions; use + - * / ^ %, comparisons, and, or, not.`,
          findToken(context.expression, op.op),
        );
      }
      const args = op.args.map((arg) => compile(arg, context));
      if (args.length === 1) {
        const [a] = args;
        return (row) => fn(a(row));
      }
      const [a, b] = args;
      return (row) => fn(a(row), b(row));
    }
    case 'ConditionalNode': {
      const c = node as MathNode & { condition: MathNode; trueExpr: MathNode; falseExpr: MathNode };
      const condition = compile(c.condition, context);
      const whenTrue = compile(c.trueExpr, context);
      const whenFalse = compile(c.falseExpr, context);
      return (row) => {
        const test = condition(row);
        if (Number.isNaN(test)) return NaN;
        return test !== 0 ? whenTrue(row) : whenFalse(row);
      };
    }
    case 'RelationalNode': {
      const r = node as MathNode & { conditionals: string[]; params: MathNode[] };
      const params = r.params.map((p) => compile(p, context));
      const tests = r.conditionals.map((name) => {
        const fn = Object.hasOwn(OPERATORS, name) ? OPERATORS[name] : undefined;
        if (!fn) throw new DerivedExpressionError(`The comparison ${name} is not allowed.`);
        return fn;
      });
      return (row) => {
        let left = params[0](row);
        let result = 1;
        for (let i = 0; i < tests.length; i++) {
          const right = params[i + 1](row);
          const test = tests[i](left, right);
          if (test !== test) return NaN;
          if (test === 0) result = 0;
          left = right;
        }
        return result;
      };
    }
    case 'FunctionNode':
      return call(node as MathNode & { fn: MathNode; args: MathNode[] }, context);
    default:
      throw refusedNode(node, context.expression);
  }
}

function symbol(name: string, context: CompileContext): RowFunction {
  if (Object.hasOwn(context.columns, name)) {
    const column = context.columns[name];
    context.uses.add(name);
    return (row) => column[row];
  }
  if (Object.hasOwn(CONSTANTS, name)) {
    const value = CONSTANTS[name];
    return () => value;
  }
  if (Object.hasOwn(FUNCTIONS, name) || name === 'col' || name === 'convert') {
    throw new DerivedExpressionError(`${name} is a function: call it as ${name}(…).`, findName(context.expression, name));
  }
  throw new DerivedExpressionError(
    `Unknown column or constant "${name}". Columns: ${listNames(Object.keys(context.columns))}; for a column name with spaces or symbols write col("name").`,
    findName(context.expression, name),
  );
}

function call(node: MathNode & { fn: MathNode; args: MathNode[] }, context: CompileContext): RowFunction {
  if (node.fn.type !== 'SymbolNode') {
    // f(x)(y), (a)(b) with a non-name callee, a.b(c): nothing but a plain name may be called.
    throw new DerivedExpressionError('Only the functions of the allowed list may be called, by name.', findToken(context.expression, '('));
  }
  const name = (node.fn as MathNode & { name: string }).name;
  const position = findName(context.expression, name);
  const args = node.args;

  if (name === 'col') {
    if (args.length !== 1 || !isStringConstant(args[0])) {
      throw new DerivedExpressionError('col() takes one column name in quotes, as in col("bore diameter").', position);
    }
    const columnName = (args[0] as MathNode & { value: string }).value;
    if (!Object.hasOwn(context.columns, columnName)) {
      throw new DerivedExpressionError(`Unknown column "${columnName}". Columns: ${listNames(Object.keys(context.columns))}.`, position);
    }
    const column = context.columns[columnName];
    context.uses.add(columnName);
    return (row) => column[row];
  }

  if (name === 'convert') {
    if (args.length !== 3 || !isStringConstant(args[1]) || !isStringConstant(args[2])) {
      throw new DerivedExpressionError('convert() takes a value and two unit names in quotes, as in convert(d, "mm", "um").', position);
    }
    const from = (args[1] as MathNode & { value: string }).value;
    const to = (args[2] as MathNode & { value: string }).value;
    const convert = unitConverter(from, to, findToken(context.expression, `"${from}"`) ?? position ?? 0, findToken(context.expression, `"${to}"`) ?? position ?? 0);
    const value = compile(args[0], context);
    return (row) => convert(value(row));
  }

  const allowed = Object.hasOwn(FUNCTIONS, name) ? FUNCTIONS[name] : undefined;
  if (!allowed) {
    throw new DerivedExpressionError(
      `The function "${name}" is not available in derived-column expressions. Available: ${ALLOWED_FUNCTIONS.join(', ')}.`,
      position,
    );
  }
  const [low, high] = allowed.arity;
  if (args.length < low || args.length > high) {
    const expected = low === high ? `${low}` : `${low} to ${high}`;
    throw new DerivedExpressionError(`${name}() takes ${expected} argument${high === 1 ? '' : 's'}, not ${args.length}.`, position);
  }
  const compiled = args.map((arg) => compile(arg, context));
  const fn = allowed.fn;
  switch (compiled.length) {
    case 1: {
      const [a] = compiled;
      return (row) => fn(a(row));
    }
    case 2: {
      const [a, b] = compiled;
      return (row) => fn(a(row), b(row));
    }
    default:
      return (row) => fn(...compiled.map((arg) => arg(row)));
  }
}

function isStringConstant(node: MathNode): boolean {
  return node.type === 'ConstantNode' && typeof (node as MathNode & { value: unknown }).value === 'string';
}

function refusedNode(node: MathNode, expression: string): DerivedExpressionError {
  const what: Record<string, [string, string]> = {
    AccessorNode: ['Property access (a.b, a["b"]) is not allowed', '.'],
    AssignmentNode: ['Assignments are not allowed', '='],
    FunctionAssignmentNode: ['Function definitions are not allowed', '='],
    BlockNode: ['Only one expression is allowed (no ";" or line breaks between expressions)', ';'],
    ArrayNode: ['Matrices and lists are not allowed', '['],
    ObjectNode: ['Objects are not allowed', '{'],
    IndexNode: ['Indexing is not allowed', '['],
    RangeNode: ['Ranges are not allowed', ':'],
  };
  const [message, token] = what[node.type] ?? [`This kind of expression (${node.type}) is not allowed`, ''];
  let position = token ? findToken(expression, token) : undefined;
  if (node.type === 'AccessorNode' && position === undefined) position = findToken(expression, '[');
  if (node.type === 'BlockNode' && position === undefined) position = findToken(expression, '\n');
  return new DerivedExpressionError(`${message} in derived-column expressions.`, position);
}

function listNames(names: string[]): string {
  if (names.length === 0) return '(none)';
  const shown = names.slice(0, 20).map((n) => `"${n}"`);
  return names.length > 20 ? `${shown.join(', ')}, …` : shown.join(', ');
}

const IDENTIFIER_CHAR = /[\p{L}\p{N}_$]/u;

/** Offset of `name` as a whole identifier outside string literals, if present. */
function findName(expression: string, name: string): number | undefined {
  let from = 0;
  for (;;) {
    const at = findToken(expression, name, from);
    if (at === undefined) return undefined;
    const before = at > 0 ? expression[at - 1] : '';
    const after = expression[at + name.length] ?? '';
    if (!IDENTIFIER_CHAR.test(before) && !IDENTIFIER_CHAR.test(after)) return at;
    from = at + 1;
  }
}

/**
 * Offset of the first occurrence of `token` at or after `from` that starts outside string
 * literals (a token that is itself a literal, like '"mm"', matches at its opening quote).
 */
function findToken(expression: string, token: string, from = 0): number | undefined {
  let quote: string | null = null;
  for (let i = 0; i < expression.length; i++) {
    const c = expression[i];
    if (quote === null) {
      if (i >= from && expression.startsWith(token, i)) return i;
      if (c === '"' || c === "'") quote = c;
    } else if (c === '\\') {
      i++;
    } else if (c === quote) {
      quote = null;
    }
  }
  return undefined;
}
