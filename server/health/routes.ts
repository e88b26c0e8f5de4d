import { sql } from 'drizzle-orm';
import { ApiRouter, publicRoute, type RouterDeps } from '../http/route';

export function healthRoutes(deps: RouterDeps): ApiRouter {
  return new ApiRouter('/api/health', deps).get(
    '/',
    { access: publicRoute, summary: 'Liveness: the server answers and reaches its database' },
    async ({ res, db }) => {
      await db.execute(sql`select 1`);
      res.json({ ok: true });
    },
  );
}
