/**
 * How every API route is declared. A route names its access rule, its input schemas and its
 * response schema; this module wires the rule check, the CSRF check on unsafe methods, input
 * parsing and the JSON answer, and records the route for the OpenAPI document and for the
 * test that proves no route lacks a rule. Handlers receive only parsed values.
 */
import { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi';
import express, { type Request, type RequestHandler, type Response } from 'express';
import { z, type ZodType } from 'zod';
import { errorBodySchema } from '../../shared/errors';
import type { AppContext } from '../context';
import { AppError, fail } from './errors';
import { checkCsrf } from '../middleware/csrf';

export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';
const UNSAFE: ReadonlySet<Method> = new Set(['post', 'put', 'patch', 'delete']);

/** The signed-in user as loaded fresh from the database on every request. */
export interface AuthUser {
  id: number;
  handle: string;
  displayName: string;
  email: string | null;
  avatarUrl: string | null;
  role: 'member' | 'moderator' | 'admin';
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace -- Express's own augmentation point
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type -- merged with AuthUser
    interface User extends AuthUser {}
  }
}

export interface RequestState {
  ctx: AppContext;
  req: Request;
  res: Response;
  user: AuthUser | null;
  /** Values an access rule resolved for the handler, e.g. the project a slug names. */
  locals: Record<string, unknown>;
}

/**
 * An access rule. `check` throws an AppError (401/403/404) or returns; it may put what it
 * loaded into `state.locals`. `name` is what the route table and the OpenAPI document show.
 */
export interface AccessRule {
  name: string;
  /** True when some anonymous requests pass (e.g. reading a published project). */
  allowsAnonymous?: boolean;
  check(state: RequestState): Promise<void> | void;
}

function requireUser(state: RequestState): AuthUser {
  if (!state.user) throw fail.unauthenticated();
  return state.user;
}

export const access = {
  public: { name: 'public', allowsAnonymous: true, check: () => {} },
  signedIn: {
    name: 'signed-in',
    check: (s) => {
      requireUser(s);
    },
  },
  moderator: {
    name: 'moderator',
    check: (s) => {
      const user = requireUser(s);
      if (user.role !== 'moderator' && user.role !== 'admin') throw fail.forbidden('Only moderators can do this.');
    },
  },
  admin: {
    name: 'admin',
    check: (s) => {
      if (requireUser(s).role !== 'admin') throw fail.forbidden('Only admins can do this.');
    },
  },
} satisfies Record<string, AccessRule>;

type Infer<T> = T extends ZodType ? z.output<T> : undefined;

export interface RouteSpec<P extends ZodType | undefined, Q extends ZodType | undefined, B extends ZodType | undefined> {
  summary: string;
  tag: string;
  access: AccessRule;
  params?: P;
  query?: Q;
  body?: B;
  response?: ZodType;
  /** Status of a successful answer (200 by default; 204 sends no body). */
  status?: number;
  /** Only for routes authenticated another way (e.g. a signed link); give the reason. */
  csrfExempt?: string;
  /** Runs before the access rule (rate limits). */
  before?: RequestHandler[];
  /**
   * A streamed request body (multipart uploads): this middleware reads it after the access rule
   * and the CSRF check passed, so a refused request is answered before its body is stored. The
   * route declares no `body` schema; `schema` only documents the form.
   */
  streamBody?: { contentType: string; schema: ZodType; read: RequestHandler };
  /** Non-JSON answers (redirects, files): documented as this media type, handler writes res. */
  produces?: string;
  /**
   * false: served before the session middleware (no cookie lookup, works while the session
   * store is unreachable). Only for public, read-only routes such as health.
   */
  session?: false;
}

export interface RouteInfo {
  method: Method;
  path: string;
  access: string;
  allowsAnonymous: boolean;
  summary: string;
}

export type Handler<P, Q, B> = (
  input: RequestState & { params: P; query: Q; body: B },
) => unknown | Promise<unknown>;

/** Express 5 path (`/projects/:slug`) to OpenAPI path (`/projects/{slug}`). */
function toOpenApiPath(path: string): string {
  return path.replace(/:([A-Za-z0-9_]+)/g, '{$1}');
}

function parseOrThrow<T extends ZodType>(schema: T, value: unknown, where: string): z.output<T> {
  const result = schema.safeParse(value);
  if (!result.success) {
    throw new AppError('validation_failed', `The request ${where} is not valid.`, {
      issues: result.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })),
    });
  }
  return result.data;
}

export class ApiRoutes {
  /** Routes that run after the session and user have been loaded. */
  readonly router = express.Router();
  /** Routes that run before any session work (see RouteSpec.session). */
  readonly bareRouter = express.Router();
  readonly table: RouteInfo[] = [];
  readonly registry = new OpenAPIRegistry();

  constructor(private readonly ctx: AppContext) {}

  get<P extends ZodType | undefined, Q extends ZodType | undefined>(
    path: string,
    spec: RouteSpec<P, Q, undefined>,
    handler: Handler<Infer<P>, Infer<Q>, undefined>,
  ) {
    this.add('get', path, spec, handler);
  }
  post<P extends ZodType | undefined, Q extends ZodType | undefined, B extends ZodType | undefined>(
    path: string,
    spec: RouteSpec<P, Q, B>,
    handler: Handler<Infer<P>, Infer<Q>, Infer<B>>,
  ) {
    this.add('post', path, spec, handler);
  }
  put<P extends ZodType | undefined, Q extends ZodType | undefined, B extends ZodType | undefined>(
    path: string,
    spec: RouteSpec<P, Q, B>,
    handler: Handler<Infer<P>, Infer<Q>, Infer<B>>,
  ) {
    this.add('put', path, spec, handler);
  }
  patch<P extends ZodType | undefined, Q extends ZodType | undefined, B extends ZodType | undefined>(
    path: string,
    spec: RouteSpec<P, Q, B>,
    handler: Handler<Infer<P>, Infer<Q>, Infer<B>>,
  ) {
    this.add('patch', path, spec, handler);
  }
  delete<P extends ZodType | undefined, Q extends ZodType | undefined, B extends ZodType | undefined>(
    path: string,
    spec: RouteSpec<P, Q, B>,
    handler: Handler<Infer<P>, Infer<Q>, Infer<B>>,
  ) {
    this.add('delete', path, spec, handler);
  }

  private add<P extends ZodType | undefined, Q extends ZodType | undefined, B extends ZodType | undefined>(
    method: Method,
    path: string,
    spec: RouteSpec<P, Q, B>,
    handler: Handler<Infer<P>, Infer<Q>, Infer<B>>,
  ) {
    if (!spec.access) throw new Error(`${method.toUpperCase()} ${path} has no access rule`);
    if (UNSAFE.has(method) && spec.csrfExempt !== undefined && spec.csrfExempt.trim().length < 10) {
      throw new Error(`${method.toUpperCase()} ${path}: a CSRF exemption needs its reason`);
    }
    this.table.push({
      method,
      path,
      access: spec.access.name,
      allowsAnonymous: spec.access.allowsAnonymous === true,
      summary: spec.summary,
    });
    this.document(method, path, spec);
    const ctx = this.ctx;
    const unsafe = UNSAFE.has(method);

    const run: RequestHandler = async (req, res) => {
      const state: RequestState = { ctx, req, res, user: req.user ?? null, locals: {} };
      try {
        await spec.access.check(state);
        if (unsafe && spec.csrfExempt === undefined) checkCsrf(req, ctx.config);
      } catch (error) {
        // Refused before its body was read: close the connection after answering rather than
        // receive the rest of an upload nobody will look at.
        if (spec.streamBody) res.set('Connection', 'close');
        throw error;
      }
      if (spec.streamBody) {
        const read = spec.streamBody.read;
        await new Promise<void>((resolve, reject) => {
          void read(req, res, (error?: unknown) => (error ? reject(error) : resolve()));
        });
      }
      if (unsafe && spec.body && !req.is('application/json')) {
        throw new AppError('unsupported_media_type', 'Send the request body as application/json.');
      }
      const params = spec.params ? parseOrThrow(spec.params, req.params, 'path') : undefined;
      const query = spec.query ? parseOrThrow(spec.query, req.query, 'query') : undefined;
      const body = spec.body ? parseOrThrow(spec.body, req.body ?? {}, 'body') : undefined;
      const result = await handler({ ...state, params, query, body } as RequestState & {
        params: Infer<P>;
        query: Infer<Q>;
        body: Infer<B>;
      });
      if (res.headersSent) return;
      // A handler may pick another status itself (e.g. health's 503); otherwise the declared one.
      const status = res.statusCode !== 200 ? res.statusCode : (spec.status ?? 200);
      if (status === 204 || result === undefined) {
        res.status(status === 200 ? 204 : status).end();
        return;
      }
      // The response schema strips anything a query returned that the contract does not expose.
      res.status(status).json(spec.response ? spec.response.parse(result) : result);
    };
    if (spec.streamBody && spec.body)
      throw new Error(`${method.toUpperCase()} ${path}: a streamed body has no body schema`);
    if (spec.session === false && (unsafe || spec.access.name !== 'public')) {
      throw new Error(`${method.toUpperCase()} ${path}: only public GET routes may skip the session`);
    }
    const target = spec.session === false ? this.bareRouter : this.router;
    target[method](path, ...(spec.before ?? []), run);
  }

  private document(method: Method, path: string, spec: RouteSpec<ZodType | undefined, ZodType | undefined, ZodType | undefined>) {
    const responses: Record<string, { description: string; content?: Record<string, { schema: ZodType }> }> = {};
    const status = String(spec.status ?? 200);
    responses[status] = spec.produces
      ? { description: spec.summary, content: { [spec.produces]: { schema: z.string() } } }
      : spec.response
        ? { description: 'Success', content: { 'application/json': { schema: spec.response } } }
        : { description: 'Success, no body' };
    responses.default = { description: 'Error', content: { 'application/json': { schema: errorBodySchema } } };
    this.registry.registerPath({
      method,
      path: `/api${toOpenApiPath(path)}`,
      summary: spec.summary,
      tags: [spec.tag],
      description: `Access: ${spec.access.name}.${UNSAFE.has(method) && spec.csrfExempt === undefined ? ' Requires the X-CSRF-Token header and a same-origin Origin header.' : ''}`,
      request: {
        ...(spec.params ? { params: spec.params as z.ZodObject } : {}),
        ...(spec.query ? { query: spec.query as z.ZodObject } : {}),
        ...(spec.body ? { body: { content: { 'application/json': { schema: spec.body } }, required: true } } : {}),
        ...(spec.streamBody
          ? { body: { content: { [spec.streamBody.contentType]: { schema: spec.streamBody.schema } }, required: true } }
          : {}),
      },
      responses,
    });
  }
}
