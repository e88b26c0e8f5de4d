// Reviews: request a review from a team reviewer; the reviewer approves or requests changes on
// one revision with a comment; the verdict names the content hash and holds for that revision only.
import { expect } from 'chai';
import { boreDocument, createBoreWorksheet, expectError, openServiceApp, teamOfRoles, type ServiceHarness, type TeamOfRoles } from './worksheets-support';
import { reviewEvents, type ReviewRequestedEvent, type ReviewVerdictEvent } from '../../server/reviews/events';

describe('reviews API', function () {
  this.timeout(180_000);
  let h: ServiceHarness;
  let t: TeamOfRoles;

  before(async () => {
    h = await openServiceApp();
    t = await teamOfRoles(h, 'Review Suite');
  });
  after(() => h?.close());

  it('requests a review, shows it in the reviewer’s inbox, and answers it with a verdict', async () => {
    const requested: ReviewRequestedEvent[] = [];
    const verdicts: ReviewVerdictEvent[] = [];
    const onRequested = (e: ReviewRequestedEvent) => requested.push(e);
    const onVerdict = (e: ReviewVerdictEvent) => verdicts.push(e);
    reviewEvents.on('requested', onRequested);
    reviewEvents.on('verdict', onVerdict);
    try {
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const req = await t.clients.editor
        .post(`/api/revisions/${revision.id}/review-requests`, { reviewerId: t.users.reviewer.id, message: 'Please check the upper bound.' })
        .expect(201);
      expect(req.body.request).to.include({ revisionId: revision.id, worksheetId, revisionNumber: 2, status: 'open', verdictId: null, message: 'Please check the upper bound.' });
      expect(req.body.request.reviewer).to.deep.equal({ id: t.users.reviewer.id, name: t.users.reviewer.name });
      expect(requested.map((e) => e.reviewerId)).to.deep.equal([t.users.reviewer.id]);

      const inbox = await t.clients.reviewer.get('/api/review-requests').expect(200);
      expect(inbox.body.items.map((r: { id: string }) => r.id)).to.include(req.body.request.id);
      const othersInbox = await t.clients.viewer.get('/api/review-requests').expect(200);
      expect(othersInbox.body.total).to.equal(0);

      const verdict = await t.clients.reviewer
        .post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved', comment: 'Upper bound below 0.5 um; normality not rejected.', contentHash: revision.contentHash })
        .expect(201);
      expect(verdict.body.review).to.include({ revisionId: revision.id, verdict: 'approved', contentHash: revision.contentHash });
      expect(verdicts[0]).to.include({ reviewId: verdict.body.review.id, verdict: 'approved' });
      expect(verdicts[0].notify).to.include(t.users.editor.id);

      const after = await t.clients.reviewer.get('/api/review-requests?status=answered').expect(200);
      const answered = after.body.items.find((r: { id: string }) => r.id === req.body.request.id);
      expect(answered).to.include({ status: 'answered', verdictId: verdict.body.review.id });
      const open = await t.clients.reviewer.get('/api/review-requests').expect(200);
      expect(open.body.items.map((r: { id: string }) => r.id)).to.not.include(req.body.request.id);

      const reviews = await t.clients.viewer.get(`/api/revisions/${revision.id}/reviews`).expect(200);
      expect(reviews.body.reviews.map((r: { id: string }) => r.id)).to.deep.equal([verdict.body.review.id]);
      expect(reviews.body.requests[0].status).to.equal('answered');
      const ws = await t.clients.viewer.get(`/api/worksheets/${worksheetId}`).expect(200);
      expect(ws.body.worksheet.review).to.include({ verdict: 'approved' });
      expect(ws.body.head.reviews).to.have.length(1);
    } finally {
      reviewEvents.off('requested', onRequested);
      reviewEvents.off('verdict', onVerdict);
    }
  });

  it('holds a verdict for that revision only: a new revision starts unreviewed', async () => {
    const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    await t.clients.reviewer.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved', comment: '' }).expect(201);
    const next = await t.clients.editor
      .post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: revision.id, document: boreDocument({ levels: [0.99] }) })
      .expect(201);
    expect(next.body.revision.reviews).to.deep.equal([]);
    expect(next.body.worksheet.review).to.equal(null);
    const old = await t.clients.viewer.get(`/api/revisions/${revision.id}`).expect(200);
    expect(old.body.revision.reviews.map((r: { verdict: string }) => r.verdict)).to.deep.equal(['approved']);
  });

  it('asks for a comment when changes are requested, and keeps every verdict (the latest counts)', async () => {
    const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const bare = await t.clients.reviewer.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'changes_requested', comment: '  ' }).expect(400);
    expectError(bare.body, 'validation');
    expect(bare.body.error.details[0].field).to.equal('comment');
    await t.clients.reviewer.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'changes_requested', comment: 'Add a normality check.' }).expect(201);
    await t.clients.reviewer.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved', comment: 'Fine after discussion.' }).expect(201);
    const reviews = await t.clients.viewer.get(`/api/revisions/${revision.id}/reviews`).expect(200);
    expect(reviews.body.reviews.map((r: { verdict: string }) => r.verdict)).to.deep.equal(['changes_requested', 'approved']);
    const ws = await t.clients.viewer.get(`/api/worksheets/${worksheetId}`).expect(200);
    expect(ws.body.worksheet.review.verdict).to.equal('approved');
  });

  it('refuses a verdict on another content hash, by the author, or by a role below reviewer', async () => {
    const { revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const stale = await t.clients.reviewer.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved', contentHash: 'a'.repeat(64) }).expect(409);
    expectError(stale.body, 'hash_mismatch');
    const self = await t.clients.editor.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved' }).expect(422);
    expectError(self.body, 'self_review');
    await t.clients.viewer.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved' }).expect(403);
    await t.clients.outsider.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved' }).expect(404);
    const bad = await t.clients.reviewer.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'fine' }).expect(400);
    expect(bad.body.error.details[0].field).to.equal('verdict');
    // Owners review too (owner includes the reviewer's rights).
    await t.clients.owner.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved' }).expect(201);
  });

  it('only asks team members who may review, and not the author', async () => {
    const { revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const url = `/api/revisions/${revision.id}/review-requests`;
    expectError((await t.clients.editor.post(url, { reviewerId: t.users.viewer.id }).expect(422)).body, 'bad_reviewer');
    expectError((await t.clients.editor.post(url, { reviewerId: t.users.outsider.id }).expect(422)).body, 'bad_reviewer');
    expectError((await t.clients.owner.post(url, { reviewerId: t.users.editor.id }).expect(422)).body, 'bad_reviewer');
    await t.clients.reviewer.post(url, { reviewerId: t.users.owner.id }).expect(403);
    await t.clients.owner.post(url, { reviewerId: t.users.reviewer.id }).expect(201);
    const bad = await t.clients.owner.post(url, { reviewerId: 'nobody' }).expect(400);
    expect(bad.body.error.details[0].field).to.equal('reviewerId');
  });
});
