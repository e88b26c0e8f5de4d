/**
 * Crash safety: a burst of saves of 20-step worksheets from several clients at once goes to a real
 * server process (test/support/server.ts), which is killed with SIGKILL in the middle of it — some
 * saves evaluating in the worker pool, some inside their transaction, some answered. A new process
 * on the same database must then show every acknowledged (201) revision, complete: the document
 * and results it serves hash to the acknowledged content and results hashes, recomputed by the
 * client; and the tables hold no partial rows (see expectConsistentStore). Saves that were in
 * flight are either stored completely or not at all; the clients then carry on, taking the new
 * head from a 409 head_moved where an unacknowledged save did commit. The session survives too.
 */
import { randomBytes } from 'node:crypto';
import { expect } from 'chai';
import { demoOwner, SessionClient } from '../../bench/support/session-client';
import { twentyStepDocument } from '../../bench/support/documents';
import { startTestServer, type TestServer } from '../support/server';
import { expectConsistentStore, hashesOfAnswer, storedRevisions } from './support';

interface Acknowledged {
  worksheetId: string;
  id: string;
  number: number;
  contentHash: string;
  resultsHash: string;
}

const WORKSHEETS = 5;
/** Kill once this many saves have been acknowledged (the other loops are mid-save then). */
const KILL_AFTER = 12;

describe('reliability: SIGKILL in the middle of a burst of saves', function () {
  this.timeout(240_000);
  const secret = randomBytes(24).toString('base64url');
  let first: TestServer | undefined;
  let second: TestServer | undefined;

  after(async () => {
    await second?.stop();
    await first?.stop();
  });

  it('keeps every acknowledged revision complete, leaves no partial rows, and carries on after a restart', async () => {
    first = await startTestServer({ env: { SESSION_SECRET: secret, EVAL_THREADS: '2' } });
    const owner = new SessionClient(first.url);
    await owner.signIn(demoOwner.email, demoOwner.password);
    const teamId = (await owner.get('/api/teams')).body.teams[0].id as string;

    const sheets: { id: string; base: string }[] = [];
    for (let k = 0; k < WORKSHEETS; k++) {
      const created = SessionClient.expect(await owner.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: `Burst sheet ${k}` }), 201, 'create');
      sheets.push({ id: created.body.worksheet.id, base: created.body.head.id });
    }

    const acknowledged: Acknowledged[] = [];
    const unexpected: string[] = [];
    let connectionErrors = 0;
    let killing: Promise<void> | undefined;
    const server = first;
    await Promise.all(
      sheets.map(async (sheet, k) => {
        // Bounded: at most 100 saves per worksheet, and the loop ends at the first cut connection.
        for (let i = 0; i < 100 && !killing; i++) {
          const document = twentyStepDocument(k * 1000 + i, `Burst sheet ${k}`);
          let res;
          try {
            res = await owner.post(`/api/worksheets/${sheet.id}/revisions`, { baseRevisionId: sheet.base, document, message: `burst ${k}.${i}` });
          } catch {
            connectionErrors += 1;
            return;
          }
          if (res.status !== 201) {
            unexpected.push(`${res.status} ${res.text.slice(0, 200)}`);
            return;
          }
          const r = res.body.revision;
          acknowledged.push({ worksheetId: sheet.id, id: r.id, number: r.number, contentHash: r.contentHash, resultsHash: r.resultsHash });
          sheet.base = r.id;
          if (acknowledged.length >= KILL_AFTER && !killing) killing = server.kill('SIGKILL');
        }
      }),
    );
    await killing;
    expect(unexpected, 'answers other than 201 before the kill').to.deep.equal([]);
    expect(acknowledged.length).to.be.at.least(KILL_AFTER);
    expect(connectionErrors, 'saves cut by the kill').to.be.greaterThan(0);

    // The same database, a new process; the session cookie of the dead one still works.
    second = await startTestServer({ databaseUrl: first.databaseUrl, env: { SESSION_SECRET: secret, EVAL_THREADS: '2' } });
    const again = owner.withSessionOn(second.url);
    const session = await again.get('/api/auth/session');
    expect(session.body.user?.email).to.equal(demoOwner.email);
    again.token = session.body.csrfToken;

    for (const ack of acknowledged) {
      const res = SessionClient.expect(await again.get(`/api/revisions/${ack.id}`), 200, `acknowledged revision ${ack.id}`);
      const revision = res.body.revision;
      expect(revision.number).to.equal(ack.number);
      expect(revision.contentHash).to.equal(ack.contentHash);
      expect(revision.resultsHash).to.equal(ack.resultsHash);
      const recomputed = hashesOfAnswer(revision);
      expect(recomputed.contentHash, `content of ${ack.id}`).to.equal(ack.contentHash);
      expect(recomputed.resultsHash, `results of ${ack.id}`).to.equal(ack.resultsHash);
    }
    const store = await expectConsistentStore(first.databaseUrl);
    const rows = await storedRevisions(first.databaseUrl);
    const stored = new Set(rows.map((r) => r.id));
    for (const ack of acknowledged) expect(stored.has(ack.id), `row of ${ack.id}`).to.equal(true);
    // First revisions of the worksheets, the acknowledged saves, and at most one in-flight save per loop.
    expect(store.revisions).to.be.within(WORKSHEETS + acknowledged.length, WORKSHEETS + acknowledged.length + WORKSHEETS);

    // Carry on from what each client last saw.
    for (const [k, sheet] of sheets.entries()) {
      const document = twentyStepDocument(90_000 + k, `Burst sheet ${k}`);
      let res = await again.post(`/api/worksheets/${sheet.id}/revisions`, { baseRevisionId: sheet.base, document, message: 'after the restart' });
      if (res.status === 409) {
        // An unacknowledged save was committed before the kill: it is the head now, complete.
        expect(res.body.error.code).to.equal('head_moved');
        const head = res.body.error.details.head;
        expect(stored.has(head.id)).to.equal(true);
        res = await again.post(`/api/worksheets/${sheet.id}/revisions`, { baseRevisionId: head.id, document, message: 'after the restart' });
      }
      SessionClient.expect(res, 201, `save after the restart on sheet ${k}`);
    }
    await expectConsistentStore(first.databaseUrl);
  });
});
