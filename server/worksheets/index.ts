// Every router of the worksheet service, for server/app.ts to mount.
import type { AnswerCache } from '../http/answer-cache';
import type { RouterDeps, ApiRouter } from '../http/route';
import { auditRoutes } from '../audit/routes';
import { compareRoutes } from '../compare/routes';
import { datasetRoutes } from '../datasets/routes';
import { Evaluator } from '../evaluation/evaluator';
import { publishingRoutes, type PublicRateLimit } from '../publishing/routes';
import { reviewRoutes } from '../reviews/routes';
import { revisionRoutes } from '../revisions/routes';
import { worksheetRoutes } from './routes';

export interface WorksheetServiceDeps extends RouterDeps {
  /** One per app; created on demand when absent (its worker threads start on first evaluation). */
  evaluator?: Evaluator;
  publicRateLimit?: PublicRateLimit;
  /** Published answers kept in memory; server/app.ts serves fresh ones before its other middleware. */
  publishedAnswers?: AnswerCache;
}

export function worksheetServiceRouters(deps: WorksheetServiceDeps): ApiRouter[] {
  const evaluator = deps.evaluator ?? new Evaluator(deps.db);
  const full = { ...deps, evaluator };
  return [
    ...worksheetRoutes(full),
    ...revisionRoutes(full),
    compareRoutes(full),
    datasetRoutes(full),
    ...publishingRoutes(full),
    ...reviewRoutes(full),
    auditRoutes(full),
  ];
}

export { Evaluator };
