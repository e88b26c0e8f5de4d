// Compare any two revisions (of one worksheet, or a fork and its origin) the caller may review.
import { and, eq } from 'drizzle-orm';
import { compareQuery, type CompareAnswer } from '@shared/api/worksheets';
import { compareRevisions, type TableLike } from '@shared/compare/compare';
import type { Worksheet } from '@shared/format/worksheet';
import { memberships, revisions, worksheets } from '../../schema/index';
import { HttpError, notFound } from '../http/errors';
import { ApiRouter, isUuid, requireTeamRole, type RouterDeps, type TeamResolver } from '../http/route';
import { roleAtLeast } from '../teams/roles';
import type { Evaluator } from '../evaluation/evaluator';
import { datasetIdsOf, revisionSummaries } from '../worksheets/service';
import { availableDatasets } from '../datasets/store';



/** The team of the `from` revision; the `to` revision's team is checked in the handler. */
const fromRevisionTeam: { from: string; resolve: TeamResolver } = {
  from: '?from',
  resolve: async (req, db) => {
    const id = req.query.from;
    if (!isUuid(id)) return null;
    const [row] = await db
      .select({ teamId: worksheets.teamId })
      .from(revisions)
      .innerJoin(worksheets, eq(worksheets.id, revisions.worksheetId))
      .where(eq(revisions.id, id));
    return row?.teamId ?? null;
  },
};

export function compareRoutes(deps: RouterDeps & { evaluator: Evaluator }): ApiRouter {
  return new ApiRouter('/api/compare', deps).get(
    '/',
    { access: requireTeamRole('reviewer', fromRevisionTeam), summary: 'Compare two revisions (?from=&to=): steps, data, results, flipped conclusions', query: compareQuery },
    async ({ res, db, user, team, query }) => {
      const params = { fromRevisionId: query.from, toRevisionId: query.to };
      const rows = await db
        .select({ id: revisions.id, content: revisions.content, results: revisions.results, contentHash: revisions.contentHash, teamId: worksheets.teamId })
        .from(revisions)
        .innerJoin(worksheets, eq(worksheets.id, revisions.worksheetId))
        .where(eq(revisions.id, params.toRevisionId));
      const to = rows[0];
      if (!to) throw notFound();
      if (to.teamId !== team.id) {
        const [member] = await db
          .select({ role: memberships.role })
          .from(memberships)
          .where(and(eq(memberships.teamId, to.teamId), eq(memberships.userId, user.id)));
        if (!member) throw notFound();
        if (!roleAtLeast(member.role, 'reviewer')) {
          throw new HttpError(403, 'forbidden', `Comparing needs the reviewer role or higher in both teams; you are ${member.role} in the team of the second revision.`);
        }
      }
      const [from] = await db
        .select({ id: revisions.id, content: revisions.content, results: revisions.results, contentHash: revisions.contentHash })
        .from(revisions)
        .where(eq(revisions.id, params.fromRevisionId));
      if (!from) throw notFound();

      const fromDoc = JSON.parse(from.content) as Worksheet;
      const toDoc = JSON.parse(to.content) as Worksheet;
      // Uploaded tables are read (cached) only when the two revisions use different ones.
      const tables: Record<string, TableLike> = {};
      const fromIds = datasetIdsOf(fromDoc);
      const toIds = datasetIdsOf(toDoc);
      const differing = [...new Set([...fromIds, ...toIds])].filter((id) => !(fromIds.includes(id) && toIds.includes(id)));
      if (differing.length > 0) {
        const readable = new Set([...(await availableDatasets(db, team.id, differing)), ...(await availableDatasets(db, to.teamId, differing))]);
        for (const id of differing) {
          if (!readable.has(id)) continue;
          const table = await deps.evaluator.table(id);
          if (table) tables[id] = table;
        }
      }
      const comparison = compareRevisions(
        { document: fromDoc, results: JSON.parse(from.results), contentHash: from.contentHash },
        { document: toDoc, results: JSON.parse(to.results), contentHash: to.contentHash },
        { datasets: tables },
      );
      const summaries = await revisionSummaries(db, [from.id, to.id]);
      const answer: CompareAnswer = { from: summaries.get(from.id)!, to: summaries.get(to.id)!, comparison };
      res.json(answer);
    },
  );
}
