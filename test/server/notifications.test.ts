/**
 * Notifications end to end: review requested, review verdict and invitation accepted, read from the
 * local mail server, and each user's switch for each kind.
 */
import { createHash } from 'node:crypto';
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import { revisions, worksheets } from '../../schema/index';
import { linkIn, openMailTestApp, testBaseUrl, tokenFromLink, type MailTestEnv } from './mail-support';
import { Client, testPassword, uniqueEmail } from './support';

describe('notifications by e-mail', function () {
  this.timeout(60_000);
  let env: MailTestEnv;
  before(async () => {
    env = await openMailTestApp();
  });
  after(() => env?.close());

  /**
   * A worksheet with one revision by `authorId`, written straight to the tables: these suites are
   * about the review routes' mail, not about evaluation (which the worksheet suites cover).
   */
  async function storedRevision(teamId: string, authorId: string, title: string): Promise<string> {
    const { db } = env.harness.database;
    const content = JSON.stringify({ title, steps: [] });
    return db.transaction(async (tx) => {
      const [sheet] = await tx.insert(worksheets).values({ teamId, title, createdBy: authorId }).returning({ id: worksheets.id });
      const [revision] = await tx
        .insert(revisions)
        .values({
          worksheetId: sheet.id,
          number: 1,
          authorId,
          content,
          contentHash: createHash('sha256').update(content).digest('hex'),
          engineVersion: 'test',
          results: '[]',
          resultsHash: createHash('sha256').update('[]').digest('hex'),
        })
        .returning({ id: revisions.id });
      await tx.update(worksheets).set({ headRevisionId: revision.id }).where(eq(worksheets.id, sheet.id));
      return revision.id;
    });
  }

  /** A team with an owner, an editor and a reviewer, and a worksheet the editor created (revision 1). */
  async function reviewSetting() {
    const owner = new Client(env.harness.app);
    const ownerUser = await owner.signUp({ name: 'Oona Owner' });
    const teamId = (await owner.post('/api/teams', { name: 'Bore Gauges' }).expect(201)).body.team.id as string;
    const editor = new Client(env.harness.app);
    const editorUser = await editor.signUp({ name: 'Eli Editor' });
    const reviewer = new Client(env.harness.app);
    const reviewerUser = await reviewer.signUp({ name: 'Rhea Reviewer' });
    await owner.post(`/api/teams/${teamId}/members`, { email: editorUser.email, role: 'editor' }).expect(201);
    await owner.post(`/api/teams/${teamId}/members`, { email: reviewerUser.email, role: 'reviewer' }).expect(201);
    const revisionId = await storedRevision(teamId, editorUser.id, 'Bore gauge repeatability <line 2>');
    return { owner, ownerUser, teamId, editor, editorUser, reviewer, reviewerUser, revisionId };
  }

  it('tells the reviewer about a review request, with the message and a link to the revision', async () => {
    const s = await reviewSetting();
    await s.editor
      .post(`/api/revisions/${s.revisionId}/review-requests`, { reviewerId: s.reviewerUser.id, message: 'Please check the 95 % upper bound on sigma.' })
      .expect(201);
    const messages = await env.inbox(s.reviewerUser.email);
    expect(messages).to.have.length(1);
    const [message] = messages;
    expect(message.subject).to.equal('Review requested: “Bore gauge repeatability <line 2>”, revision 1');
    expect(message.text).to.contain('Eli Editor asks you to review revision 1 of the worksheet “Bore gauge repeatability <line 2>” in Bore Gauges.');
    expect(message.text).to.contain('Please check the 95 % upper bound on sigma.');
    expect(linkIn(message, '/revisions/')).to.equal(`${testBaseUrl}/revisions/${s.revisionId}`);
    expect(linkIn(message, '/account/notifications')).to.equal(`${testBaseUrl}/account/notifications`);
    // The title is escaped in the HTML part, never taken as markup.
    expect(message.html).to.contain('Bore gauge repeatability &lt;line 2&gt;');
    expect(message.html).not.to.contain('<line 2>');
    // Nobody else heard of it.
    expect(await env.inbox(s.ownerUser.email)).to.deep.equal([]);
  });

  it('tells the author and the requester about a verdict, unless they switched it off', async () => {
    const s = await reviewSetting();
    // The owner asks for the review of the editor's revision: both hear of the verdict.
    await s.owner.post(`/api/revisions/${s.revisionId}/review-requests`, { reviewerId: s.reviewerUser.id }).expect(201);
    await s.reviewer
      .post(`/api/revisions/${s.revisionId}/reviews`, { verdict: 'changes_requested', comment: 'Use the Bonett interval: the kurtosis is high.' })
      .expect(201);
    const toAuthor = await env.inbox(s.editorUser.email);
    const toRequester = await env.inbox(s.ownerUser.email);
    for (const messages of [toAuthor, toRequester]) {
      expect(messages.map((m) => m.subject)).to.deep.equal(['Changes requested: “Bore gauge repeatability <line 2>”, revision 1']);
      expect(messages[0].text).to.contain('Rhea Reviewer requested changes to revision 1');
      expect(messages[0].text).to.contain('Use the Bonett interval: the kurtosis is high.');
      expect(linkIn(messages[0], '/revisions/')).to.equal(`${testBaseUrl}/revisions/${s.revisionId}`);
    }
    // The reviewer is never told of their own verdict.
    expect((await env.inbox(s.reviewerUser.email)).map((m) => m.subject)).to.deep.equal([
      'Review requested: “Bore gauge repeatability <line 2>”, revision 1',
    ]);

    const prefs = await s.editor.patch('/api/account/notifications', { review_verdict: false }).expect(200);
    expect(prefs.body.preferences).to.deep.equal({ review_requested: true, review_verdict: false, invitation_accepted: true });
    expect((await s.editor.get('/api/account/notifications').expect(200)).body.preferences.review_verdict).to.equal(false);
    await s.reviewer.post(`/api/revisions/${s.revisionId}/reviews`, { verdict: 'approved', comment: 'Fine now.' }).expect(201);
    expect(await env.inbox(s.editorUser.email)).to.have.length(1);
    // The owner's request was answered by the first verdict: the second reaches the author only, who is off.
    expect(await env.inbox(s.ownerUser.email)).to.have.length(1);
  });

  it('sends no review request mail to a reviewer who switched it off', async () => {
    const s = await reviewSetting();
    await s.reviewer.patch('/api/account/notifications', { review_requested: false }).expect(200);
    await s.editor.post(`/api/revisions/${s.revisionId}/review-requests`, { reviewerId: s.reviewerUser.id }).expect(201);
    expect(await env.inbox(s.reviewerUser.email)).to.deep.equal([]);
    // Switched on again, the next request is mailed.
    await s.reviewer.patch('/api/account/notifications', { review_requested: true }).expect(200);
    await s.editor.post(`/api/revisions/${s.revisionId}/review-requests`, { reviewerId: s.reviewerUser.id }).expect(201);
    expect(await env.inbox(s.reviewerUser.email)).to.have.length(1);
  });

  it('tells nobody who has left the team', async () => {
    const s = await reviewSetting();
    await s.owner.post(`/api/revisions/${s.revisionId}/review-requests`, { reviewerId: s.reviewerUser.id }).expect(201);
    await s.owner.delete(`/api/teams/${s.teamId}/members/${s.editorUser.id}`).expect(204);
    await s.reviewer.post(`/api/revisions/${s.revisionId}/reviews`, { verdict: 'approved', comment: '' }).expect(201);
    expect(await env.inbox(s.editorUser.email)).to.deep.equal([]);
    expect((await env.inbox(s.ownerUser.email)).map((m) => m.subject)).to.deep.equal(['Approved: “Bore gauge repeatability <line 2>”, revision 1']);
  });

  it('respects the inviter\'s switch for "invitation accepted"', async () => {
    const owner = new Client(env.harness.app);
    const ownerUser = await owner.signUp({ name: 'Quiet Owner' });
    const teamId = (await owner.post('/api/teams', { name: 'Calipers' }).expect(201)).body.team.id;
    await owner.patch('/api/account/notifications', { invitation_accepted: false }).expect(200);
    const email = uniqueEmail('joiner');
    await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' }).expect(201);
    const token = tokenFromLink((await env.inbox(email))[0], '/invitation');
    const joiner = new Client(env.harness.app);
    await joiner.refreshToken();
    await joiner.post('/api/invitations/signup', { token, name: 'Jo Joiner', password: testPassword }).expect(201);
    expect(await env.inbox(ownerUser.email)).to.deep.equal([]);
  });

  it('lists the settings on the account page and rejects unknown kinds', async () => {
    const client = new Client(env.harness.app);
    const user = await client.signUp();
    const account = await client.get('/api/account').expect(200);
    expect(account.body).to.deep.equal({
      user: { id: user.id, name: user.name, email: user.email },
      preferences: { review_requested: true, review_verdict: true, invitation_accepted: true },
      mailbox: false,
    });
    const unknown = await client.patch('/api/account/notifications', { newsletter: true }).expect(400);
    expect(unknown.body.error.code).to.equal('validation');
    const notBoolean = await client.patch('/api/account/notifications', { review_verdict: 'no' }).expect(400);
    expect(notBoolean.body.error.details.map((d: { field: string }) => d.field)).to.deep.equal(['review_verdict']);
  });
});
