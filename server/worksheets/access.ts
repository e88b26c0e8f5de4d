// Team resolvers for routes that name a worksheet, a revision or a link instead of a team: the
// route registry checks the caller's role in the team that owns the object (404 for non-members).
import { eq } from 'drizzle-orm';
import { publishedLinks, revisions, worksheets } from '../../schema/index';
import { isUuid, type TeamResolver } from '../http/route';

export const worksheetTeam: { from: string; resolve: TeamResolver } = {
  from: ':worksheetId',
  resolve: async (req, db) => {
    const id = req.params.worksheetId;
    if (!isUuid(id)) return null;
    const [row] = await db.select({ teamId: worksheets.teamId }).from(worksheets).where(eq(worksheets.id, id));
    return row?.teamId ?? null;
  },
};

export const revisionTeam: { from: string; resolve: TeamResolver } = {
  from: ':revisionId',
  resolve: async (req, db) => {
    const id = req.params.revisionId;
    if (!isUuid(id)) return null;
    const [row] = await db
      .select({ teamId: worksheets.teamId })
      .from(revisions)
      .innerJoin(worksheets, eq(worksheets.id, revisions.worksheetId))
      .where(eq(revisions.id, id));
    return row?.teamId ?? null;
  },
};

export const linkTeam: { from: string; resolve: TeamResolver } = {
  from: ':linkId',
  resolve: async (req, db) => {
    const id = req.params.linkId;
    if (!isUuid(id)) return null;
    const [row] = await db
      .select({ teamId: worksheets.teamId })
      .from(publishedLinks)
      .innerJoin(revisions, eq(revisions.id, publishedLinks.revisionId))
      .innerJoin(worksheets, eq(worksheets.id, revisions.worksheetId))
      .where(eq(publishedLinks.id, id));
    return row?.teamId ?? null;
  },
};
