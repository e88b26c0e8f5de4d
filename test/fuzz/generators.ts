/**
 * fast-check arbitraries for the fuzz suites:
 *
 * - `schemaDocument`: worksheet documents derived from the format's own JSON Schema
 *   (shared/format/worksheet.schema.json, generated from the zod schema): every `oneOf`/`anyOf`,
 *   `enum`, `const`, required and optional property, array bound and pattern is followed, with
 *   values biased towards the ones that matter (step ids and column names from a small pool, so
 *   that steps do refer to each other; confidence levels, edge numbers; Markdown and math.js
 *   fragments, some hostile). Most come out schema-valid and reach the engine.
 * - `mutatedDocument`: the committed examples, a 20-step worksheet and schema documents, then 1–4
 *   mutations anywhere in the JSON tree (delete, replace by any JSON value or an edge value,
 *   duplicate, reorder, retype, change a step's kind, unknown keys, hundreds of steps).
 * - `uploadFile`: CSV/TSV text in many dialects and XLSX workbooks, then byte- and structure-level
 *   mutations (flips, cuts, junk, NUL and invalid UTF-8, broken quotes, ZIP damage).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import { exampleDocuments, twentyStepDocument } from '../../bench/support/documents';
import { projectRoot } from '../../server/paths';
import { xlsx } from '../server/uploads-xlsx';

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };
type SchemaNode = Record<string, any>;

const schema = JSON.parse(readFileSync(path.join(projectRoot, 'shared', 'format', 'worksheet.schema.json'), 'utf8')) as SchemaNode;

export const stepIdPool = ['data', 'readings', 'd2', 'summary', 'x', 'spread', 'bound', 'derived', 'n1', 'A'];
export const columnPool = ['x', 'y', 'reading', 'group', 'deviation', 'g', 'x_mm', 'Line'];

/** Markdown pieces, harmless and hostile (script, handlers, javascript: links, KaTeX with trust needs). */
export const markdownFragments = [
  '# Heading', '**bold**', '_em_', '`code`', '\n\n', '- item\n- item', '| a | b |\n|---|---|\n| 1 | 2 |', '> quote',
  '$\\sigma^2$', '$$\\chi^2_{0.975, n-1}$$', '$\\frac{(n-1)s^2}{\\chi^2}$', '$x$', '\\$5', '$',
  '<script>window.__spreadproofPwned = 1</script>',
  '<img src=x onerror="window.__spreadproofPwned = 1">',
  '[click](javascript:window.__spreadproofPwned=1)',
  '[data](data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==)',
  '<a href="jav&#x09;ascript:alert(1)">x</a>',
  '<iframe src="https://example.invalid"></iframe>',
  '<svg onload="window.__spreadproofPwned = 1"><circle r="1"/></svg>',
  '<math><mtext><table><mglyph><style><img src=x onerror=alert(1)></style></mglyph></table></mtext></math>',
  '<div style="background:url(javascript:alert(1))">styled</div>',
  '<form action="javascript:alert(1)"><button>go</button></form>',
  '<input autofocus onfocus="window.__spreadproofPwned = 1">',
  '![alt](javascript:alert(1))',
  '<details open ontoggle="window.__spreadproofPwned = 1">x</details>',
  '$\\href{javascript:alert(1)}{x}$',
  '$\\url{javascript:alert(1)}$',
  '$\\htmlClass{x}{y}\\htmlStyle{color:red}{z}\\htmlId{i}{j}\\htmlData{foo=bar}{k}$',
  '$\\includegraphics{https://example.invalid/a.png}$',
  '$\\def\\a{\\a\\a}\\a$',
  '$\\def\\b#1{#1#1}\\b{\\b{\\b{\\b{\\b{\\b{\\b{\\b{x}}}}}}}}$',
  '$\\rule{100000em}{100000em}$',
  '$\\color{red}{x}$',
  '<style>*{display:none}</style>',
  '<base href="https://example.invalid/">',
  '<meta http-equiv="refresh" content="0;url=https://example.invalid">',
  '\uE0001\uE001',
];

/** math.js expression pieces: columns, numbers, allowed functions, and everything that must be refused. */
export const expressionTokens = [
  'x', 'y', 'reading', 'x_mm', '1', '2.5', '1e308', '0', 'pi', 'e', 'tau', '(', ')', '+', '-', '*', '/', '^', '%', ',', ' ',
  'sqrt(', 'log(', 'log10(', 'abs(', 'exp(', 'round(', 'min(', 'max(', 'hypot(', 'mod(', 'convert(x, "mm", "um")', 'col("x")',
  '?', ':', '>', '<', '==', '!=', 'and', 'or', 'not ',
  'import(', 'evaluate(', 'parse(', 'compile(', 'createUnit(', 'simplify(', 'derivative(', 'chain(', 'typed(', 'config(',
  'constructor', '__proto__', 'prototype', '.', '["constructor"]', '[1, 2]', '{a: 1}', 'f(t) = t', 'x = 1', ';', '"text"',
  'unit(', '5 mm', 'Function(', 'this', 'process', 'require(', 'cos.constructor("return process")()', 'matrix(', 'range(', '1:3',
];

const edgeNumbers = [0, -0, 1, -1, 0.5, 0.95, 0.99, 0.05, 1.5, 2, 30, 1e-300, 5e-324, 1e300, 1.7976931348623157e308, -1e300, 0.999999999999, 1.0000000001, 200, 1e6];

/** The numbers a worksheet field usually holds, and the edge values it must survive. */
const number = fc.oneof(
  { weight: 4, arbitrary: fc.constantFrom(0.9, 0.95, 0.99, 0.05, 0.01, 0.5, 1, 2, 3, 5, 10, 25, 30, 1.5, 24.985, 25.015) },
  { weight: 2, arbitrary: fc.constantFrom(...edgeNumbers) },
  { weight: 2, arbitrary: fc.double({ noNaN: true, noDefaultInfinity: true }) },
  { weight: 1, arbitrary: fc.double() }, // NaN and ±Infinity are sent as null by JSON
);

const measurement = fc.oneof({ weight: 8, arbitrary: fc.double({ min: -50, max: 50, noNaN: true }) }, { weight: 1, arbitrary: number });

const markdown = fc
  .array(fc.oneof({ weight: 3, arbitrary: fc.constantFrom(...markdownFragments) }, { weight: 1, arbitrary: fc.string({ maxLength: 30 }) }), { maxLength: 8 })
  .map((parts) => parts.join(' '));

export const expression = fc.array(fc.constantFrom(...expressionTokens), { minLength: 1, maxLength: 10 }).map((parts) => parts.join(''));

function stringFor(property: string | undefined, node: SchemaNode): fc.Arbitrary<string> {
  const max = Math.min(node.maxLength ?? 40, 40);
  const min = node.minLength ?? 0;
  const plain = fc.string({ minLength: min, maxLength: Math.max(min, max) });
  switch (property) {
    case 'id':
    case 'step':
      return fc.oneof({ weight: 6, arbitrary: fc.constantFrom(...stepIdPool) }, { weight: 1, arbitrary: node.pattern ? fc.stringMatching(new RegExp(node.pattern)) : plain });
    case 'column':
    case 'groupBy':
    case 'name':
      return fc.oneof({ weight: 6, arbitrary: fc.constantFrom(...columnPool) }, { weight: 1, arbitrary: plain });
    case 'markdown':
      return markdown;
    case 'expression':
      return expression;
    case 'datasetId':
      return fc.oneof(fc.stringMatching(/^[0-9a-f]{64}$/), plain);
    case 'title':
      return fc.oneof(fc.constantFrom('Bore study', '<img src=x onerror=alert(1)>', '{{constructor.constructor("alert(1)")()}}', '"><script>alert(1)</script>'), plain);
    default:
      return node.pattern ? fc.stringMatching(new RegExp(node.pattern)) : plain;
  }
}

function resolve(node: SchemaNode): SchemaNode {
  if (node.$ref) return resolve(schema.$defs[String(node.$ref).replace('#/$defs/', '')]);
  return node;
}

/** An arbitrary for a JSON Schema node of the worksheet schema (the subset the zod export uses). */
function fromSchema(raw: SchemaNode, property?: string, depth = 0): fc.Arbitrary<Json> {
  const node = resolve(raw);
  if ('const' in node) return fc.constant(node.const as Json);
  if (node.enum) return fc.constantFrom(...(node.enum as Json[]));
  const alternatives = node.oneOf ?? node.anyOf;
  if (alternatives) return fc.oneof(...(alternatives as SchemaNode[]).map((alt) => fromSchema(alt, property, depth + 1)));
  switch (node.type) {
    case 'object': {
      const properties = (node.properties ?? {}) as Record<string, SchemaNode>;
      const record: Record<string, fc.Arbitrary<Json>> = {};
      for (const [name, child] of Object.entries(properties)) record[name] = fromSchema(child, name, depth + 1);
      return fc.record(record, { requiredKeys: (node.required ?? []) as string[] }) as fc.Arbitrary<Json>;
    }
    case 'array': {
      const items = node.items as SchemaNode;
      const minLength = node.minItems ?? 0;
      if (property === 'values') {
        const item = resolve(items);
        const kinds = JSON.stringify(item);
        const cell = kinds.includes('"number"')
          ? fc.oneof({ weight: 12, arbitrary: measurement }, { weight: 1, arbitrary: fc.constantFrom<Json>(null, '', 'n/a', '1,5', '2.0e-3') })
          : fc.oneof({ weight: 6, arbitrary: fc.constantFrom('A', 'B', 'C', 'Line 1', 'Line 2') }, { weight: 1, arbitrary: fc.constantFrom<Json>(null, '') });
        return fc.array(cell as fc.Arbitrary<Json>, { minLength, maxLength: 40 });
      }
      const maxLength = Math.max(minLength, Math.min(node.maxItems ?? 6, property === 'steps' ? 7 : 4));
      return fc.array(fromSchema(items, property, depth + 1), { minLength, maxLength });
    }
    case 'string':
      return stringFor(property, node);
    case 'integer':
      return fc.oneof(fc.integer({ min: -3, max: 60 }), fc.constantFrom(0, 1, 2, 5000, 2 ** 31, -(2 ** 31)));
    case 'number':
      return number as fc.Arbitrary<Json>;
    case 'boolean':
      return fc.boolean();
    default:
      return fc.jsonValue({ maxDepth: 2 }) as fc.Arbitrary<Json>;
  }
}

/** Documents straight from the JSON Schema. */
export const schemaDocument: fc.Arbitrary<Json> = fromSchema(schema);

// --- Mutations ---------------------------------------------------------------------------------

const edgeValues: Json[] = [
  null, '', 0, -1, 1e308, -1e308, 5e-324, true, false, [], {}, 'x'.repeat(300), '__proto__', JSON.parse('{"__proto__": {"polluted": 1}}') as Json,
  { constructor: { prototype: { polluted: 1 } } }, '0.95', '1e3', ' ', '\u0000', '\uD800', '<script>alert(1)</script>', [null], [[]], 1.5, 0.95, 2 ** 53 + 1,
];

type Mutation = { op: number; at: number; value: Json; extra: number };

const mutation: fc.Arbitrary<Mutation> = fc.record({
  op: fc.nat(9),
  at: fc.nat(),
  value: fc.oneof(fc.constantFrom(...edgeValues), fc.jsonValue({ maxDepth: 2 }) as fc.Arbitrary<Json>),
  extra: fc.nat(),
});

/** Every (container, key) in the tree, in a fixed order. */
function slots(root: Json): { parent: Json[] | Record<string, Json>; key: string | number }[] {
  const out: { parent: Json[] | Record<string, Json>; key: string | number }[] = [];
  const walk = (node: Json) => {
    if (Array.isArray(node)) node.forEach((child, i) => (out.push({ parent: node, key: i }), walk(child)));
    else if (node && typeof node === 'object') for (const k of Object.keys(node)) (out.push({ parent: node, key: k }), walk(node[k]));
  };
  walk(root);
  return out;
}

const stepKinds = ['data', 'derived-column', 'spread-summary', 'sigma-interval', 'target-test', 'two-sample-ratio', 'group-comparison', 'normality-check', 'sample-size-plan', 'capability', 'note', 'unknown-kind'];

function applyMutation(root: Json, m: Mutation): Json {
  const all = slots(root);
  if (all.length === 0) return m.value;
  const { parent, key } = all[m.at % all.length];
  const get = () => (parent as Record<string, Json>)[key as string];
  const set = (v: Json) => ((parent as Record<string, Json>)[key as string] = v);
  switch (m.op) {
    case 0: // delete
      if (Array.isArray(parent)) parent.splice(key as number, 1);
      else delete parent[key as string];
      break;
    case 1:
    case 2: // replace with a random or an edge value
      set(m.value);
      break;
    case 3: // duplicate (in an array) or copy a sibling's value
      if (Array.isArray(parent)) parent.splice(key as number, 0, structuredClone(get()));
      else set(structuredClone(Object.values(parent)[m.extra % Object.keys(parent).length] ?? null));
      break;
    case 4: // reverse or shuffle an array
      if (Array.isArray(get())) (get() as Json[]).reverse();
      else set(String(get()));
      break;
    case 5: // add an unknown key next to this one
      if (!Array.isArray(parent)) parent[`extra${m.extra % 5}`] = m.value;
      else parent.push(m.value);
      break;
    case 6: // change a step's kind, or a string to a number
      if (key === 'kind') set(stepKinds[m.extra % stepKinds.length]);
      else if (typeof get() === 'string') set(Number(get()) || m.extra);
      else if (typeof get() === 'number') set(String(get()));
      else set(m.value);
      break;
    case 7: // hundreds of steps (past the 200-step limit) or a long array
      if (Array.isArray(get())) {
        const list = get() as Json[];
        const copies = 190 + (m.extra % 40);
        if (list.length > 0) set(Array.from({ length: copies }, (_, i) => {
          const copy = structuredClone(list[i % list.length]);
          if (copy && typeof copy === 'object' && !Array.isArray(copy) && typeof copy.id === 'string') copy.id = `${copy.id}${i}`;
          return copy;
        }));
      }
      break;
    case 8: // wrap in an array or an object
      set(m.extra % 2 ? [get()] : { value: get() });
      break;
    default: // a long string
      set('y'.repeat(150 + (m.extra % 400)));
  }
  return root;
}

function mutate(base: Json, mutations: Mutation[]): Json {
  let doc = structuredClone(base);
  for (const m of mutations) doc = applyMutation(doc, m);
  return doc;
}

const bases: Json[] = [...Object.values(exampleDocuments()), twentyStepDocument(1), twentyStepDocument(2)] as unknown as Json[];

export const mutatedDocument: fc.Arbitrary<Json> = fc
  .tuple(fc.oneof({ weight: 3, arbitrary: fc.constantFrom(...bases) }, { weight: 1, arbitrary: schemaDocument }), fc.array(mutation, { minLength: 1, maxLength: 4 }))
  .map(([base, mutations]) => mutate(base, mutations));

/** What the fuzz sends: schema documents, mutated documents, and a few examples unchanged. */
export const anyDocument: fc.Arbitrary<Json> = fc.oneof(
  { weight: 5, arbitrary: schemaDocument },
  { weight: 5, arbitrary: mutatedDocument },
  { weight: 1, arbitrary: fc.constantFrom(...bases) },
);

// --- Uploads -------------------------------------------------------------------------------------

export interface UploadCase {
  name: string;
  bytes: Buffer;
  /** Optional form fields sent with the file (some nonsense on purpose). */
  fields: Record<string, string>;
}

const csvCell = fc.oneof(
  { weight: 6, arbitrary: fc.double({ min: -1000, max: 1000, noNaN: true }).map((v) => String(Math.round(v * 1000) / 1000)) },
  { weight: 2, arbitrary: fc.constantFrom('', 'NA', 'n/a', '-', 'Line 1', 'B', '1,5', '2.5e-3', '"quoted, cell"', '"a ""b"" c"', ' 3 ', '∞', '1e400') },
  { weight: 1, arbitrary: fc.string({ maxLength: 8 }) },
);

const csvText = fc
  .record({
    columns: fc.integer({ min: 1, max: 6 }),
    rows: fc.integer({ min: 0, max: 40 }),
    delimiter: fc.constantFrom(',', ';', '\t', '|', ' '),
    newline: fc.constantFrom('\n', '\r\n', '\r'),
    header: fc.boolean(),
    bom: fc.boolean(),
    decimalComma: fc.boolean(),
    seed: fc.array(csvCell, { minLength: 240, maxLength: 240 }),
  })
  .map((c) => {
    const lines: string[] = [];
    if (c.header) lines.push(Array.from({ length: c.columns }, (_, i) => columnPool[i % columnPool.length]).join(c.delimiter));
    for (let r = 0; r < c.rows; r++) {
      lines.push(
        Array.from({ length: c.columns }, (_, i) => {
          const cell = c.seed[(r * c.columns + i) % c.seed.length];
          return c.decimalComma && c.delimiter !== ',' ? cell.replace('.', ',') : cell;
        }).join(c.delimiter),
      );
    }
    return (c.bom ? '\uFEFF' : '') + lines.join(c.newline) + (c.rows % 2 ? c.newline : '');
  });

const xlsxCell = fc.oneof(
  { weight: 5, arbitrary: fc.double({ min: -1000, max: 1000, noNaN: true }) },
  { weight: 2, arbitrary: fc.constantFrom<string | number | null>(null, '', 'Line 1', 'B', 'NA', '<x>&amp;', ']]>') },
);
const workbook = fc
  .record({ columns: fc.integer({ min: 1, max: 4 }), rows: fc.array(fc.array(xlsxCell, { minLength: 4, maxLength: 4 }), { maxLength: 30 }), header: fc.boolean() })
  .map((w) => {
    const rows: (string | number | null)[][] = w.rows.map((r) => r.slice(0, w.columns));
    if (w.header) rows.unshift(columnPool.slice(0, w.columns));
    return xlsx(rows);
  });

const shafts = readFileSync(path.join(projectRoot, 'examples', 'supplier-shafts.csv'));

type ByteMutation = { op: number; at: number; length: number; byte: number };
const byteMutation: fc.Arbitrary<ByteMutation> = fc.record({ op: fc.nat(7), at: fc.nat(), length: fc.integer({ min: 1, max: 64 }), byte: fc.nat(255) });

function mutateBytes(input: Buffer, mutations: ByteMutation[]): Buffer {
  let bytes = Buffer.from(input);
  for (const m of mutations) {
    const at = bytes.length === 0 ? 0 : m.at % bytes.length;
    switch (m.op) {
      case 0: // flip bits
        if (bytes.length) bytes[at] ^= 1 << m.byte % 8;
        break;
      case 1: // cut the end
        bytes = bytes.subarray(0, at);
        break;
      case 2: // insert junk bytes
        bytes = Buffer.concat([bytes.subarray(0, at), Buffer.from(Array.from({ length: m.length }, (_, i) => (m.byte * 31 + i * 17) % 256)), bytes.subarray(at)]);
        break;
      case 3: // NUL and invalid UTF-8
        bytes = Buffer.concat([bytes.subarray(0, at), Buffer.from([0x00, 0xff, 0xfe, 0xc3, 0x28]), bytes.subarray(at)]);
        break;
      case 4: // an unbalanced quote
        bytes = Buffer.concat([bytes.subarray(0, at), Buffer.from('"'), bytes.subarray(at)]);
        break;
      case 5: // repeat a slice (duplicate rows, long lines)
        bytes = Buffer.concat([bytes.subarray(0, at), bytes.subarray(at, at + m.length * 8), bytes.subarray(at)]);
        break;
      case 6: // remove a slice
        bytes = Buffer.concat([bytes.subarray(0, at), bytes.subarray(at + m.length)]);
        break;
      default: // overwrite with one byte value
        bytes.fill(m.byte, at, Math.min(bytes.length, at + m.length));
    }
  }
  return bytes;
}

const specialFiles = fc.constantFrom(
  Buffer.alloc(0),
  Buffer.from('\n\n\n'),
  Buffer.from('only,a,header\n'),
  Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1, 0, 0, 0, 0]), // old .xls
  Buffer.from('PK\u0003\u0004 not really a zip'),
  Buffer.from('\uFEFF'),
  Buffer.from('\u00ff\u00fe'.split('').map((c) => c.charCodeAt(0)).concat([0x78, 0, 0x2c, 0, 0x31, 0])), // UTF-16LE
  Buffer.from('x\n' + '1\n'.repeat(5000)),
  Buffer.from('a,b\n' + '"'.repeat(2000)),
  Buffer.from('%PDF-1.7\n%âãÏÓ\n1 0 obj\n'),
  shafts,
);

export const uploadFile: fc.Arbitrary<UploadCase> = fc
  .record({
    kind: fc.constantFrom('csv', 'csv', 'csv', 'xlsx', 'xlsx', 'special'),
    csv: csvText,
    workbook,
    special: specialFiles,
    mutations: fc.array(byteMutation, { maxLength: 3 }),
    name: fc.constantFrom('data.csv', 'data.tsv', 'data.txt', 'book.xlsx', 'noext', '../../etc/passwd', 'weird name ✓.csv', 'a'.repeat(300) + '.csv'),
    fields: fc.dictionary(fc.constantFrom('delimiter', 'decimalComma', 'hasHeader', 'sheet'), fc.constantFrom(',', ';', '\t', '|', 'true', 'false', '2', 'Sheet1', 'x', '')),
  })
  .map((c) => {
    const base = c.kind === 'csv' ? Buffer.from(c.csv, 'utf8') : c.kind === 'xlsx' ? c.workbook : c.special;
    // Half of the files stay as generated, so both readable and damaged files are sent.
    const bytes = c.mutations.length > 1 ? mutateBytes(base, c.mutations) : base;
    const name = c.kind === 'xlsx' && !c.name.endsWith('.xlsx') ? 'book.xlsx' : c.name;
    return { name, bytes, fields: c.fields };
  });

/** A worksheet whose title, step titles, column name, unit and description are `title`, with one note step per entry of `notes`. */
export function hostileDocument(title: string, notes: string[]) {
  return {
    format: 'spreadproof.worksheet',
    version: 1,
    title,
    description: title,
    steps: [
      {
        id: 'data',
        kind: 'data',
        title,
        params: { origin: 'inline', columns: [{ name: title.slice(0, 200), type: 'number', unit: title.slice(0, 40), values: [2.1, 1.8, 2.4, 2.0, 1.7, 2.3] }] },
      },
      { id: 'spread', kind: 'spread-summary', title, params: { source: { step: 'data', column: title.slice(0, 200) } } },
      ...notes.map((markdown, i) => ({ id: `note${i}`, kind: 'note', title, params: { markdown } })),
    ],
  };
}
