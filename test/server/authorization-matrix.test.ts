/**
 * Every route in the registry × every kind of caller: owner, editor, reviewer, viewer, a signed-in
 * non-member, and signed out. Each case runs on a team of its own, so a removal or role change in
 * one case cannot change the next. A registered route without an expectation here fails the suite:
 * adding a route means stating who may call it.
 *
 * The expected statuses follow the role meanings in DESIGN.md and the access rules in contracts.md
 * (non-member → 404, not 403; signed out → 401).
 */
import { expect } from 'chai';
import { users, memberships, teams } from '../../schema/index';
import { hashPassword } from '../../server/auth/password';
import { ApiRouter, assertAllDeclared, publicRoute, routeRegistry, type RouteDefinition } from '../../server/http/route';
import { createLogger } from '../../server/log';
import { Client, openTestApp, testPassword, uniqueEmail, type AppUnderTest } from './support';
import { addWorksheetFixture, worksheetExpectations, worksheetPathValues, type WorksheetMatrixValues } from './worksheets-matrix';
import { addMailFixture, mailExpectations, mailPathValues, type MailMatrixValues } from './mail-matrix';
import { anySignedIn, callers, everyone, teamAtLeast, type Caller, type Statuses } from './matrix-statuses';


interface Fixture {
  teamId: string;
  /** A viewer of the team that member routes act on. */
  targetUserId: string;
  /** An account outside the team, for "add member". */
  newcomerEmail: string;
  emails: Record<Exclude<Caller, 'signed-out'>, string>;
  /** Worksheet-service objects of the team (see worksheets-matrix.ts). */
  worksheet?: WorksheetMatrixValues;
  /** Invitations and a reset link of the team (see mail-matrix.ts). */
  mail?: MailMatrixValues;
}

interface Expectation {
  body?: (fixture: Fixture, caller: Caller) => object;
  /** Query string appended to the path, for routes that name their objects there. */
  query?: (fixture: Fixture) => string;
  expect: Statuses;
}


const expectations: Record<string, Expectation> = {
  'GET /api/health': { expect: everyone(200) },
  'GET /api/auth/session': { expect: everyone(200) },
  'POST /api/auth/signup': {
    body: () => ({ name: 'Matrix Newcomer', email: uniqueEmail('signup'), password: testPassword }),
    expect: everyone(201),
  },
  'POST /api/auth/signin': {
    body: (fixture, caller) => ({ email: fixture.emails[caller === 'signed-out' ? 'viewer' : caller], password: testPassword }),
    expect: everyone(200),
  },
  'POST /api/auth/signout': { expect: everyone(204) },
  'GET /api/teams': { expect: anySignedIn(200) },
  'POST /api/teams': { body: () => ({ name: 'Matrix team' }), expect: anySignedIn(201) },
  'GET /api/teams/:teamId': { expect: teamAtLeast('viewer', 200) },
  'POST /api/teams/:teamId/members': {
    body: (fixture) => ({ email: fixture.newcomerEmail, role: 'viewer' }),
    expect: teamAtLeast('owner', 201),
  },
  'PATCH /api/teams/:teamId/members/:userId': { body: () => ({ role: 'reviewer' }), expect: teamAtLeast('owner', 200) },
  'DELETE /api/teams/:teamId/members/:userId': { expect: teamAtLeast('owner', 204) },
  ...worksheetExpectations,
  ...mailExpectations,
};

const key = (route: RouteDefinition) => `${route.method} ${route.path}`;

describe('authorization matrix: every registered route × every role', function () {
  this.timeout(900_000);
  let harness: AppUnderTest;
  let passwordHash: string;

  before(async () => {
    harness = await openTestApp();
    passwordHash = await hashPassword(testPassword);
  });
  after(() => harness?.close());

  async function createFixture(): Promise<Fixture> {
    const { db } = harness.database;
    const make = async (label: string) => {
      const email = uniqueEmail(label);
      const [row] = await db.insert(users).values({ name: label, email, passwordHash }).returning({ id: users.id });
      return { id: row.id, email };
    };
    const people = {
      owner: await make('owner'),
      editor: await make('editor'),
      reviewer: await make('reviewer'),
      viewer: await make('viewer'),
      'non-member': await make('outsider'),
    };
    const target = await make('target');
    const newcomer = await make('newcomer');
    const [team] = await db.insert(teams).values({ name: 'Matrix' }).returning({ id: teams.id });
    await db.insert(memberships).values([
      { teamId: team.id, userId: people.owner.id, role: 'owner' },
      { teamId: team.id, userId: people.editor.id, role: 'editor' },
      { teamId: team.id, userId: people.reviewer.id, role: 'reviewer' },
      { teamId: team.id, userId: people.viewer.id, role: 'viewer' },
      { teamId: team.id, userId: target.id, role: 'viewer' },
    ]);
    const fixture: Fixture = {
      teamId: team.id,
      targetUserId: target.id,
      newcomerEmail: newcomer.email,
      emails: Object.fromEntries(Object.entries(people).map(([role, p]) => [role, p.email])) as Fixture['emails'],
    };
    fixture.worksheet = await addWorksheetFixture(db, fixture);
    fixture.mail = await addMailFixture(db, fixture);
    return fixture;
  }

  function fillPath(path: string, fixture: Fixture): string {
    const values: Record<string, string> = {
      teamId: fixture.teamId,
      userId: fixture.targetUserId,
      ...(fixture.worksheet ? worksheetPathValues(fixture.worksheet) : {}),
      ...(fixture.mail ? mailPathValues(fixture.mail) : {}),
    };
    return path.replace(/:(\w+)/g, (_, name: string) => {
      if (!values[name]) throw new Error(`The matrix has no value for the path parameter :${name} (${path}).`);
      return values[name];
    });
  }

  it('has an expectation for every registered route, and none for routes that do not exist', () => {
    const registered = routeRegistry(harness.app).map(key);
    expect(registered.length).to.be.greaterThan(0);
    expect(new Set(registered).size, 'a route is registered twice').to.equal(registered.length);
    const missing = registered.filter((k) => !(k in expectations));
    expect(missing, 'registered routes with no expectation in the authorization matrix').to.deep.equal([]);
    const stale = Object.keys(expectations).filter((k) => !registered.includes(k));
    expect(stale, 'expectations for routes that are not registered').to.deep.equal([]);
  });

  it('refuses a route added behind the registry\'s back', () => {
    const router = new ApiRouter('/api/example', { db: harness.database.db, logger: createLogger('silent') });
    router.get('/declared', { access: publicRoute, summary: 'declared' }, ({ res }) => res.end());
    assertAllDeclared(router);
    router.router.get('/sneaked-in', (_req, res) => res.end());
    expect(() => assertAllDeclared(router)).to.throw(/declared route/);
  });

  it('every route declares its access as public, signed-in or a team role', () => {
    for (const route of routeRegistry(harness.app)) {
      expect(['public', 'signed-in', 'team'], key(route)).to.include(route.access.kind);
    }
  });

  // The cases come from the registry at run time, so a route added later is walked (or fails the
  // test above) without editing this loop. Every mismatch is collected and listed in one failure.
  it('answers every caller with the expected status', async () => {
    const failures: string[] = [];
    let cases = 0;
    for (const route of routeRegistry(harness.app)) {
      const expectation = expectations[key(route)];
      if (!expectation) continue;
      for (const caller of callers) {
        const fixture = await createFixture();
        const client = new Client(harness.app);
        if (caller === 'signed-out') await client.refreshToken();
        else await client.signIn(fixture.emails[caller]);

        const path = fillPath(route.path, fixture) + (expectation.query?.(fixture) ?? '');
        const body = expectation.body?.(fixture, caller);
        const method = route.method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete';
        let request = client.agent[method](path);
        if (method !== 'get') request = request.set('X-CSRF-Token', client.token);
        const res = await (body ? request.send(body) : request);
        cases += 1;
        if (res.status !== expectation.expect[caller]) {
          failures.push(`${key(route)} as ${caller}: expected ${expectation.expect[caller]}, got ${res.status} ${JSON.stringify(res.body)}`);
        }
        if (res.status >= 400) {
          expect(res.body, `${key(route)} as ${caller}: error shape`).to.have.nested.property('error.code').that.is.a('string');
        }
      }
    }
    expect(cases).to.equal(Object.keys(expectations).length * callers.length);
    expect(failures, failures.join('\n')).to.deep.equal([]);
  });
});
