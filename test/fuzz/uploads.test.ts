/**
 * Fuzzing the upload route with CSV/TSV text in many dialects and XLSX workbooks, mutated at the
 * byte level (flips, cuts, junk, NUL and invalid UTF-8, broken quotes, damaged ZIP structure) and
 * a set of special files (empty, old .xls, PDF, UTF-16, a lone quote run). Every answer is a
 * stored dataset (201, or 200 for bytes already stored) whose id is the SHA-256 of the bytes sent
 * and whose columns and rows are described, or a 4xx with a known code and a message that names
 * the problem — with the line (and column) in the message when the answer gives one. Never a 5xx.
 *
 * Count and seed: SPREADPROOF_FUZZ_UPLOADS (npm test: 150; npm run fuzz: 2,000), SPREADPROOF_FUZZ_SEED.
 */
import { createHash } from 'node:crypto';
import { expect } from 'chai';
import fc from 'fast-check';
import { openServiceApp, teamOfRoles, type ServiceHarness } from '../server/worksheets-support';
import type { Client } from '../server/support';
import { checkRefusal, fuzzSeed, inLanes, uploadRuns } from './checks';
import { uploadFile } from './generators';

const uploadCodes = ['no_file', 'bad_upload', 'file_too_large', 'unsupported_file', 'empty_file', 'too_many_rows', 'bad_file', 'validation'];

describe('fuzz: mutated CSV and XLSX uploads', function () {
  this.timeout(Math.max(120_000, uploadRuns * 500));
  let harness: ServiceHarness;
  let editor: Client;
  let teamId: string;

  before(async () => {
    harness = await openServiceApp({}, { maxThreads: 2 });
    const team = await teamOfRoles(harness, 'Upload Fuzz');
    editor = team.clients.editor;
    teamId = team.teamId;
  });
  after(() => harness?.close());

  it(`answers ${uploadRuns} generated and mutated files with a dataset or a 4xx that names the problem`, async () => {
    const files = fc.sample(uploadFile, { numRuns: uploadRuns, seed: fuzzSeed });
    const failures: string[] = [];
    const tally: Record<string, number> = {};
    await inLanes(files, 3, async (file, _lane, index) => {
      let request = editor.agent.post(`/api/teams/${teamId}/datasets`).set('X-CSRF-Token', editor.token);
      for (const [name, value] of Object.entries(file.fields)) request = request.field(name, value);
      const res = await request.attach('file', file.bytes, file.name);
      const label = `${res.status}${res.status >= 400 ? ` ${res.body?.error?.code}` : ''}`;
      tally[label] = (tally[label] ?? 0) + 1;
      const problems: string[] = [];
      if (res.status === 200 || res.status === 201) {
        const dataset = res.body.dataset;
        const digest = createHash('sha256').update(file.bytes).digest('hex');
        if (dataset?.id !== digest) problems.push(`id ${dataset?.id} is not the SHA-256 of the bytes`);
        if (!(dataset?.rowCount >= 1)) problems.push(`stored with ${dataset?.rowCount} rows`);
        if (!Array.isArray(dataset?.columns) || dataset.columns.length === 0) problems.push('stored without columns');
        for (const s of dataset?.skipped ?? []) if (typeof s.reason !== 'string' || !(s.line >= 1)) problems.push(`skipped row without line or reason: ${JSON.stringify(s)}`);
        if ((res.status === 200) !== (res.body.deduplicated === true)) problems.push('deduplicated flag does not match the status');
      } else {
        problems.push(...checkRefusal(res.status, res.body, uploadCodes));
        if (res.status < 400) problems.push(`status ${res.status}`);
        const details = res.body?.error?.details as { line?: number; column?: number } | undefined;
        if (details?.line !== undefined && !String(res.body.error.message).includes(String(details.line))) {
          problems.push(`details name line ${details.line} but the message does not: ${res.body.error.message}`);
        }
      }
      if (problems.length > 0) failures.push(`#${index} ${file.name} (${file.bytes.length} bytes): ${problems.join('; ')} — ${JSON.stringify(file.bytes.subarray(0, 80).toString('latin1'))}`);
    });
    const stored = (tally['201'] ?? 0) + (tally['200'] ?? 0);
    const refused = Object.entries(tally).filter(([k]) => k.startsWith('4')).reduce((n, [, v]) => n + v, 0);
    expect(stored, JSON.stringify(tally)).to.be.greaterThan(uploadRuns * 0.1);
    expect(refused, JSON.stringify(tally)).to.be.greaterThan(uploadRuns * 0.1);
    expect(failures.slice(0, 20), `${failures.length} of ${uploadRuns} uploads (seed ${fuzzSeed}); tally ${JSON.stringify(tally)}`).to.deep.equal([]);
  });
});
