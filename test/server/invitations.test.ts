/**
 * Invitations end to end: the owner's request, the message as the local mail server received it
 * over SMTP, the link in it, sign-up or acceptance from that link, and the membership that results.
 */
import { createHash } from 'node:crypto';
import { expect } from 'chai';
import { eq, sql } from 'drizzle-orm';
import { invitations, mailOutbox } from '../../schema/index';
import { linkIn, openMailTestApp, testBaseUrl, tokenFromLink, type MailTestEnv } from './mail-support';
import { Client, testPassword, uniqueEmail } from './support';

describe('invitations by e-mail', function () {
  this.timeout(60_000);
  let env: MailTestEnv;
  before(async () => {
    env = await openMailTestApp();
  });
  after(() => env?.close());

  async function ownerWithTeam(name = 'Gauge Room') {
    const owner = new Client(env.harness.app);
    const user = await owner.signUp({ name: 'Olga Owner' });
    const res = await owner.post('/api/teams', { name }).expect(201);
    return { owner, user, teamId: res.body.team.id as string, teamName: name };
  }

  it('sends a newcomer a single-use link to sign up, and makes them a member with the given role', async () => {
    const { owner, user: ownerUser, teamId, teamName } = await ownerWithTeam('Surface Finish Lab');
    const email = uniqueEmail('newcomer');
    const created = await owner.post(`/api/teams/${teamId}/invitations`, { email: email.toUpperCase(), role: 'reviewer' }).expect(201);
    expect(created.body.invitation).to.include({ email, role: 'reviewer', status: 'pending' });
    expect(created.body.invitation.invitedBy).to.deep.equal({ id: ownerUser.id, name: 'Olga Owner' });

    const list = await owner.get(`/api/teams/${teamId}/invitations`).expect(200);
    expect(list.body.items.map((i: { email: string }) => i.email)).to.deep.equal([email]);

    const messages = await env.inbox(email);
    expect(messages).to.have.length(1);
    const [message] = messages;
    expect(message.subject).to.equal(`Olga Owner invites you to “${teamName}” on Spreadproof`);
    expect(message.fromHeader).to.contain('no-reply@spreadproof.invalid');
    expect(message.text).to.contain('as a reviewer');
    expect(message.text).to.contain('Create your account and join');
    expect(message.html).to.be.a('string').and.contain('Create your account and join');
    // The raw message over SMTP carries both parts.
    expect(message.raw).to.match(/Content-Type: multipart\/alternative/i);
    expect(message.raw).to.match(/Content-Type: text\/plain/i);
    expect(message.raw).to.match(/Content-Type: text\/html/i);
    const token = tokenFromLink(message, '/invitation');
    expect(message.html).to.contain(`${testBaseUrl}/invitation#${token}`);

    // Only the hash is stored, and the sent message's bodies are gone from the outbox.
    const [row] = await env.harness.database.db.select().from(invitations).where(eq(invitations.id, created.body.invitation.id));
    expect(row.tokenHash).to.equal(createHash('sha256').update(token).digest('hex'));
    expect(JSON.stringify(row)).not.to.contain(token);
    const outbox = await env.harness.database.db.select().from(mailOutbox).where(eq(mailOutbox.recipient, email));
    expect(outbox).to.have.length(1);
    expect(outbox[0]).to.include({ status: 'sent', kind: 'invitation', textBody: null, htmlBody: null, attempts: 1 });

    const visitor = new Client(env.harness.app);
    await visitor.refreshToken();
    const preview = await visitor.post('/api/invitations/lookup', { token }).expect(200);
    expect(preview.body.invitation).to.deep.include({ teamName, role: 'reviewer', email, invitedByName: 'Olga Owner', accountExists: false });

    const signup = await visitor.post('/api/invitations/signup', { token, name: 'Nadia Newcomer', password: testPassword }).expect(201);
    expect(signup.body.user).to.include({ name: 'Nadia Newcomer', email });
    expect(signup.body.team).to.deep.equal({ id: teamId, name: teamName, role: 'reviewer' });
    await visitor.refreshToken();
    const session = await visitor.get('/api/auth/session').expect(200);
    expect(session.body.user.email).to.equal(email);
    const team = await visitor.get(`/api/teams/${teamId}`).expect(200);
    expect(team.body.myRole).to.equal('reviewer');
    // The new account signs in with the chosen password.
    await new Client(env.harness.app).signIn(email, testPassword);

    // The link works once.
    const again = new Client(env.harness.app);
    await again.refreshToken();
    expect((await again.post('/api/invitations/lookup', { token }).expect(410)).body.error.code).to.equal('invitation_used');
    expect((await again.post('/api/invitations/signup', { token, name: 'Someone Else', password: testPassword }).expect(410)).body.error.code).to.equal(
      'invitation_used',
    );
    expect((await owner.get(`/api/teams/${teamId}/invitations`).expect(200)).body.items).to.deep.equal([]);

    // The owner hears that the invitation was accepted.
    const ownerMail = await env.inbox(ownerUser.email);
    expect(ownerMail.map((m) => m.subject)).to.deep.equal([`Nadia Newcomer joined “${teamName}”`]);
    expect(ownerMail[0].text).to.contain(`Nadia Newcomer (${email}) accepted your invitation`);
    expect(linkIn(ownerMail[0], `/teams/${teamId}`)).to.equal(`${testBaseUrl}/teams/${teamId}`);
  });

  it('lets a person with an account join by accepting, signed in with the invited address only', async () => {
    const { owner, teamId, teamName } = await ownerWithTeam();
    const invitee = new Client(env.harness.app);
    const inviteeUser = await invitee.signUp({ name: 'Eero Existing' });
    await owner.post(`/api/teams/${teamId}/invitations`, { email: inviteeUser.email, role: 'editor' }).expect(201);
    const [message] = await env.inbox(inviteeUser.email);
    expect(message.text).to.contain('You already have an account with this address');
    expect(message.text).to.contain('Join the team');
    const token = tokenFromLink(message, '/invitation');

    const stranger = new Client(env.harness.app);
    await stranger.signUp();
    expect((await stranger.post('/api/invitations/lookup', { token }).expect(200)).body.invitation.accountExists).to.equal(true);
    const refused = await stranger.post('/api/invitations/accept', { token }).expect(403);
    expect(refused.body.error.code).to.equal('invitation_other_address');
    expect(refused.body.error.message).to.contain(inviteeUser.email);
    await stranger.get(`/api/teams/${teamId}`).expect(404);

    const signedOut = new Client(env.harness.app);
    await signedOut.refreshToken();
    await signedOut.post('/api/invitations/accept', { token }).expect(401);

    const accepted = await invitee.post('/api/invitations/accept', { token }).expect(200);
    expect(accepted.body.team).to.deep.equal({ id: teamId, name: teamName, role: 'editor' });
    expect((await invitee.get(`/api/teams/${teamId}`).expect(200)).body.myRole).to.equal('editor');
    expect((await invitee.post('/api/invitations/accept', { token }).expect(410)).body.error.code).to.equal('invitation_used');
  });

  it('lets owners withdraw an invitation, after which its link stops working', async () => {
    const { owner, teamId } = await ownerWithTeam();
    const email = uniqueEmail('withdrawn');
    const created = await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' }).expect(201);
    const token = tokenFromLink((await env.inbox(email))[0], '/invitation');
    await owner.delete(`/api/teams/${teamId}/invitations/${created.body.invitation.id}`).expect(204);
    expect((await owner.get(`/api/teams/${teamId}/invitations`).expect(200)).body.items).to.deep.equal([]);
    await owner.delete(`/api/teams/${teamId}/invitations/${created.body.invitation.id}`).expect(404);

    const visitor = new Client(env.harness.app);
    await visitor.refreshToken();
    expect((await visitor.post('/api/invitations/lookup', { token }).expect(410)).body.error.code).to.equal('invitation_withdrawn');
    expect((await visitor.post('/api/invitations/signup', { token, name: 'Late Comer', password: testPassword }).expect(410)).body.error.code).to.equal(
      'invitation_withdrawn',
    );
  });

  it('replaces the open invitation when the same address is invited again', async () => {
    const { owner, teamId } = await ownerWithTeam();
    const email = uniqueEmail('twice');
    await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' }).expect(201);
    await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'editor' }).expect(201);
    const messages = await env.inbox(email);
    expect(messages).to.have.length(2);
    const [first, second] = messages.map((m) => tokenFromLink(m, '/invitation'));
    const list = (await owner.get(`/api/teams/${teamId}/invitations`).expect(200)).body.items;
    expect(list).to.have.length(1);
    expect(list[0]).to.include({ email, role: 'editor' });

    const visitor = new Client(env.harness.app);
    await visitor.refreshToken();
    expect((await visitor.post('/api/invitations/lookup', { token: first }).expect(410)).body.error.code).to.equal('invitation_withdrawn');
    const joined = await visitor.post('/api/invitations/signup', { token: second, name: 'Second Link', password: testPassword }).expect(201);
    expect(joined.body.team.role).to.equal('editor');
  });

  it('refuses an expired link and shows the invitation as expired to owners', async () => {
    const { owner, teamId } = await ownerWithTeam();
    const email = uniqueEmail('late');
    const created = await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' }).expect(201);
    const token = tokenFromLink((await env.inbox(email))[0], '/invitation');
    await env.harness.database.db
      .update(invitations)
      .set({ expiresAt: sql`now() - interval '1 second'` })
      .where(eq(invitations.id, created.body.invitation.id));

    const visitor = new Client(env.harness.app);
    await visitor.refreshToken();
    expect((await visitor.post('/api/invitations/lookup', { token }).expect(410)).body.error.code).to.equal('invitation_expired');
    expect((await visitor.post('/api/invitations/signup', { token, name: 'Too Late', password: testPassword }).expect(410)).body.error.code).to.equal(
      'invitation_expired',
    );
    const list = (await owner.get(`/api/teams/${teamId}/invitations`).expect(200)).body.items;
    expect(list.map((i: { status: string }) => i.status)).to.deep.equal(['expired']);
  });

  it('answers unknown and malformed links, members and taken addresses plainly', async () => {
    const { owner, user, teamId } = await ownerWithTeam();
    const visitor = new Client(env.harness.app);
    await visitor.refreshToken();
    const unknown = 'A'.repeat(43);
    expect((await visitor.post('/api/invitations/lookup', { token: unknown }).expect(404)).body.error.code).to.equal('invitation_not_found');
    const malformed = await visitor.post('/api/invitations/lookup', { token: 'short' }).expect(400);
    expect(malformed.body.error.details.map((d: { field: string }) => d.field)).to.deep.equal(['token']);

    const already = await owner.post(`/api/teams/${teamId}/invitations`, { email: user.email, role: 'viewer' }).expect(409);
    expect(already.body.error.code).to.equal('already_member');
    const badRole = await owner.post(`/api/teams/${teamId}/invitations`, { email: uniqueEmail(), role: 'admin' }).expect(400);
    expect(badRole.body.error.details.map((d: { field: string }) => d.field)).to.deep.equal(['role']);

    // An account created meanwhile for the invited address: the link cannot create a second one.
    const email = uniqueEmail('meanwhile');
    await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' }).expect(201);
    const token = tokenFromLink((await env.inbox(email))[0], '/invitation');
    await new Client(env.harness.app).signUp({ email });
    const taken = await visitor.post('/api/invitations/signup', { token, name: 'Second Account', password: testPassword }).expect(409);
    expect(taken.body.error.code).to.equal('email_taken');
    // The invitation is still open for accepting with that account.
    expect((await visitor.post('/api/invitations/lookup', { token }).expect(200)).body.invitation.accountExists).to.equal(true);
  });

  it('accepts each link once even when two sign-ups race for it', async () => {
    const { owner, teamId } = await ownerWithTeam();
    const email = uniqueEmail('race');
    await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' }).expect(201);
    const token = tokenFromLink((await env.inbox(email))[0], '/invitation');
    const a = new Client(env.harness.app);
    const b = new Client(env.harness.app);
    await Promise.all([a.refreshToken(), b.refreshToken()]);
    const results = await Promise.all([
      a.post('/api/invitations/signup', { token, name: 'Racer A', password: testPassword }),
      b.post('/api/invitations/signup', { token, name: 'Racer B', password: testPassword }),
    ]);
    // One wins; the other finds the address taken (409) or the link used (410), whichever it meets first.
    const statuses = results.map((r) => r.status).sort();
    expect(statuses[0]).to.equal(201);
    expect([409, 410]).to.include(statuses[1]);
    const team = await owner.get(`/api/teams/${teamId}`).expect(200);
    expect(team.body.members.filter((m: { email: string }) => m.email === email)).to.have.length(1);
  });
});

describe('invitation rate limit', function () {
  this.timeout(30_000);
  let env: MailTestEnv;
  before(async () => {
    env = await openMailTestApp({ limits: { invitationsPerUser: { windowMs: 60_000, limit: 2 } } });
  });
  after(() => env?.close());

  it('answers 429 rate_limited after the allowed number of invitations', async () => {
    const owner = new Client(env.harness.app);
    await owner.signUp();
    const teamId = (await owner.post('/api/teams', { name: 'Busy team' }).expect(201)).body.team.id;
    await owner.post(`/api/teams/${teamId}/invitations`, { email: uniqueEmail(), role: 'viewer' }).expect(201);
    await owner.post(`/api/teams/${teamId}/invitations`, { email: uniqueEmail(), role: 'viewer' }).expect(201);
    const third = await owner.post(`/api/teams/${teamId}/invitations`, { email: uniqueEmail(), role: 'viewer' }).expect(429);
    expect(third.body.error.code).to.equal('rate_limited');
    // Another owner is counted apart.
    const other = new Client(env.harness.app);
    await other.signUp();
    const otherTeam = (await other.post('/api/teams', { name: 'Quiet team' }).expect(201)).body.team.id;
    await other.post(`/api/teams/${otherTeam}/invitations`, { email: uniqueEmail(), role: 'viewer' }).expect(201);
  });
});
