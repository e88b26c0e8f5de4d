// Revisions: timeline, save (with the moved-head check), draft evaluation, one revision,
// re-check against the current engine, fork into a team.
import { RawJson, sendJson } from '../http/raw-json';
import { and, asc, eq } from 'drizzle-orm';
import { z } from 'zod';
import {
  evaluateDraftRequest,
  forkRequest,
  saveRevisionRequest,
  timelineQuery,
  type EvaluationOutcome,
  type HeadMovedDetails,
  type RecheckAnswer,
} from '@shared/api/worksheets';
import { compareRevisions } from '@shared/compare/compare';
import type { Worksheet } from '@shared/format/worksheet';
import { memberships, revisions, worksheets } from '../../schema/index';
import { recordAudit } from '../audit/audit';
import { shareDatasets } from '../datasets/store';
import { HttpError, notFound } from '../http/errors';
import { ApiRouter, requireTeamRole, type RouterDeps } from '../http/route';
import { roleAtLeast } from '../teams/roles';
import type { Evaluator } from '../evaluation/evaluator';
import { revisionTeam, worksheetTeam } from '../worksheets/access';
import {
  createWorksheet,
  datasetIdsOf,
  evaluatePrepared,
  revisionAnswer,
  insertRevision,
  prepareDocument,
  revisionSummaries,
  timeline,
  worksheetSummary,
  worksheetWithHead,
} from '../worksheets/service';

export interface RevisionDeps extends RouterDeps {
  evaluator: Evaluator;
}

const worksheetParams = z.object({ worksheetId: z.uuid() });
const revisionParams = z.object({ revisionId: z.uuid() });

async function headMoved(db: RouterDeps['db'], baseRevisionId: string, headId: string): Promise<HttpError> {
  const head = (await revisionSummaries(db, [headId])).get(headId)!;
  const [base] = await db.select({ number: revisions.number }).from(revisions).where(eq(revisions.id, baseRevisionId));
  const details: HeadMovedDetails = { baseRevisionId, head };
  return new HttpError(
    409,
    'head_moved',
    `This worksheet has a newer revision (${head.number}, saved by ${head.author.name}) than the one your edit was based on${base ? ` (${base.number})` : ''}. Nothing was saved.`,
    details,
  );
}

export function revisionRoutes(deps: RevisionDeps): ApiRouter[] {
  const { evaluator } = deps;

  const byWorksheet = new ApiRouter('/api/worksheets/:worksheetId', deps)
    .get(
      '/revisions',
      { access: requireTeamRole('viewer', worksheetTeam), summary: 'Timeline of revisions, newest first', params: worksheetParams, query: timelineQuery },
      async ({ res, db, user, params, query }) => {
        const page = await timeline(db, params.worksheetId, query.page, query.pageSize);
        // Forks of any revision of this worksheet, in teams the caller belongs to.
        const forks = await db
          .select({ worksheetId: worksheets.id, title: worksheets.title, teamId: worksheets.teamId, originRevisionId: worksheets.originRevisionId })
          .from(worksheets)
          .innerJoin(revisions, eq(revisions.id, worksheets.originRevisionId))
          .innerJoin(memberships, and(eq(memberships.teamId, worksheets.teamId), eq(memberships.userId, user.id)))
          .where(eq(revisions.worksheetId, params.worksheetId))
          .orderBy(asc(worksheets.createdAt));
        res.json({ ...page, page: query.page, pageSize: query.pageSize, forks });
      },
    )
    .post(
      '/revisions',
      { access: requireTeamRole('editor', worksheetTeam), summary: 'Save a revision based on the current head (409 if the head moved)', params: worksheetParams, body: saveRevisionRequest },
      async ({ res, db, user, team, params, body }) => {
        const [ws] = await db
          .select({ head: worksheets.headRevisionId, archivedAt: worksheets.archivedAt })
          .from(worksheets)
          .where(eq(worksheets.id, params.worksheetId));
        if (!ws) throw notFound();
        const [base] = await db
          .select({ id: revisions.id })
          .from(revisions)
          .where(and(eq(revisions.id, body.baseRevisionId), eq(revisions.worksheetId, params.worksheetId)));
        if (!base) {
          throw new HttpError(422, 'bad_base', 'baseRevisionId is not a revision of this worksheet.', [
            { field: 'baseRevisionId', message: 'Not a revision of this worksheet.' },
          ]);
        }
        if (ws.archivedAt) throw new HttpError(409, 'archived', 'This worksheet is archived and read-only. An owner can restore it.');
        // Cheap early answer before spending an evaluation; the transaction below checks again.
        if (ws.head !== body.baseRevisionId) throw await headMoved(db, body.baseRevisionId, ws.head!);

        const prepared = prepareDocument(body.document);
        const evaluated = await evaluatePrepared(db, evaluator, team.id, prepared);

        const outcome = await db.transaction(async (tx) => {
          // The row lock serialises saves of one worksheet: of two saves from the same base,
          // the second sees the first one's head and stores nothing.
          const [locked] = await tx
            .select({ head: worksheets.headRevisionId, archivedAt: worksheets.archivedAt })
            .from(worksheets)
            .where(eq(worksheets.id, params.worksheetId))
            .for('update');
          if (locked.archivedAt) return { conflict: 'archived' as const };
          if (locked.head !== body.baseRevisionId) return { conflict: 'moved' as const, head: locked.head! };
          const [headRow] = await tx.select({ number: revisions.number }).from(revisions).where(eq(revisions.id, locked.head));
          const revisionId = await insertRevision(tx, {
            worksheetId: params.worksheetId,
            number: headRow.number + 1,
            parentId: body.baseRevisionId,
            authorId: user.id,
            message: body.message,
            prepared,
            evaluated,
          });
          await recordAudit(tx, {
            teamId: team.id,
            actorId: user.id,
            action: 'revision.save',
            objectType: 'revision',
            objectId: revisionId,
            worksheetId: params.worksheetId,
            details: { number: headRow.number + 1, parentId: body.baseRevisionId, contentHash: prepared.contentHash, resultsHash: evaluated.resultsHash },
          });
          return { revisionId };
        });
        if ('conflict' in outcome) {
          if (outcome.conflict === 'archived') throw new HttpError(409, 'archived', 'This worksheet is archived and read-only. An owner can restore it.');
          throw await headMoved(db, body.baseRevisionId, outcome.head!);
        }
        const revision = await revisionAnswer(db, outcome.revisionId);
        sendJson(res, 201, { revision, worksheet: await worksheetSummary(db, user.id, params.worksheetId) });
      },
    )
    .post(
      '/evaluate',
      { access: requireTeamRole('viewer', worksheetTeam), summary: 'Evaluate a draft without saving (live preview)', params: worksheetParams, body: evaluateDraftRequest },
      async ({ res, db, team, body }) => {
        const prepared = prepareDocument(body.document);
        const evaluated = await evaluatePrepared(db, evaluator, team.id, prepared);
        const answer: Omit<EvaluationOutcome, 'results'> & { results: RawJson } = {
          results: new RawJson(evaluated.resultsJson),
          contentHash: prepared.contentHash,
          resultsHash: evaluated.resultsHash,
          engineVersion: evaluated.engineVersion,
          cached: evaluated.cached,
          elapsedMs: evaluated.elapsedMs,
        };
        sendJson(res, 200, answer);
      },
    );

  const single = new ApiRouter('/api/revisions', deps)
    .get(
      '/:revisionId',
      { access: requireTeamRole('viewer', revisionTeam), summary: 'One revision with its document and stored results', params: revisionParams },
      async ({ res, db, user, params }) => {
        const revision = await revisionAnswer(db, params.revisionId);
        if (!revision) throw notFound();
        const worksheet = await worksheetSummary(db, user.id, revision.worksheetId);
        sendJson(res, 200, { revision, worksheet, isHead: worksheet.head.id === revision.id });
      },
    )
    .post(
      '/:revisionId/recheck',
      { access: requireTeamRole('viewer', revisionTeam), summary: 'Re-evaluate a revision with the current engine and report drift', params: revisionParams },
      async ({ res, db, team, params }) => {
        const [row] = await db.select().from(revisions).where(eq(revisions.id, params.revisionId));
        if (!row) throw notFound();
        const prepared = prepareDocument(JSON.parse(row.content));
        // Fresh computation: neither the cache nor the stored row may answer for the engine.
        const fresh = await evaluatePrepared(db, evaluator, team.id, prepared, { useCache: false });
        const matches = fresh.resultsHash === row.resultsHash;
        let changes: RecheckAnswer['changes'] = null;
        if (!matches) {
          const document = prepared.document as Worksheet;
          const c = compareRevisions({ document, results: JSON.parse(row.results) }, { document, results: JSON.parse(fresh.resultsJson) });
          changes = { results: c.results, conclusions: c.conclusions };
        }
        const answer: RecheckAnswer = {
          revisionId: row.id,
          storedEngineVersion: row.engineVersion,
          currentEngineVersion: fresh.engineVersion,
          storedResultsHash: row.resultsHash,
          currentResultsHash: fresh.resultsHash,
          matches,
          changes,
        };
        res.json(answer);
      },
    )
    .post(
      '/:revisionId/fork',
      { access: requireTeamRole('viewer', revisionTeam), summary: 'Fork a revision into a team where I am an editor', params: revisionParams, body: forkRequest },
      async ({ res, db, user, team, params, body }) => {
        // The source needs read access (checked by the route); the target needs editor.
        const [target] = await db
          .select({ role: memberships.role })
          .from(memberships)
          .where(and(eq(memberships.teamId, body.teamId), eq(memberships.userId, user.id)));
        if (!target) throw notFound('There is no such team.');
        if (!roleAtLeast(target.role, 'editor')) {
          throw new HttpError(403, 'forbidden', `Forking into this team needs the editor role or higher; you are ${target.role}.`);
        }
        const [source] = await db
          .select({ content: revisions.content, number: revisions.number, worksheetId: revisions.worksheetId })
          .from(revisions)
          .where(eq(revisions.id, params.revisionId));
        if (!source) throw notFound();
        const sourceDocument = JSON.parse(source.content) as Worksheet;
        const raw = body.document ?? sourceDocument;
        const withTitle = body.title ? { ...(raw as object), title: body.title } : raw;
        const prepared = prepareDocument(withTitle);
        // Datasets the source team holds travel with the fork; others must be the target's own.
        await shareDatasets(db, datasetIdsOf(prepared.document), team.id, body.teamId, user.id);
        const evaluated = await evaluatePrepared(db, evaluator, body.teamId, prepared);
        const message = body.message || `Forked from revision ${source.number}`;
        const created = await db.transaction(async (tx) => {
          const ids = await createWorksheet(tx, { teamId: body.teamId, userId: user.id, prepared, evaluated, message, originRevisionId: params.revisionId });
          await recordAudit(tx, {
            teamId: body.teamId,
            actorId: user.id,
            action: 'worksheet.fork',
            objectType: 'worksheet',
            objectId: ids.worksheetId,
            worksheetId: ids.worksheetId,
            details: { originRevisionId: params.revisionId, originWorksheetId: source.worksheetId, originTeamId: team.id, revisionId: ids.revisionId, contentHash: prepared.contentHash },
          });
          return ids;
        });
        sendJson(res, 201, await worksheetWithHead(db, user.id, created.worksheetId));
      },
    );

  return [byWorksheet, single];
}

