// Uploads: CSV, TSV and XLSX files, stored once by the SHA-256 of their bytes, visible to the
// teams that uploaded them.
import { z } from 'zod';
import { datasetRowsQuery, pageQuery, type DatasetRowsAnswer, type UploadAnswer } from '@shared/api/worksheets';
import { recordAudit } from '../audit/audit';
import { HttpError, notFound } from '../http/errors';
import { ApiRouter, requireTeamRole, type RouterDeps } from '../http/route';
import type { Evaluator } from '../evaluation/evaluator';
import { receiveFile, storeUploadedFile } from './ingest';
import { MAX_UPLOAD_BYTES } from './parse';
import { findTeamDataset, listTeamDatasets } from './store';

const teamParams = z.object({ teamId: z.uuid() });
const datasetParams = z.object({ teamId: z.uuid(), datasetId: z.string().regex(/^[0-9a-f]{64}$/) });

export function datasetRoutes(deps: RouterDeps & { evaluator: Evaluator }): ApiRouter {
  return new ApiRouter('/api/teams/:teamId/datasets', deps)
    .post(
      '/',
      { access: requireTeamRole('editor'), summary: 'Upload a CSV, TSV or XLSX file (≤ 50 MB, ≤ 2,000,000 rows)', params: teamParams },
      async ({ req, res, db, user, team }) => {
        const file = await receiveFile(req, res, 'file', MAX_UPLOAD_BYTES);
        if (!file) throw new HttpError(400, 'no_file', 'Attach the file in the field "file".');
        const name = file.originalname;
        const stored = await storeUploadedFile(db, deps.evaluator, { bytes: new Uint8Array(file.buffer), name, teamId: team.id, userId: user.id });
        await recordAudit(db, {
          teamId: team.id,
          actorId: user.id,
          action: 'dataset.upload',
          objectType: 'dataset',
          objectId: stored.id,
          details: { name, byteSize: file.size, deduplicated: stored.deduplicated },
        });
        const dataset = await findTeamDataset(db, team.id, stored.id);
        const answer: UploadAnswer = { dataset: dataset!, deduplicated: stored.deduplicated };
        res.status(stored.deduplicated ? 200 : 201).json(answer);
      },
    )
    .get(
      '/',
      { access: requireTeamRole('viewer'), summary: "The team's uploaded datasets", params: teamParams, query: pageQuery },
      async ({ res, db, team, query }) => {
        const page = await listTeamDatasets(db, team.id, query.page, query.pageSize);
        res.json({ ...page, page: query.page, pageSize: query.pageSize });
      },
    )
    .get(
      '/:datasetId',
      { access: requireTeamRole('viewer'), summary: 'A dataset with one page of its rows', params: datasetParams, query: datasetRowsQuery },
      async ({ res, db, team, params, query }) => {
        const dataset = await findTeamDataset(db, team.id, params.datasetId);
        if (!dataset) throw notFound();
        const table = await deps.evaluator.table(params.datasetId);
        if (!table) throw notFound();
        const end = Math.min(table.rowCount, query.offset + query.limit);
        const values: (number | string | null)[][] = [];
        for (let r = query.offset; r < end; r++) {
          values.push(
            table.columns.map((c) => {
              const v = c.values[r];
              if (c.type === 'number') return Number.isNaN(v as number) ? null : (v as number);
              return v === '' ? null : (v as string);
            }),
          );
        }
        const answer: DatasetRowsAnswer = { dataset, rows: { offset: query.offset, limit: query.limit, values } };
        res.json(answer);
      },
    );
}
