// Worksheets: list, create (blank, from an example, import), get, archive, restore, export.
import { sendJson } from '../http/raw-json';
import { and, asc, desc, eq, ilike, isNotNull, isNull, sql, type SQL } from 'drizzle-orm';
import { z } from 'zod';
import {
  createWorksheetRequest,
  exportQuery,
  listWorksheetsQuery,
  type WorksheetExport,
} from '@shared/api/worksheets';
import { sha256Hex } from '@shared/engine/hash';
import { WORKSHEET_FORMAT } from '@shared/format/worksheet';
import { memberships, revisions, worksheets } from '../../schema/index';
import { HttpError, notFound } from '../http/errors';
import { ApiRouter, requireTeamRole, signedIn, type RouterDeps } from '../http/route';
import { recordAudit } from '../audit/audit';
import type { Database } from '../db/client';
import type { Evaluator } from '../evaluation/evaluator';
import { loadDatasetFiles } from '../datasets/store';
import { receiveFile, storeUploadedFile } from '../datasets/ingest';
import { worksheetTeam } from './access';
import { exampleDataFiles, findExample, listExamples } from './examples';
import {
  blankDocument,
  createWorksheet,
  datasetIdsOf,
  evaluatePrepared,
  prepareDocument,
  worksheetSummaries,
  worksheetSummary,
  worksheetWithHead,
  type PreparedDocument,
} from './service';

/** Archives or restores; a no-op (and no audit event) when it already is in that state. */
async function setArchived(db: Database, input: { teamId: string; userId: string; worksheetId: string; archived: boolean }): Promise<void> {
  await db.transaction(async (tx) => {
    const changed = await tx
      .update(worksheets)
      .set({ archivedAt: input.archived ? sql`now()` : null })
      .where(and(eq(worksheets.id, input.worksheetId), input.archived ? isNull(worksheets.archivedAt) : isNotNull(worksheets.archivedAt)))
      .returning({ id: worksheets.id });
    if (changed.length > 0) {
      await recordAudit(tx, {
        teamId: input.teamId,
        actorId: input.userId,
        action: input.archived ? 'worksheet.archive' : 'worksheet.restore',
        objectType: 'worksheet',
        objectId: input.worksheetId,
        worksheetId: input.worksheetId,
      });
    }
  });
}

export interface WorksheetDeps extends RouterDeps {
  evaluator: Evaluator;
}

const teamParams = z.object({ teamId: z.uuid() });
const worksheetParams = z.object({ worksheetId: z.uuid() });

/** Import files may carry their datasets inline (base64), so they get their own, larger limit. */
export const importLimitBytes = 70 * 1024 * 1024;

function slug(title: string): string {
  const s = title
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60);
  return s || 'worksheet';
}

const exportFileSchema = z.object({
  format: z.literal('spreadproof-export'),
  exportVersion: z.literal(1),
  document: z.unknown(),
  contentHash: z.string().optional(),
  datasets: z
    .array(
      z.object({
        id: z.string().regex(/^[0-9a-f]{64}$/),
        name: z.string().min(1).max(260),
        mediaType: z.string().max(200),
        bytesBase64: z.string(),
      }),
    )
    .default([]),
});

export function worksheetRoutes(deps: WorksheetDeps): ApiRouter[] {
  const { evaluator } = deps;

  const examples = new ApiRouter('/api/examples', deps).get(
    '/',
    { access: signedIn, summary: 'Example worksheets to start from' },
    async ({ res }) => {
      res.json({ examples: listExamples().map(({ id, title, description }) => ({ id, title, description })) });
    },
  );

  const byTeam = new ApiRouter('/api/teams/:teamId/worksheets', deps)
    .post(
      '/',
      { access: requireTeamRole('editor'), summary: 'Create a worksheet (blank or from an example)', params: teamParams, body: createWorksheetRequest },
      async ({ res, db, user, team, body }) => {
        let prepared: PreparedDocument;
        let message: string;
        if (body.source === 'blank') {
          prepared = prepareDocument(blankDocument(body.title));
          message = 'Created';
        } else {
          const example = findExample(body.exampleId);
          if (!example) throw notFound(`There is no example "${body.exampleId}".`);
          prepared = prepareDocument(body.title ? { ...example.document, title: body.title } : example.document);
          message = `Created from example ${example.id}`;
          // The example's data files join the team, so its data steps resolve.
          const files = exampleDataFiles();
          for (const id of datasetIdsOf(prepared.document)) {
            const file = files.get(id);
            if (!file) throw new HttpError(500, 'internal', `Example data file ${id} is missing from examples/.`);
            await storeUploadedFile(db, evaluator, { bytes: file.bytes, name: file.name, teamId: team.id, userId: user.id });
          }
        }
        const evaluated = await evaluatePrepared(db, evaluator, team.id, prepared);
        const created = await db.transaction(async (tx) => {
          const ids = await createWorksheet(tx, { teamId: team.id, userId: user.id, prepared, evaluated, message });
          await recordAudit(tx, {
            teamId: team.id,
            actorId: user.id,
            action: 'worksheet.create',
            objectType: 'worksheet',
            objectId: ids.worksheetId,
            worksheetId: ids.worksheetId,
            details: { source: body.source, exampleId: body.source === 'example' ? body.exampleId : undefined, revisionId: ids.revisionId, contentHash: prepared.contentHash },
          });
          return ids;
        });
        sendJson(res, 201, await worksheetWithHead(db, user.id, created.worksheetId));
      },
    )
    .post(
      '/import',
      { access: requireTeamRole('editor'), summary: 'Create a worksheet by importing an exported worksheet file', params: teamParams },
      async ({ req, res, db, user, team }) => {
        let value: unknown;
        if (req.is('multipart/form-data')) {
          const file = await receiveFile(req, res, 'file', importLimitBytes);
          if (!file) throw new HttpError(400, 'no_file', 'Attach the worksheet file in the field "file".');
          try {
            value = JSON.parse(new TextDecoder('utf-8', { fatal: true }).decode(file.buffer));
          } catch {
            throw new HttpError(400, 'bad_import', 'The file is not a worksheet file: it is not valid UTF-8 JSON.');
          }
        } else {
          value = req.body;
        }
        const isExport = typeof value === 'object' && value !== null && (value as { format?: unknown }).format === 'spreadproof-export';
        const isDocument = typeof value === 'object' && value !== null && (value as { format?: unknown }).format === WORKSHEET_FORMAT;
        if (!isExport && !isDocument) {
          throw new HttpError(400, 'bad_import', 'The file is not a Spreadproof worksheet file (its "format" field is missing or unknown).');
        }
        let documentValue: unknown = value;
        let files: { id: string; name: string; bytes: Uint8Array }[] = [];
        if (isExport) {
          const parsed = exportFileSchema.safeParse(value);
          if (!parsed.success) {
            throw new HttpError(400, 'bad_import', 'The worksheet file is damaged: its datasets list is not readable.', parsed.error.issues.map((i) => ({ field: i.path.join('.'), message: i.message })));
          }
          documentValue = parsed.data.document;
          files = parsed.data.datasets.map((d) => ({ id: d.id, name: d.name, bytes: new Uint8Array(Buffer.from(d.bytesBase64, 'base64')) }));
          for (const f of files) {
            if (sha256Hex(f.bytes) !== f.id) {
              throw new HttpError(422, 'dataset_mismatch', `The data file "${f.name}" in the worksheet file does not match its recorded hash; the file was changed.`, [
                { field: 'datasets', message: `${f.name}: bytes do not hash to ${f.id}` },
              ]);
            }
          }
        }
        const prepared = prepareDocument(documentValue);
        for (const f of files) {
          await storeUploadedFile(db, evaluator, { bytes: f.bytes, name: f.name, teamId: team.id, userId: user.id });
        }
        const evaluated = await evaluatePrepared(db, evaluator, team.id, prepared);
        const created = await db.transaction(async (tx) => {
          const ids = await createWorksheet(tx, { teamId: team.id, userId: user.id, prepared, evaluated, message: 'Imported' });
          await recordAudit(tx, {
            teamId: team.id,
            actorId: user.id,
            action: 'worksheet.import',
            objectType: 'worksheet',
            objectId: ids.worksheetId,
            worksheetId: ids.worksheetId,
            details: { revisionId: ids.revisionId, contentHash: prepared.contentHash, datasets: files.map((f) => f.id) },
          });
          return ids;
        });
        sendJson(res, 201, await worksheetWithHead(db, user.id, created.worksheetId));
      },
    );

  const single = new ApiRouter('/api/worksheets', deps)
    .get('/', { access: signedIn, summary: 'Worksheets of my teams: search, team filter, sort, pages', query: listWorksheetsQuery }, async ({ res, db, user, query }) => {
      const conditions: SQL[] = [eq(memberships.userId, user.id)];
      if (query.teamId) {
        const [member] = await db
          .select({ role: memberships.role })
          .from(memberships)
          .where(and(eq(memberships.teamId, query.teamId), eq(memberships.userId, user.id)));
        if (!member) throw notFound();
        conditions.push(eq(worksheets.teamId, query.teamId));
      }
      if (query.q) conditions.push(ilike(worksheets.title, `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`));
      conditions.push(query.archived ? isNotNull(worksheets.archivedAt) : isNull(worksheets.archivedAt));
      const where = and(...conditions);
      const direction = query.order === 'asc' ? asc : desc;
      const sortColumn =
        query.sort === 'title' ? sql`lower(${worksheets.title})` : query.sort === 'created' ? worksheets.createdAt : worksheets.updatedAt;
      const rows = await db
        .select({ id: worksheets.id })
        .from(worksheets)
        .innerJoin(memberships, eq(memberships.teamId, worksheets.teamId))
        .where(where)
        .orderBy(direction(sortColumn), asc(worksheets.id))
        .limit(query.pageSize)
        .offset((query.page - 1) * query.pageSize);
      const [{ total }] = await db
        .select({ total: sql<number>`count(*)::int` })
        .from(worksheets)
        .innerJoin(memberships, eq(memberships.teamId, worksheets.teamId))
        .where(where);
      res.json({ items: await worksheetSummaries(db, user.id, rows.map((r) => r.id)), total, page: query.page, pageSize: query.pageSize });
    })
    .get(
      '/:worksheetId',
      { access: requireTeamRole('viewer', worksheetTeam), summary: 'A worksheet with its head revision and results', params: worksheetParams },
      async ({ res, db, user, team, params }) => {
        sendJson(res, 200, { ...(await worksheetWithHead(db, user.id, params.worksheetId)), myRole: team.role });
      },
    )
    .post(
      '/:worksheetId/archive',
      { access: requireTeamRole('owner', worksheetTeam), summary: 'Archive a worksheet (read-only, hidden from the default list)', params: worksheetParams },
      async ({ res, db, user, team, params }) => {
        await setArchived(db, { teamId: team.id, userId: user.id, worksheetId: params.worksheetId, archived: true });
        res.json({ worksheet: await worksheetSummary(db, user.id, params.worksheetId) });
      },
    )
    .post(
      '/:worksheetId/restore',
      { access: requireTeamRole('owner', worksheetTeam), summary: 'Restore an archived worksheet', params: worksheetParams },
      async ({ res, db, user, team, params }) => {
        await setArchived(db, { teamId: team.id, userId: user.id, worksheetId: params.worksheetId, archived: false });
        res.json({ worksheet: await worksheetSummary(db, user.id, params.worksheetId) });
      },
    )
    .get(
      '/:worksheetId/export',
      { access: requireTeamRole('viewer', worksheetTeam), summary: 'Download a revision (default the head) as a worksheet file', params: worksheetParams, query: exportQuery },
      async ({ res, db, team, params, query }) => {
        const [ws] = await db.select({ head: worksheets.headRevisionId }).from(worksheets).where(eq(worksheets.id, params.worksheetId));
        const revisionId = query.revisionId ?? ws?.head;
        if (!revisionId) throw notFound();
        const [rev] = await db
          .select({ content: revisions.content, contentHash: revisions.contentHash })
          .from(revisions)
          .where(and(eq(revisions.id, revisionId), eq(revisions.worksheetId, params.worksheetId)));
        if (!rev) throw notFound('This worksheet has no such revision.');
        const document = JSON.parse(rev.content);
        const ids = datasetIdsOf(document);
        const files = await loadDatasetFiles(db, team.id, ids);
        const file: WorksheetExport = {
          format: 'spreadproof-export',
          exportVersion: 1,
          contentHash: rev.contentHash,
          document,
          datasets: files.map((f) => ({ id: f.id, name: f.name, mediaType: f.mediaType, bytesBase64: f.bytes.toString('base64') })),
        };
        res.set('Content-Disposition', `attachment; filename="${slug(document.title)}.spreadproof.json"`);
        res.type('application/json').send(JSON.stringify(file, null, 2) + '\n');
      },
    );

  return [examples, byTeam, single];
}

