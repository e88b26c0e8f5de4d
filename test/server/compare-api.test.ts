// GET /api/compare: any two revisions the caller may review, also a fork against its origin in
// another team; the comparison JSON as the client renders it.
import { expect } from 'chai';
import { boreDocument, createBoreWorksheet, expectError, openServiceApp, teamOfRoles, type ServiceHarness, type TeamOfRoles } from './worksheets-support';

describe('compare API', function () {
  this.timeout(180_000);
  let h: ServiceHarness;
  let t: TeamOfRoles;

  before(async () => {
    h = await openServiceApp();
    t = await teamOfRoles(h, 'Compare Suite');
  });
  after(() => h?.close());

  it('compares two revisions of a worksheet: the changed level, the wider bound, the flipped decision', async () => {
    const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    // A much stricter requirement flips the decision of the target test.
    const next = await t.clients.editor
      .post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: revision.id, document: boreDocument({ levels: [0.99], sigma0: 0.25 }) })
      .expect(201);
    const res = await t.clients.reviewer.get(`/api/compare?from=${revision.id}&to=${next.body.revision.id}`).expect(200);
    const { comparison, from, to } = res.body;
    expect(from.id).to.equal(revision.id);
    expect(to.id).to.equal(next.body.revision.id);
    expect(comparison.identical).to.equal(false);
    const sigma = comparison.steps.find((s: { stepId: string }) => s.stepId === 'sigma');
    expect(sigma).to.deep.include({ change: 'changed', fromIndex: 2, toIndex: 2 });
    expect(sigma.params).to.deep.equal([{ path: 'params.levels.0', from: 0.95, to: 0.99 }]);
    const target = comparison.steps.find((s: { stepId: string }) => s.stepId === 'target');
    expect(target.params).to.deep.equal([{ path: 'params.sigma0', from: 0.5, to: 0.25 }]);
    // The upper bound at 99 % is above the one at 95 % (same data, higher confidence).
    const bounds = comparison.results.filter(
      (r: { stepId: string; path: string; from: number | null; to: number | null }) => r.stepId === 'sigma' && /sdUpper$/.test(r.path) && r.from !== null && r.to !== null,
    );
    expect(bounds.map((b: { path: string }) => b.path)).to.deep.equal(['values.chisq.sdUpper', 'values.bonett.sdUpper']);
    // Rows of the interval table at 95 % are gone and rows at 99 % are new: one side is null.
    const rows = comparison.results.filter((r: { path: string }) => r.path.startsWith('tables.chi-square.') && r.path.endsWith('.sdUpper'));
    expect(rows.map((r: { from: number | null; to: number | null }) => [r.from === null, r.to === null])).to.deep.equal([
      [false, true],
      [true, false],
    ]);
    // Values "not available" on both sides are not reported as changes.
    expect(comparison.results.filter((r: { from: unknown; to: unknown }) => r.from === null && r.to === null)).to.deep.equal([]);
    for (const b of bounds) {
      expect(b.to).to.be.greaterThan(b.from);
      expect(b.relativeChange).to.be.closeTo((b.to - b.from) / Math.abs(b.from), 1e-12);
    }
    const flipped = comparison.conclusions.filter((c: { flipped: boolean }) => c.flipped);
    expect(flipped.map((c: { stepId: string; id: string; from: boolean; to: boolean }) => [c.stepId, c.id, c.from, c.to])).to.deep.include(['target', 'rejectH0', true, false]);
    expect(comparison.summary.conclusionsFlipped).to.equal(flipped.length);
    // Identical revisions compare as identical.
    const same = await t.clients.reviewer.get(`/api/compare?from=${revision.id}&to=${revision.id}`).expect(200);
    expect(same.body.comparison).to.include({ identical: true });
    expect(same.body.comparison.steps).to.deep.equal([]);
  });

  it('compares a fork in another team with its origin, for callers who may review both', async () => {
    const { revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const sandbox = await t.clients.reviewer.post('/api/teams', { name: 'Reviewer sandbox' }).expect(201);
    await t.clients.reviewer.post(`/api/teams/${sandbox.body.team.id}/members`, { email: t.users.viewer.email, role: 'viewer' }).expect(201);
    const fork = await t.clients.reviewer
      .post(`/api/revisions/${revision.id}/fork`, { teamId: sandbox.body.team.id, document: boreDocument({ levels: [0.9] }) })
      .expect(201);
    const res = await t.clients.reviewer.get(`/api/compare?from=${revision.id}&to=${fork.body.head.id}`).expect(200);
    expect(res.body.comparison.steps.map((s: { stepId: string }) => s.stepId)).to.deep.equal(['sigma']);
    // The viewer may read both but not compare; the editor is not in the sandbox team.
    expectError((await t.clients.viewer.get(`/api/compare?from=${revision.id}&to=${fork.body.head.id}`).expect(403)).body, 'forbidden');
    expectError((await t.clients.editor.get(`/api/compare?from=${revision.id}&to=${fork.body.head.id}`).expect(404)).body, 'not_found');
    await t.clients.outsider.get(`/api/compare?from=${revision.id}&to=${fork.body.head.id}`).expect(404);
    const bad = await t.clients.reviewer.get(`/api/compare?from=${revision.id}`).expect(400);
    expect(bad.body.error.details[0].field).to.equal('to');
  });
});
