/**
 * Authorization beyond the route × role matrix (test/server/authorization-matrix.test.ts):
 *
 * 1. Cross-team ids: a user with every right in team A who names team B's worksheets, revisions,
 *    datasets, links, members and invitations — in the path, the query or the body — gets 404 (or,
 *    for a dataset named inside a document, the same 422 as for an id that exists nowhere), and
 *    nothing of team B in the answer. Reviews are reached only through their revision, whose id is
 *    among those tried.
 * 2. Guessing published-link tokens answers 404 and, past the limit, 429.
 * 3. Secrets: every registered route walked as a signed-in outsider and as a viewer; no answer
 *    carries a password hash, a session id, a CSRF token of another session, a link, invitation or
 *    reset token (or its hash), or — for the outsider — any team member's e-mail address.
 *
 * The rules come from contracts.md and api-worksheets.md (non-member → 404; tokens shown once).
 */
import { randomBytes } from 'node:crypto';
import { expect } from 'chai';
import { routeRegistry, type RouteDefinition } from '../../server/http/route';
import { Client } from '../server/support';
import { boreDocument, createBoreWorksheet, openServiceApp, teamOfRoles, type ServiceHarness, type TeamOfRoles } from '../server/worksheets-support';
import { suiteDatabaseUrl } from '../support/db';
import { withClient } from './support';

interface TeamObjects {
  team: TeamOfRoles;
  worksheetId: string;
  firstRevisionId: string;
  revisionId: string;
  datasetId: string;
  linkId: string;
  token: string;
  invitationId: string;
  invitedEmail: string;
}

const csv = (label: string) => Buffer.from(`part,deviation\n${label}-1,2.1\n${label}-2,1.8\n${label}-3,2.4\n${label}-4,2.0\n${label}-5,1.7\n`);

async function buildTeam(harness: ServiceHarness, name: string): Promise<TeamObjects> {
  const team = await teamOfRoles(harness, name);
  const { owner, editor, reviewer } = team.clients;
  const sheet = await createBoreWorksheet(editor, team.teamId, boreDocument({ title: `${name} bore study` }));
  const upload = await editor.agent
    .post(`/api/teams/${team.teamId}/datasets`)
    .set('X-CSRF-Token', editor.token)
    .attach('file', csv(name), `${name}.csv`)
    .expect(201);
  const published = await owner.post(`/api/revisions/${sheet.revision.id}/links`, {}).expect(201);
  await editor.post(`/api/revisions/${sheet.revision.id}/review-requests`, { reviewerId: team.users.reviewer.id }).expect(201);
  await reviewer.post(`/api/revisions/${sheet.revision.id}/reviews`, { verdict: 'approved', comment: `Checked for ${name}.` }).expect(201);
  const invitedEmail = `invited.${randomBytes(4).toString('hex')}@example.test`;
  const invitation = await owner.post(`/api/teams/${team.teamId}/invitations`, { email: invitedEmail, role: 'viewer' }).expect(201);
  return {
    team,
    worksheetId: sheet.worksheetId,
    firstRevisionId: sheet.first,
    revisionId: sheet.revision.id,
    datasetId: upload.body.dataset.id,
    linkId: published.body.link.id,
    token: published.body.token,
    invitationId: invitation.body.invitation.id,
    invitedEmail,
  };
}

/** Path parameter values naming `objects`' things; `teamId` may come from another team. */
function pathValues(objects: TeamObjects, teamId = objects.team.teamId): Record<string, string> {
  return {
    teamId,
    worksheetId: objects.worksheetId,
    revisionId: objects.revisionId,
    datasetId: objects.datasetId,
    linkId: objects.linkId,
    token: objects.token,
    userId: objects.team.users.viewer.id,
    invitationId: objects.invitationId,
    messageId: '1',
  };
}

const fill = (path: string, values: Record<string, string>) =>
  path.replace(/:(\w+)/g, (_, name: string) => {
    if (!(name in values)) throw new Error(`no value for :${name} in ${path}`);
    return values[name];
  });

const key = (route: RouteDefinition) => `${route.method} ${route.path}`;

function send(client: Client, method: RouteDefinition['method'], path: string, body?: object) {
  const m = method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete';
  let request = client.agent[m](path);
  if (m !== 'get') request = request.set('X-CSRF-Token', client.token);
  return body ? request.send(body) : request;
}

/** Plausible bodies, so that a refusal is the access rule's and not the body's. */
function bodyFor(route: RouteDefinition, target: TeamObjects, own: TeamObjects): object | undefined {
  switch (key(route)) {
    case 'POST /api/worksheets/:worksheetId/revisions':
      return { baseRevisionId: target.revisionId, document: boreDocument({ title: 'Cross-team save' }) };
    case 'POST /api/worksheets/:worksheetId/evaluate':
      return { document: boreDocument() };
    case 'POST /api/revisions/:revisionId/fork':
      return { teamId: own.team.teamId };
    case 'POST /api/revisions/:revisionId/review-requests':
      return { reviewerId: target.team.users.reviewer.id };
    case 'POST /api/revisions/:revisionId/reviews':
      return { verdict: 'approved', comment: 'Looks fine.' };
    case 'POST /api/teams/:teamId/members':
      return { email: own.team.users.viewer.email, role: 'viewer' };
    case 'PATCH /api/teams/:teamId/members/:userId':
      return { role: 'owner' };
    case 'POST /api/teams/:teamId/invitations':
      return { email: 'someone.new@example.test', role: 'owner' };
    case 'POST /api/teams/:teamId/worksheets':
      return { source: 'blank', title: 'Planted' };
    case 'POST /api/teams/:teamId/worksheets/import':
      return boreDocument({ title: 'Planted import' });
    default:
      return route.method === 'GET' || route.method === 'DELETE' ? undefined : {};
  }
}

/** Strings of `objects`' team that must not show up in an outsider's answer. */
function telltales(objects: TeamObjects): string[] {
  const { users } = objects.team;
  return [
    objects.worksheetId,
    objects.firstRevisionId,
    objects.revisionId,
    objects.linkId,
    objects.invitationId,
    objects.invitedEmail,
    ...Object.values(users).filter((u) => u !== users.outsider).map((u) => u.email),
  ];
}

describe('reliability: authorization across teams, token guessing, secrets in answers', function () {
  this.timeout(300_000);
  let harness: ServiceHarness;
  let a: TeamObjects;
  let b: TeamObjects;

  before(async () => {
    harness = await openServiceApp({ publicRateLimit: { windowMs: 60_000, failures: 8 } });
    a = await buildTeam(harness, 'Alder Cell');
    b = await buildTeam(harness, 'Birch Cell');
  });
  after(() => harness?.close());

  it('answers 404 to every team route when a member of team A names team B objects', async () => {
    const attacker = a.team.clients.owner;
    const failures: string[] = [];
    let tried = 0;
    const forbidden = telltales(b);
    for (const route of routeRegistry(harness.app)) {
      if (route.access.kind !== 'team') continue;
      const variants: { label: string; values: Record<string, string> }[] = [{ label: "team B's ids", values: pathValues(b) }];
      // Own team in the path, the other team's object after it: the object must not be found either.
      if (route.path.includes(':teamId') && /:(userId|datasetId|invitationId)/.test(route.path)) {
        variants.push({ label: "team A's path with team B's object", values: pathValues(b, a.team.teamId) });
      }
      for (const variant of variants) {
        let path = fill(route.path, variant.values);
        if (key(route) === 'GET /api/compare') path += `?from=${b.firstRevisionId}&to=${b.revisionId}`;
        const res = await send(attacker, route.method, path, bodyFor(route, b, a));
        tried += 1;
        if (res.status !== 404) failures.push(`${key(route)} (${variant.label}): ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
        const text = JSON.stringify(res.body);
        for (const t of forbidden) if (text.includes(t)) failures.push(`${key(route)} (${variant.label}) leaks ${t}`);
      }
    }
    expect(tried).to.be.greaterThan(25);
    expect(failures, failures.join('\n')).to.deep.equal([]);
  });

  it('answers 404 when team B is named in a query or a body', async () => {
    const attacker = a.team.clients.owner;
    // The list filtered to a team the caller does not belong to.
    await attacker.get(`/api/worksheets?teamId=${b.team.teamId}`).expect(404);
    // Compare across teams, either way round.
    await attacker.get(`/api/compare?from=${a.revisionId}&to=${b.revisionId}`).expect(404);
    await attacker.get(`/api/compare?from=${b.revisionId}&to=${a.revisionId}`).expect(404);
    // Fork one's own revision into the other team.
    const fork = await attacker.post(`/api/revisions/${a.revisionId}/fork`, { teamId: b.team.teamId }).expect(404);
    expect(JSON.stringify(fork.body)).not.to.include('Birch');
    // Save on one's own worksheet based on the other team's revision: not a revision of this worksheet.
    const { body: head } = await attacker.get(`/api/worksheets/${a.worksheetId}`).expect(200);
    const badBase = await attacker
      .post(`/api/worksheets/${a.worksheetId}/revisions`, { baseRevisionId: b.revisionId, document: boreDocument() })
      .expect(422);
    expect(badBase.body.error.code).to.equal('bad_base');
    expect(head.head.id).to.equal(a.revisionId);
    // A review request naming a member of the other team as reviewer.
    const badReviewer = await a.team.clients.editor.post(`/api/revisions/${a.revisionId}/review-requests`, { reviewerId: b.team.users.reviewer.id }).expect(422);
    expect(JSON.stringify(badReviewer.body)).not.to.include(b.team.users.reviewer.email);
  });

  it("answers a document that uses team B's dataset exactly as one that uses a dataset that exists nowhere", async () => {
    const attacker = a.team.clients.editor;
    const withDataset = (datasetId: string) => ({
      document: {
        format: 'spreadproof.worksheet',
        version: 1,
        title: 'Borrowed data',
        steps: [
          { id: 'data', kind: 'data', params: { origin: 'dataset', datasetId } },
          { id: 'spread', kind: 'spread-summary', params: { source: { step: 'data', column: 'deviation' } } },
        ],
      },
    });
    const nowhere = randomBytes(32).toString('hex');
    const foreign = await attacker.post(`/api/worksheets/${a.worksheetId}/evaluate`, withDataset(b.datasetId));
    const missing = await attacker.post(`/api/worksheets/${a.worksheetId}/evaluate`, withDataset(nowhere));
    expect(foreign.status).to.equal(422);
    expect(missing.status).to.equal(422);
    expect(foreign.body.error.code).to.equal(missing.body.error.code);
    const normalise = (body: unknown) => JSON.stringify(body).replaceAll(b.datasetId.slice(0, 12), '#').replaceAll(nowhere.slice(0, 12), '#');
    expect(normalise(foreign.body)).to.equal(normalise(missing.body));
    // And the rows of the other team's dataset cannot be read through one's own team.
    await attacker.get(`/api/teams/${a.team.teamId}/datasets/${b.datasetId}`).expect(404);
  });

  it('answers 404 to guessed and malformed published tokens, then 429 once the guesses pass the limit', async () => {
    const guesser = new Client(harness.app);
    const statuses: number[] = [];
    const guesses = [
      ...Array.from({ length: 5 }, () => randomBytes(32).toString('base64url')),
      'short',
      `${b.token.slice(0, 42)}${b.token[42] === 'A' ? 'B' : 'A'}`, // one character off a real token
      '../../api/health',
      "' or 1=1 --",
      'x'.repeat(43),
    ];
    for (const guess of guesses) {
      const res = await guesser.get(`/api/public/${encodeURIComponent(guess)}`);
      statuses.push(res.status);
      expect(res.body, guess).to.have.nested.property('error.code');
      expect(JSON.stringify(res.body)).not.to.include('Birch');
    }
    // The limit is 8 failures: the first 8 answer 404, the rest 429 rate_limited.
    expect(statuses.slice(0, 8)).to.deep.equal(Array(8).fill(404));
    expect(statuses.slice(8)).to.deep.equal([429, 429]);
    const limited = await guesser.get(`/api/public/${randomBytes(32).toString('base64url')}`).expect(429);
    expect(limited.body.error.code).to.equal('rate_limited');
    expect(limited.body.error.message).to.match(/wait/i);
  });

  describe('no answer carries secrets', () => {
    let secrets: { value: string; what: string }[];

    before(async () => {
      // Everything secret the database holds, to look for in the answers.
      secrets = await withClient(await suiteDatabaseUrl(), async (client) => {
        const found: { value: string; what: string }[] = [];
        for (const r of (await client.query('select password_hash from users')).rows) found.push({ value: r.password_hash, what: 'a password hash' });
        for (const r of (await client.query('select token_hash from published_links')).rows) found.push({ value: r.token_hash, what: 'a link token hash' });
        for (const r of (await client.query('select token_hash from invitations')).rows) found.push({ value: r.token_hash, what: 'an invitation token hash' });
        for (const r of (await client.query('select token_hash from password_resets')).rows) found.push({ value: r.token_hash, what: 'a reset token hash' });
        for (const r of (await client.query('select sid, sess from session')).rows) {
          found.push({ value: r.sid, what: 'a session id' });
          const csrf = (r.sess as { csrfToken?: string }).csrfToken;
          if (csrf) found.push({ value: csrf, what: 'a CSRF token of a session' });
        }
        for (const r of (await client.query('select coalesce(text_body, \'\') || coalesce(html_body, \'\') as body from mail_outbox')).rows) {
          for (const m of (r.body as string).matchAll(/[#=/]([A-Za-z0-9_-]{40,})/g)) found.push({ value: m[1], what: 'a token sent by mail' });
        }
        return found;
      });
      secrets.push({ value: a.token, what: "team A's link token" }, { value: b.token, what: "team B's link token" });
      expect(secrets.filter((s) => s.what === 'a password hash').length).to.be.greaterThan(9);
      expect(secrets.some((s) => s.what === 'a token sent by mail'), 'invitation mails hold tokens').to.equal(true);
    });

    async function walk(client: Client, label: string, objects: TeamObjects, extraForbidden: string[]): Promise<string[]> {
      const own = new Set([client.token]);
      const failures: string[] = [];
      let walked = 0;
      for (const route of routeRegistry(harness.app)) {
        // Signing out or in would end the walking session; those answers are covered by the auth suites.
        if (route.path.startsWith('/api/auth/sign')) continue;
        if (key(route) === 'DELETE /api/dev/mailbox') continue;
        let path = fill(route.path, pathValues(objects));
        if (key(route) === 'GET /api/compare') path += `?from=${objects.firstRevisionId}&to=${objects.revisionId}`;
        const body = bodyFor(route, objects, objects);
        const res = await send(client, route.method, path, body);
        walked += 1;
        if (res.status >= 500) failures.push(`${label}: ${key(route)} answered ${res.status}`);
        // The caller's own cookie comes back in Set-Cookie; every other header is looked at.
        const { 'set-cookie': _own, ...headers } = res.headers;
        const text = `${JSON.stringify(res.body)} ${JSON.stringify(headers)}`;
        for (const s of secrets) {
          if (!own.has(s.value) && text.includes(s.value)) failures.push(`${label}: ${key(route)} returned ${s.what}`);
        }
        if (/scrypt\$|password_?hash|token_?hash/i.test(text)) failures.push(`${label}: ${key(route)} names a hash field`);
        for (const f of extraForbidden) if (text.includes(f)) failures.push(`${label}: ${key(route)} returned ${f}`);
      }
      expect(walked).to.be.greaterThan(40);
      return failures;
    }

    it('a signed-in outsider sees no secret and no member e-mail address of any team', async () => {
      const outsider = new Client(harness.app);
      await outsider.signUp({ name: 'Walking Outsider' });
      const failures = await walk(outsider, 'outsider', a, telltales(a).filter((t) => t.includes('@')));
      expect(failures, failures.join('\n')).to.deep.equal([]);
      // The addresses looked for are the ones a member does see (so the scan looks for the right strings).
      const seenByMember = await a.team.clients.viewer.get(`/api/teams/${a.team.teamId}`).expect(200);
      expect(JSON.stringify(seenByMember.body)).to.include(a.team.users.owner.email);
    });

    it('a viewer sees no secret, and no e-mail address of the other team', async () => {
      const viewer = a.team.clients.viewer;
      const failures = await walk(viewer, 'viewer', a, telltales(b).filter((t) => t.includes('@')));
      expect(failures, failures.join('\n')).to.deep.equal([]);
    });
  });
});
