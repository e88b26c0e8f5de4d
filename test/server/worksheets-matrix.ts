/**
 * The worksheet service's part of the route × role authorization matrix
 * (test/server/authorization-matrix.test.ts): for every fixture team, a worksheet with two
 * revisions authored by a plain viewer of the team (so reviewers may review them), a dataset, a
 * published link; and the expected status of each route for each kind of caller.
 *
 * The expected statuses follow the roles of DESIGN.md: viewers read, reviewers also compare and
 * give verdicts, editors create, save, fork, upload and ask for reviews, owners archive, publish
 * and read the audit trail. Non-members get 404, signed-out callers 401.
 */
import { eq, inArray } from 'drizzle-orm';
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import { evaluate } from '@shared/engine/evaluate';
import { ENGINE_VERSION } from '@shared/engine/version';
import { datasets, publishedLinks, revisions, teamDatasets, users, worksheets } from '../../schema/index';
import type { Database } from '../../server/db/client';
import { parsedInfo, readTable } from '../../server/datasets/parse';
import { prepareDocument } from '../../server/worksheets/service';
import { tokenHash } from '../../server/publishing/routes';
import { boreDocument } from './worksheets-support';
import { anySignedIn, everyone, teamAtLeast, type Caller, type Statuses } from './matrix-statuses';


export interface WorksheetMatrixValues {
  worksheetId: string;
  revisionId: string;
  firstRevisionId: string;
  linkId: string;
  datasetId: string;
  token: string;
  reviewerId: string;
}

interface MatrixFixture {
  teamId: string;
  targetUserId: string;
  emails: Record<Exclude<Caller, 'signed-out'>, string>;
  worksheet?: WorksheetMatrixValues;
}

interface MatrixExpectation {
  body?: (fixture: MatrixFixture, caller: Caller) => object;
  query?: (fixture: MatrixFixture) => string;
  expect: Statuses;
}


const ws = (f: MatrixFixture) => f.worksheet!;
const documentV3 = () => boreDocument({ title: 'Matrix worksheet', levels: [0.9] });

export const worksheetExpectations: Record<string, MatrixExpectation> = {
  'GET /api/examples': { expect: anySignedIn(200) },
  'GET /api/worksheets': { expect: anySignedIn(200) },
  'POST /api/teams/:teamId/worksheets': { body: () => ({ source: 'blank', title: 'New in matrix' }), expect: teamAtLeast('editor', 201) },
  'POST /api/teams/:teamId/worksheets/import': { body: () => boreDocument({ title: 'Imported in matrix' }), expect: teamAtLeast('editor', 201) },
  'GET /api/worksheets/:worksheetId': { expect: teamAtLeast('viewer', 200) },
  'POST /api/worksheets/:worksheetId/archive': { expect: teamAtLeast('owner', 200) },
  'POST /api/worksheets/:worksheetId/restore': { expect: teamAtLeast('owner', 200) },
  'GET /api/worksheets/:worksheetId/export': { expect: teamAtLeast('viewer', 200) },
  'GET /api/worksheets/:worksheetId/revisions': { expect: teamAtLeast('viewer', 200) },
  'POST /api/worksheets/:worksheetId/revisions': {
    body: (f) => ({ baseRevisionId: ws(f).revisionId, document: documentV3(), message: 'matrix save' }),
    expect: teamAtLeast('editor', 201),
  },
  'POST /api/worksheets/:worksheetId/evaluate': { body: () => ({ document: documentV3() }), expect: teamAtLeast('viewer', 200) },
  'GET /api/revisions/:revisionId': { expect: teamAtLeast('viewer', 200) },
  'POST /api/revisions/:revisionId/recheck': { expect: teamAtLeast('viewer', 200) },
  // Forking into the same team: readers of the source pass the route, the target needs an editor.
  'POST /api/revisions/:revisionId/fork': { body: (f) => ({ teamId: f.teamId }), expect: teamAtLeast('editor', 201) },
  'GET /api/compare': { query: (f) => `?from=${ws(f).firstRevisionId}&to=${ws(f).revisionId}`, expect: teamAtLeast('reviewer', 200) },
  // The matrix sends JSON, not a file: callers who may upload get 400 no_file, the rest are refused first.
  'POST /api/teams/:teamId/datasets': { expect: teamAtLeast('editor', 400) },
  'GET /api/teams/:teamId/datasets': { expect: teamAtLeast('viewer', 200) },
  'GET /api/teams/:teamId/datasets/:datasetId': { expect: teamAtLeast('viewer', 200) },
  'POST /api/revisions/:revisionId/links': { expect: teamAtLeast('owner', 201) },
  'GET /api/worksheets/:worksheetId/links': { expect: teamAtLeast('owner', 200) },
  'POST /api/links/:linkId/revoke': { expect: teamAtLeast('owner', 200) },
  'GET /api/public/:token': { expect: everyone(200) },
  'POST /api/revisions/:revisionId/review-requests': { body: (f) => ({ reviewerId: ws(f).reviewerId }), expect: teamAtLeast('editor', 201) },
  'GET /api/revisions/:revisionId/reviews': { expect: teamAtLeast('viewer', 200) },
  'POST /api/revisions/:revisionId/reviews': { body: () => ({ verdict: 'approved', comment: 'Checked in the matrix.' }), expect: teamAtLeast('reviewer', 201) },
  'GET /api/review-requests': { expect: anySignedIn(200) },
  'GET /api/teams/:teamId/audit': { expect: teamAtLeast('owner', 200) },
};

const datasetBytes = new TextEncoder().encode('run,deviation\n1,2.1\n2,1.8\n3,2.4\n4,2.0\n5,1.7\n');

let prepared: { first: ReturnType<typeof prepareDocument>; second: ReturnType<typeof prepareDocument>; results: [string, string]; parsed: unknown } | undefined;

async function fixtureContent() {
  if (prepared) return prepared;
  const first = prepareDocument(boreDocument({ title: 'Matrix worksheet', levels: [0.95] }));
  const second = prepareDocument(boreDocument({ title: 'Matrix worksheet', levels: [0.95, 0.99] }));
  const results: [string, string] = [canonicalJson(evaluate(first.document)), canonicalJson(evaluate(second.document))];
  const { table } = await readTable(datasetBytes, 'text/csv');
  prepared = { first, second, results, parsed: parsedInfo(table) };
  return prepared;
}

/** Adds the worksheet-service objects to a matrix fixture team; returns the path values. */
export async function addWorksheetFixture(db: Database, fixture: MatrixFixture): Promise<WorksheetMatrixValues> {
  const content = await fixtureContent();
  const people = await db.select({ id: users.id, email: users.email }).from(users).where(inArray(users.email, [fixture.emails.reviewer]));
  const reviewerId = people[0].id;
  const author = fixture.targetUserId;
  const datasetId = sha256Hex(datasetBytes);
  await db
    .insert(datasets)
    .values({ id: datasetId, mediaType: 'text/csv', byteSize: datasetBytes.length, bytes: Buffer.from(datasetBytes), parsed: content.parsed })
    .onConflictDoNothing();
  await db.insert(teamDatasets).values({ teamId: fixture.teamId, datasetId, name: 'matrix.csv', uploadedBy: author });

  const [w] = await db.insert(worksheets).values({ teamId: fixture.teamId, title: 'Matrix worksheet', createdBy: author }).returning({ id: worksheets.id });
  const row = (number: number, parentId: string | null, p: ReturnType<typeof prepareDocument>, results: string) => ({
    worksheetId: w.id,
    number,
    parentId,
    authorId: author,
    message: `matrix revision ${number}`,
    content: p.content,
    contentHash: p.contentHash,
    engineVersion: ENGINE_VERSION,
    results,
    resultsHash: sha256Hex(results),
  });
  const [r1] = await db.insert(revisions).values(row(1, null, content.first, content.results[0])).returning({ id: revisions.id });
  const [r2] = await db.insert(revisions).values(row(2, r1.id, content.second, content.results[1])).returning({ id: revisions.id });
  await db.update(worksheets).set({ headRevisionId: r2.id }).where(eq(worksheets.id, w.id));
  const token = sha256Hex(`${w.id}:matrix`).slice(0, 43).replace(/[^A-Za-z0-9_-]/g, 'x');
  const [link] = await db.insert(publishedLinks).values({ revisionId: r2.id, tokenHash: tokenHash(token), createdBy: author }).returning({ id: publishedLinks.id });
  return { worksheetId: w.id, revisionId: r2.id, firstRevisionId: r1.id, linkId: link.id, datasetId, token, reviewerId };
}

/** Path parameters the worksheet routes use, for the matrix's path filler. */
export function worksheetPathValues(values: WorksheetMatrixValues): Record<string, string> {
  return { worksheetId: values.worksheetId, revisionId: values.revisionId, linkId: values.linkId, datasetId: values.datasetId, token: values.token };
}
