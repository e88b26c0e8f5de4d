import { expect } from 'chai';
import { Client, expectNoSecrets, openTestApp, type AppUnderTest } from './support';

describe('teams API', function () {
  this.timeout(30_000);
  let harness: AppUnderTest;
  let owner: Client;
  let ownerUser: { id: string; email: string };
  before(async () => {
    harness = await openTestApp();
  });
  after(() => harness?.close());

  beforeEach(async () => {
    owner = new Client(harness.app);
    ownerUser = await owner.signUp({ name: 'Olive Owner' });
  });

  async function newTeam(name = 'Gauge Room'): Promise<string> {
    const res = await owner.post('/api/teams', { name }).expect(201);
    expect(res.body.team).to.include({ name, role: 'owner' });
    return res.body.team.id;
  }

  async function member(role: string) {
    const client = new Client(harness.app);
    const user = await client.signUp({ name: `A ${role}` });
    return { client, user };
  }

  it('creates a team with me as owner and lists it with my role', async () => {
    const teamId = await newTeam('Surface Lab');
    const list = await owner.get('/api/teams').expect(200);
    expect(list.body.teams).to.deep.equal([{ id: teamId, name: 'Surface Lab', role: 'owner' }]);
    const detail = await owner.get(`/api/teams/${teamId}`).expect(200);
    expect(detail.body.team).to.deep.equal({ id: teamId, name: 'Surface Lab' });
    expect(detail.body.myRole).to.equal('owner');
    expect(detail.body.members).to.deep.equal([{ userId: ownerUser.id, name: 'Olive Owner', email: ownerUser.email, role: 'owner' }]);
    expectNoSecrets(detail.body);
  });

  it('validates the team name', async () => {
    const res = await owner.post('/api/teams', { name: '  ' }).expect(400);
    expect(res.body.error.details[0].field).to.equal('name');
  });

  it('adds an existing user by e-mail with a role; the member sees the team with that role', async () => {
    const teamId = await newTeam();
    const { client, user } = await member('reviewer');
    const res = await owner.post(`/api/teams/${teamId}/members`, { email: user.email.toUpperCase(), role: 'reviewer' }).expect(201);
    expect(res.body.member).to.deep.equal({ userId: user.id, name: user.name, email: user.email, role: 'reviewer' });
    expectNoSecrets(res.body);
    const seen = await client.get(`/api/teams/${teamId}`).expect(200);
    expect(seen.body.myRole).to.equal('reviewer');
    expect(seen.body.members.map((m: { role: string }) => m.role)).to.deep.equal(['owner', 'reviewer']);
    const list = await client.get('/api/teams').expect(200);
    expect(list.body.teams).to.deep.equal([{ id: teamId, name: 'Gauge Room', role: 'reviewer' }]);
  });

  it('answers 404 for an unknown e-mail, 409 for a member added twice, 400 for an unknown role', async () => {
    const teamId = await newTeam();
    const unknown = await owner.post(`/api/teams/${teamId}/members`, { email: 'nobody.here@example.test', role: 'viewer' }).expect(404);
    expect(unknown.body.error.code).to.equal('user_not_found');
    const { user } = await member('viewer');
    await owner.post(`/api/teams/${teamId}/members`, { email: user.email, role: 'viewer' }).expect(201);
    const twice = await owner.post(`/api/teams/${teamId}/members`, { email: user.email, role: 'editor' }).expect(409);
    expect(twice.body.error.code).to.equal('already_member');
    const badRole = await owner.post(`/api/teams/${teamId}/members`, { email: user.email, role: 'admin' }).expect(400);
    expect(badRole.body.error.details[0].field).to.equal('role');
  });

  it('changes a role', async () => {
    const teamId = await newTeam();
    const { client, user } = await member('viewer');
    await owner.post(`/api/teams/${teamId}/members`, { email: user.email, role: 'viewer' }).expect(201);
    const res = await owner.patch(`/api/teams/${teamId}/members/${user.id}`, { role: 'editor' }).expect(200);
    expect(res.body.member.role).to.equal('editor');
    expect((await client.get(`/api/teams/${teamId}`).expect(200)).body.myRole).to.equal('editor');
  });

  it('never lets the last owner be demoted or removed', async () => {
    const teamId = await newTeam();
    const demote = await owner.patch(`/api/teams/${teamId}/members/${ownerUser.id}`, { role: 'editor' }).expect(409);
    expect(demote.body.error.code).to.equal('last_owner');
    const remove = await owner.delete(`/api/teams/${teamId}/members/${ownerUser.id}`).expect(409);
    expect(remove.body.error.code).to.equal('last_owner');
    const detail = await owner.get(`/api/teams/${teamId}`).expect(200);
    expect(detail.body.members).to.have.length(1);
    expect(detail.body.members[0].role).to.equal('owner');
  });

  it('lets an owner step down once another owner exists, and then refuses the other', async () => {
    const teamId = await newTeam();
    const second = await member('owner');
    await owner.post(`/api/teams/${teamId}/members`, { email: second.user.email, role: 'owner' }).expect(201);
    await owner.patch(`/api/teams/${teamId}/members/${ownerUser.id}`, { role: 'editor' }).expect(200);
    const res = await second.client.delete(`/api/teams/${teamId}/members/${second.user.id}`).expect(409);
    expect(res.body.error.code).to.equal('last_owner');
    // The former owner is now an editor and may no longer manage members.
    await owner.patch(`/api/teams/${teamId}/members/${second.user.id}`, { role: 'viewer' }).expect(403);
  });

  it('keeps one owner when two owners demote each other at the same moment', async () => {
    const teamId = await newTeam();
    const second = await member('owner');
    await owner.post(`/api/teams/${teamId}/members`, { email: second.user.email, role: 'owner' }).expect(201);
    const [a, b] = await Promise.all([
      owner.patch(`/api/teams/${teamId}/members/${second.user.id}`, { role: 'viewer' }),
      second.client.patch(`/api/teams/${teamId}/members/${ownerUser.id}`, { role: 'viewer' }),
    ]);
    const statuses = [a.status, b.status].sort();
    // One wins; the loser is either refused as last owner or, if it ran second, lost the owner role (403).
    expect(statuses[0]).to.equal(200);
    expect([403, 409]).to.include(statuses[1]);
    const detail = await owner.get(`/api/teams/${teamId}`);
    const viewer = detail.status === 200 ? owner : second.client;
    const members = (await viewer.get(`/api/teams/${teamId}`).expect(200)).body.members as Array<{ role: string }>;
    expect(members.filter((m) => m.role === 'owner')).to.have.length(1);
  });

  it('removes a member, who then gets 404 for the team', async () => {
    const teamId = await newTeam();
    const { client, user } = await member('editor');
    await owner.post(`/api/teams/${teamId}/members`, { email: user.email, role: 'editor' }).expect(201);
    await client.get(`/api/teams/${teamId}`).expect(200);
    await owner.delete(`/api/teams/${teamId}/members/${user.id}`).expect(204);
    const res = await client.get(`/api/teams/${teamId}`).expect(404);
    expect(res.body.error.code).to.equal('not_found');
    await owner.delete(`/api/teams/${teamId}/members/${user.id}`).expect(404);
  });

  it('answers 404 alike for a team I am not in, a team that does not exist and a malformed id', async () => {
    const teamId = await newTeam();
    const { client } = await member('outsider');
    const notMine = await client.get(`/api/teams/${teamId}`).expect(404);
    const missing = await client.get('/api/teams/00000000-0000-4000-8000-000000000000').expect(404);
    await client.get('/api/teams/not-a-uuid').expect(404);
    expect(notMine.body).to.deep.equal(missing.body);
  });

  it('answers 404 for a malformed member id even to the owner', async () => {
    const teamId = await newTeam();
    await owner.patch(`/api/teams/${teamId}/members/not-a-uuid`, { role: 'viewer' }).expect(404);
  });
});
