/**
 * The one way to declare an API route. Each route states who may call it (`access`) and, optionally,
 * zod schemas for its params, query and body; `ApiRouter` wires authentication, team-role
 * authorization and validation in a fixed order and records the route in the registry that the
 * authorization-matrix test walks.
 *
 * Order for every request: signed in? (401) → team resolved and member? (404) → role enough? (403)
 * → params (404) → query and body (400) → handler.
 */
import express, { type Request, type RequestHandler, type Response } from 'express';
import { and, eq } from 'drizzle-orm';
import { z } from 'zod';
import { memberships } from '../../schema/index';
import type { User } from '@shared/api/auth';
import { type TeamRole } from '@shared/api/teams';
import type { Database } from '../db/client';
import type { Logger } from '../log';
import type { RateLimitStores } from './rate-limit-store';
import { forbidden, notFound, unauthorized, validationError } from './errors';
import { roleAtLeast } from '../teams/roles';

/** Finds the team a request is about, or null when there is none (answered 404). */
export type TeamResolver = (req: Request, db: Database) => Promise<string | null>;

export type Access =
  | { readonly kind: 'public' }
  | { readonly kind: 'signed-in' }
  | { readonly kind: 'team'; readonly role: TeamRole; readonly resolve: TeamResolver; readonly from: string };

/** Anyone, signed in or not. */
export const publicRoute = { kind: 'public' } as const satisfies Access;
/** Any signed-in user. */
export const signedIn = { kind: 'signed-in' } as const satisfies Access;

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
export const isUuid = (value: unknown): value is string => typeof value === 'string' && uuidPattern.test(value);

/** The team is named by a route parameter (default `:teamId`). */
export function teamFromParam(param = 'teamId'): { resolve: TeamResolver; from: string } {
  return {
    from: `:${param}`,
    resolve: async (req) => {
      const value = req.params[param];
      return isUuid(value) ? value : null;
    },
  };
}

/**
 * A member of the team with at least `role`. The team comes from `:teamId` unless another resolver
 * is given, for example one that looks up the team of `:worksheetId`:
 *
 *     requireTeamRole('editor', { from: ':worksheetId', resolve: async (req, db) => ... })
 */
export function requireTeamRole(
  role: TeamRole,
  team: { resolve: TeamResolver; from: string } = teamFromParam(),
): Extract<Access, { kind: 'team' }> {
  return { kind: 'team', role, resolve: team.resolve, from: team.from };
}

export interface RouteDefinition {
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** Full Express path, e.g. `/api/teams/:teamId/members`. */
  path: string;
  access: Access;
  summary: string;
}

/** What a route's handler receives. `user` and `team` are typed after the route's access. */
export interface RouteContext<A extends Access, B, P, Q> {
  req: Request;
  res: Response;
  db: Database;
  log: Logger;
  user: A extends { kind: 'public' } ? User | null : User;
  team: A extends { kind: 'team' } ? { id: string; role: TeamRole } : undefined;
  body: B;
  params: P;
  query: Q;
}

type Schema = z.ZodType | undefined;
type Out<S extends Schema, Fallback> = S extends z.ZodType ? z.output<S> : Fallback;

export interface RouteSpec<A extends Access, B extends Schema, P extends Schema, Q extends Schema> {
  access: A;
  /** One line for the registry and DEVELOPERS.md tables. */
  summary: string;
  body?: B;
  params?: P;
  query?: Q;
  /** Middleware that runs before everything else (for example a rate limiter). */
  before?: RequestHandler[];
}

export interface RouterDeps {
  db: Database;
  logger: Logger;
  /** Shared (PostgreSQL) counters for the routers' rate limiters; absent → per-process memory. */
  rateLimitStores?: RateLimitStores;
}

type Method = RouteDefinition['method'];

export class ApiRouter {
  readonly router = express.Router({ mergeParams: true });
  readonly definitions: RouteDefinition[] = [];

  /** @param mountPath where the router is mounted, e.g. `/api/teams`. */
  constructor(
    readonly mountPath: string,
    private readonly deps: RouterDeps,
  ) {}

  get<A extends Access, P extends Schema = undefined, Q extends Schema = undefined>(
    path: string,
    spec: RouteSpec<A, undefined, P, Q>,
    handler: (ctx: RouteContext<A, undefined, Out<P, Record<string, string>>, Out<Q, Record<string, unknown>>>) => unknown,
  ): this {
    return this.add('GET', path, spec, handler);
  }

  post<A extends Access, B extends Schema = undefined, P extends Schema = undefined, Q extends Schema = undefined>(
    path: string,
    spec: RouteSpec<A, B, P, Q>,
    handler: (ctx: RouteContext<A, Out<B, unknown>, Out<P, Record<string, string>>, Out<Q, Record<string, unknown>>>) => unknown,
  ): this {
    return this.add('POST', path, spec, handler);
  }

  put<A extends Access, B extends Schema = undefined, P extends Schema = undefined, Q extends Schema = undefined>(
    path: string,
    spec: RouteSpec<A, B, P, Q>,
    handler: (ctx: RouteContext<A, Out<B, unknown>, Out<P, Record<string, string>>, Out<Q, Record<string, unknown>>>) => unknown,
  ): this {
    return this.add('PUT', path, spec, handler);
  }

  patch<A extends Access, B extends Schema = undefined, P extends Schema = undefined, Q extends Schema = undefined>(
    path: string,
    spec: RouteSpec<A, B, P, Q>,
    handler: (ctx: RouteContext<A, Out<B, unknown>, Out<P, Record<string, string>>, Out<Q, Record<string, unknown>>>) => unknown,
  ): this {
    return this.add('PATCH', path, spec, handler);
  }

  delete<A extends Access, P extends Schema = undefined, Q extends Schema = undefined>(
    path: string,
    spec: RouteSpec<A, undefined, P, Q>,
    handler: (ctx: RouteContext<A, undefined, Out<P, Record<string, string>>, Out<Q, Record<string, unknown>>>) => unknown,
  ): this {
    return this.add('DELETE', path, spec, handler);
  }

  private add(
    method: Method,
    path: string,
    spec: RouteSpec<Access, Schema, Schema, Schema>,
    // The public overloads give handlers their precise types; here one loose signature suffices.
    handler: (ctx: any) => unknown,
  ): this {
    const fullPath = path === '/' ? this.mountPath : `${this.mountPath}${path}`;
    this.definitions.push({ method, path: fullPath, access: spec.access, summary: spec.summary });
    const { db, logger } = this.deps;

    const run: RequestHandler = async (req, res) => {
      const user = (req.user as User | undefined) ?? null;
      const access = spec.access;
      if (access.kind !== 'public' && !user) throw unauthorized();

      let team: { id: string; role: TeamRole } | undefined;
      if (access.kind === 'team') {
        const teamId = await access.resolve(req, db);
        if (!teamId) throw notFound();
        const [membership] = await db
          .select({ role: memberships.role })
          .from(memberships)
          .where(and(eq(memberships.teamId, teamId), eq(memberships.userId, user!.id)));
        // A non-member learns nothing, not even that the team exists.
        if (!membership) throw notFound();
        if (!roleAtLeast(membership.role, access.role)) {
          throw forbidden(`This needs the ${access.role} role or higher; you are ${membership.role}.`);
        }
        team = { id: teamId, role: membership.role };
      }

      const params = parse(spec.params, req.params, 'params');
      const query = parse(spec.query, req.query, 'query');
      const body = parse(spec.body, req.body ?? {}, 'body');

      await handler({ req, res, db, log: logger, user, team, body, params, query });
    };
    this.router[method.toLowerCase() as Lowercase<Method>](path, ...(spec.before ?? []), run);
    return this;
  }
}

function parse(schema: Schema, value: unknown, where: 'params' | 'query' | 'body'): unknown {
  if (!schema) return value;
  const result = schema.safeParse(value);
  if (result.success) return result.data;
  // A malformed id in the path names no object.
  if (where === 'params') throw notFound();
  throw validationError(result.error, where);
}

/**
 * Fails when a route was added to an ApiRouter's Express router directly (`router.router.get(…)`),
 * bypassing the access rule and the registry: every layer must be one that `add()` created.
 */
export function assertAllDeclared(apiRouter: ApiRouter): void {
  const layers = apiRouter.router.stack;
  const routeLayers = layers.filter((layer) => layer.route);
  if (routeLayers.length !== layers.length || routeLayers.length !== apiRouter.definitions.length) {
    throw new Error(
      `${apiRouter.mountPath}: ${layers.length} Express layer(s) but ${apiRouter.definitions.length} declared route(s). ` +
        'Declare every API route with ApiRouter.get/post/put/patch/delete so it has an access rule and joins the registry.',
    );
  }
}

/** Route definitions are kept on the app so tests and tools can list them. */
export function routeRegistry(app: express.Express): readonly RouteDefinition[] {
  return (app.locals.routeRegistry as RouteDefinition[] | undefined) ?? [];
}
