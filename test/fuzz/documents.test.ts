/**
 * Fuzzing the draft-evaluation and save routes with worksheet documents from fast-check
 * (test/fuzz/generators.ts: derived from the format's JSON Schema, and mutations of the examples
 * and of a 20-step worksheet), a few raw bodies that are not documents at all, and documents of
 * hostile derived-column expressions. Each document goes to POST …/evaluate and then POST
 * …/revisions (four worksheets, one per lane, each save based on its lane's head).
 *
 * Every answer is either accepted — with hashes that are the SHA-256 of the canonical document and
 * results, one result per step, every step error with a message — or a 4xx with a known code and
 * a message that names the problem (fields for a validation failure). Never a 5xx. A derived
 * column computed without error used only the allowed functions (ALLOWED_FUNCTIONS of the engine).
 *
 * Count and seed: SPREADPROOF_FUZZ_DOCUMENTS (npm test: 250; npm run fuzz: 10,000) and
 * SPREADPROOF_FUZZ_SEED; a failure lists the index of each offending document.
 */
import { expect } from 'chai';
import fc from 'fast-check';
import { ALLOWED_CONSTANTS, ALLOWED_FUNCTIONS } from '@shared/engine/derived';
import { boreDocument, openServiceApp, teamOfRoles, type ServiceHarness } from '../server/worksheets-support';
import type { Client } from '../server/support';
import { checkAccepted, checkRefusal, documentRuns, fuzzSeed, inLanes } from './checks';
import { anyDocument, columnPool, expression } from './generators';

const evaluateCodes = ['validation', 'bad_json', 'payload_too_large', 'too_many_steps', 'unknown_dataset', 'evaluation_failed', 'evaluation_timeout', 'evaluation_memory', 'bad_request'];
const saveCodes = [...evaluateCodes, 'bad_base'];
const LANES = 4;

/** Bodies that are not a `{ document }` at all, sent as raw text. */
const rawBodies = ['', 'null', '[]', '"document"', '{', '{"document": ', '{"document": null}', '{"document": []}', '{"document": "x"}', '{"document": {}}', '{"baseRevisionId": 5}', 'document=1', '\u0000\u0001', '{"document": {"format": "spreadproof.worksheet", "version": 1, "title": "x", "steps": {}}}'];

/** Names a successful derived expression may call: the engine's allow-list, the constants, and the columns. */
function calledNames(source: string): string[] {
  const withoutStrings = source.replace(/"(?:[^"\\]|\\.)*"|'(?:[^'\\]|\\.)*'/g, '""');
  return [...withoutStrings.matchAll(/([A-Za-z_$][A-Za-z0-9_$]*)\s*\(/g)].map((m) => m[1]);
}

describe('fuzz: worksheet documents against the draft-evaluation and save routes', function () {
  this.timeout(Math.max(120_000, documentRuns * 600));
  let harness: ServiceHarness;
  let editor: Client;
  const heads: { worksheetId: string; head: string }[] = [];

  before(async () => {
    harness = await openServiceApp({}, { maxThreads: 2 });
    const team = await teamOfRoles(harness, 'Fuzz Room');
    editor = team.clients.editor;
    for (let lane = 0; lane < LANES; lane++) {
      const created = await editor.post(`/api/teams/${team.teamId}/worksheets`, { source: 'blank', title: `Fuzz lane ${lane}` }).expect(201);
      heads.push({ worksheetId: created.body.worksheet.id, head: created.body.head.id });
    }
  });
  after(() => harness?.close());

  async function send(path: string, body: object | string) {
    const request = editor.agent.post(path).set('X-CSRF-Token', editor.token);
    return typeof body === 'string' ? request.set('Content-Type', 'application/json').send(body) : request.send(body);
  }

  it(`answers ${documentRuns} generated and mutated documents without a 5xx, every refusal a 4xx naming the problem`, async () => {
    const documents = fc.sample(anyDocument, { numRuns: documentRuns, seed: fuzzSeed });
    const failures: string[] = [];
    const tally: Record<string, number> = {};
    const count = (k: string) => (tally[k] = (tally[k] ?? 0) + 1);

    await inLanes(documents, LANES, async (document, lane, index) => {
      const lanePath = `/api/worksheets/${heads[lane].worksheetId}`;
      // One document in 25 is replaced by a raw body that is not a document at all.
      const raw = index % 25 === 7 ? rawBodies[(index / 25) % rawBodies.length | 0] : null;
      const evaluated = await send(`${lanePath}/evaluate`, raw ?? { document });
      count(`evaluate ${evaluated.status}${evaluated.status >= 400 ? ` ${evaluated.body?.error?.code}` : ''}`);
      const problems = evaluated.status === 200 ? checkAccepted(document, evaluated.body) : checkRefusal(evaluated.status, evaluated.body, evaluateCodes);
      if (evaluated.status !== 200 && evaluated.status < 400) problems.push(`status ${evaluated.status}`);
      if (evaluated.status === 200) {
        // Derived columns computed without error call only allowed names.
        const steps = (document as { steps: { kind: string; params: { expression?: string } }[] }).steps;
        evaluated.body.results.steps.forEach((r: { error: unknown }, i: number) => {
          if (steps[i]?.kind !== 'derived-column' || r.error) return;
          const allowed = new Set<string>([...ALLOWED_FUNCTIONS, ...ALLOWED_CONSTANTS, ...columnPool]);
          for (const name of calledNames(String(steps[i].params.expression))) {
            if (!allowed.has(name)) problems.push(`derived step ${i} computed with ${name}`);
          }
        });
      }

      const saved = await send(`${lanePath}/revisions`, raw ?? { baseRevisionId: heads[lane].head, document, message: `fuzz ${index}` });
      count(`save ${saved.status}${saved.status >= 400 ? ` ${saved.body?.error?.code}` : ''}`);
      if (saved.status === 201) {
        problems.push(...checkAccepted(document, saved.body.revision));
        heads[lane].head = saved.body.revision.id;
      } else {
        problems.push(...checkRefusal(saved.status, saved.body, saveCodes));
        if (saved.status < 400) problems.push(`save status ${saved.status}`);
        // The same document gets the same verdict from both routes (the save adds only its base check).
        if (!raw && evaluated.status === 200 && saved.status !== 201) problems.push(`evaluated but not saved: ${saved.status} ${saved.body?.error?.code}`);
      }
      if (problems.length > 0) failures.push(`#${index}: ${problems.join('; ')} — ${JSON.stringify(raw ?? document).slice(0, 300)}`);
    });

    const accepted = (tally['evaluate 200'] ?? 0) + (tally['save 201'] ?? 0);
    // The run means something only if both acceptance and refusal were exercised.
    expect(accepted, JSON.stringify(tally)).to.be.greaterThan(documentRuns * 0.2);
    expect(Object.keys(tally).filter((k) => k.includes(' 400 ')).length, JSON.stringify(tally)).to.be.greaterThan(0);
    expect(failures.slice(0, 20), `${failures.length} of ${documentRuns} documents (seed ${fuzzSeed}); tally ${JSON.stringify(tally)}`).to.deep.equal([]);
  });

  it('evaluates hostile derived-column expressions only with the allowed functions, and names the refusal', async () => {
    const expressions = fc.sample(expression, { numRuns: Math.max(50, Math.round(documentRuns / 4)), seed: fuzzSeed + 1 });
    const failures: string[] = [];
    let refused = 0;
    const allowed = new Set<string>([...ALLOWED_FUNCTIONS, ...ALLOWED_CONSTANTS, 'x', 'y']);
    await inLanes(expressions, LANES, async (source, lane, index) => {
      const document = {
        format: 'spreadproof.worksheet',
        version: 1,
        title: 'Expression fuzz',
        steps: [
          { id: 'data', kind: 'data', params: { origin: 'inline', columns: [{ name: 'x', type: 'number', values: [1, 2, 3, 4, 5] }, { name: 'y', type: 'number', values: [2, 4, 6, 8, 10] }] } },
          { id: 'derived', kind: 'derived-column', params: { step: 'data', name: 'z', expression: source } },
        ],
      };
      const res = await send(`/api/worksheets/${heads[lane].worksheetId}/evaluate`, { document });
      if (res.status !== 200) {
        failures.push(`#${index} ${JSON.stringify(source)}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
        return;
      }
      const step = res.body.results.steps[1];
      if (step.error) {
        refused += 1;
        if (typeof step.error.message !== 'string' || step.error.message.length < 10) failures.push(`#${index} ${JSON.stringify(source)}: refusal without a message`);
        return;
      }
      for (const name of calledNames(source)) if (!allowed.has(name)) failures.push(`#${index} ${JSON.stringify(source)} computed with ${name}`);
    });
    expect(refused).to.be.greaterThan(0);
    expect(failures.slice(0, 20), `${failures.length} failures`).to.deep.equal([]);
  });

  it('stops a costly evaluation at the time limit with a clear message, and keeps serving', async () => {
    const limited = await openServiceApp({}, { maxThreads: 1, timeLimitMs: 2000 });
    try {
      const team = await teamOfRoles(limited, 'Slow Room');
      const client = team.clients.editor;
      const created = await client.post(`/api/teams/${team.teamId}/worksheets`, { source: 'blank', title: 'Costly' }).expect(201);
      // 100,000 readings and 40 derived columns of a costly expression over all of them (tens of
      // seconds of work), then normality checks that sort them again.
      const values = Array.from({ length: 100_000 }, (_, i) => Math.round(Math.sin(i) * 1e4) / 1e3);
      const heavy = Array.from({ length: 60 }, (_, i) =>
        i < 40
          ? { id: `d${i}`, kind: 'derived-column', params: { step: 'data', name: `c${i}`, expression: 'hypot(sin(x), cos(x), tanh(x), exp(x / 1000), log(abs(x) + 1), sqrt(abs(x)), x ^ 2 / 3)' } }
          : { id: `n${i}`, kind: 'normality-check', params: { source: { step: 'data', column: 'x' } } },
      );
      const document = { format: 'spreadproof.worksheet', version: 1, title: 'Costly', steps: [{ id: 'data', kind: 'data', params: { origin: 'inline', columns: [{ name: 'x', type: 'number', values }] } }, ...heavy] };
      const started = Date.now();
      const res = await client.post(`/api/worksheets/${created.body.worksheet.id}/evaluate`, { document });
      expect(res.status, JSON.stringify(res.body).slice(0, 300)).to.equal(422);
      expect(res.body.error.code).to.equal('evaluation_timeout');
      expect(res.body.error.message).to.match(/longer than the limit of 2 s/);
      expect(Date.now() - started).to.be.lessThan(30_000);
      // The pool replaced the stopped worker: a small document evaluates right after.
      const small = await client.post(`/api/worksheets/${created.body.worksheet.id}/evaluate`, { document: boreDocument() });
      expect(small.status).to.equal(200);
    } finally {
      await limited.close();
    }
  });
});
