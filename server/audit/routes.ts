// A team's audit trail, for its owners.
import { and, desc, eq, sql, type SQL } from 'drizzle-orm';
import { z } from 'zod';
import { auditQuery, type AuditEvent } from '@shared/api/worksheets';
import { auditEvents, users } from '../../schema/index';
import { ApiRouter, requireTeamRole, type RouterDeps } from '../http/route';

export function auditRoutes(deps: RouterDeps): ApiRouter {
  return new ApiRouter('/api/teams/:teamId/audit', deps).get(
    '/',
    { access: requireTeamRole('owner'), summary: "The team's audit trail, newest first", params: z.object({ teamId: z.uuid() }), query: auditQuery },
    async ({ res, db, team, query }) => {
      const conditions: SQL[] = [eq(auditEvents.teamId, team.id)];
      if (query.action) conditions.push(eq(auditEvents.action, query.action));
      if (query.objectType) conditions.push(eq(auditEvents.objectType, query.objectType));
      const where = and(...conditions);
      const rows = await db
        .select({
          id: auditEvents.id,
          at: auditEvents.createdAt,
          actorId: auditEvents.actorId,
          actorName: users.name,
          action: auditEvents.action,
          objectType: auditEvents.objectType,
          objectId: auditEvents.objectId,
          worksheetId: auditEvents.worksheetId,
          details: auditEvents.details,
        })
        .from(auditEvents)
        .leftJoin(users, eq(users.id, auditEvents.actorId))
        .where(where)
        .orderBy(desc(auditEvents.id))
        .limit(query.pageSize)
        .offset((query.page - 1) * query.pageSize);
      const [{ total }] = await db.select({ total: sql<number>`count(*)::int` }).from(auditEvents).where(where);
      const items: AuditEvent[] = rows.map((r) => ({
        id: String(r.id),
        at: r.at.toISOString(),
        actor: r.actorId ? { id: r.actorId, name: r.actorName ?? '' } : null,
        action: r.action,
        objectType: r.objectType,
        objectId: r.objectId,
        worksheetId: r.worksheetId,
        details: (r.details ?? {}) as Record<string, unknown>,
      }));
      res.json({ items, total, page: query.page, pageSize: query.pageSize });
    },
  );
}
