import 'server-only';
import { NextResponse, type NextRequest } from 'next/server';
import { z } from 'zod';
import { ApiError, type ApiIssue } from '@/lib/api/errors';
import { asSentenceEnd, BodyTooLarge, crossSiteRefusal, isJsonContentType, readLimitedBody } from '@/lib/api/request-guard';
import { getRequestUser, type CurrentUser } from '@/lib/auth/session';
import type { Role } from '@/lib/auth/roles';
import { env } from '@/lib/env';
import { lockRefusal } from '@/lib/reports/lock';

type Schema = z.ZodType;
type Infer<S> = S extends z.ZodType ? z.infer<S> : undefined;

export type RouteContext<P, Q, B> = { req: NextRequest; user: CurrentUser; params: P; query: Q; body: B };

type Options<P extends Schema | undefined, Q extends Schema | undefined, B extends Schema | undefined> = {
  roles: readonly Role[];
  params?: P;
  query?: Q;
  body?: B;
};

/** What a wrapped handler checks, kept on it as `spec`: the role matrix and the bad-input corpus read it (tests/support/routes.ts). */
export type RouteSpec = { roles: readonly Role[]; params?: Schema; query?: Schema; body?: Schema };

export function zodIssues(error: z.ZodError): ApiIssue[] {
  return error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
}

/** Bodies below this go out uncompressed: gzip of a 100-byte acknowledgement costs more than it saves. */
const COMPRESS_FROM_BYTES = 1024;

/**
 * A JSON response that no cache keeps (answers are per user). Small bodies carry
 * no-transform, which the server's gzip honours (it does not see the length, so its own
 * size threshold never applies to route handlers).
 */
export function jsonResponse(value: unknown, status = 200): NextResponse {
  const body = JSON.stringify(value);
  const small = body.length < COMPRESS_FROM_BYTES;
  return new NextResponse(body, { status, headers: { 'content-type': 'application/json', 'cache-control': small ? 'no-store, no-transform' : 'no-store' } });
}

export function errorResponse(err: ApiError): NextResponse {
  return jsonResponse({ error: { code: err.code, message: err.message, ...(err.issues ? { issues: err.issues } : {}) } }, err.status);
}

function parse<S extends Schema>(schema: S, value: unknown, where: string): z.infer<S> {
  const r = schema.safeParse(value);
  if (!r.success) {
    const issues = zodIssues(r.error);
    const first = issues[0];
    const label = first?.path ? `${first.path}: ` : '';
    throw new ApiError(422, 'invalid_input', `The ${where} is not valid — ${label}${asSentenceEnd(first?.message ?? 'check the values')}`, issues);
  }
  return r.data;
}

let appOrigin: string | undefined;
const ownOrigin = () => (appOrigin ??= new URL(env().APP_URL).origin);

/** Refuses a state-changing request made by another site's page (see crossSiteRefusal). */
export function refuseCrossSite(req: Request): void {
  const why = crossSiteRefusal({ method: req.method, origin: req.headers.get('origin'), secFetchSite: req.headers.get('sec-fetch-site') }, ownOrigin());
  if (why) {
    console.warn('[fieldmark] cross-site request refused', req.method, new URL(req.url).pathname, why);
    throw new ApiError(403, 'cross_site', 'This request came from another site and was refused; nothing was changed. Open Fieldmark at its own address and try again.');
  }
}

/** The raw body within the JSON limit (413 past it, before anything is parsed). */
export async function limitedBody(req: Request): Promise<Uint8Array> {
  const limit = env().JSON_BODY_LIMIT_KB * 1024;
  try {
    return await readLimitedBody(req.body, req.headers.get('content-length'), limit);
  } catch (err) {
    if (err instanceof BodyTooLarge) throw new ApiError(413, 'too_large', `The request is larger than ${env().JSON_BODY_LIMIT_KB} kB; send less at once.`);
    throw err;
  }
}

async function jsonBody(req: Request): Promise<unknown> {
  if (!isJsonContentType(req.headers.get('content-type'))) {
    throw new ApiError(415, 'unsupported_media_type', 'Send the body as JSON, with Content-Type: application/json.');
  }
  const bytes = await limitedBody(req);
  try {
    return JSON.parse(new TextDecoder('utf-8', { fatal: true }).decode(bytes));
  } catch {
    throw new ApiError(400, 'bad_json', 'The request body must be JSON.');
  }
}

/**
 * Every route handler goes through this: a state-changing request from another site's page
 * (403), session (401), role (403), zod checks of params, query and body (422; a body must be
 * application/json, 415, and within JSON_BODY_LIMIT_KB, 413), and error mapping (no stack traces
 * leave the server; the database's refusal of a change to a signed report's collection is 409
 * "signed report").
 */
export function route<P extends Schema | undefined = undefined, Q extends Schema | undefined = undefined, B extends Schema | undefined = undefined>(
  opts: Options<P, Q, B>,
  handler: (ctx: RouteContext<Infer<P>, Infer<Q>, Infer<B>>) => Promise<unknown>,
) {
  const handle = async (req: NextRequest, ctx: { params: Promise<Record<string, string | string[]>> }): Promise<Response> => {
    try {
      refuseCrossSite(req);
      const user = await getRequestUser(req);
      if (!user) throw new ApiError(401, 'unauthenticated', 'Sign in to use this.');
      if (!opts.roles.includes(user.role)) throw new ApiError(403, 'forbidden', 'Your role does not allow this.');
      const params = opts.params ? parse(opts.params, await ctx.params, 'address') : undefined;
      const query = opts.query ? parse(opts.query, Object.fromEntries(req.nextUrl.searchParams), 'query') : undefined;
      const body = opts.body ? parse(opts.body, await jsonBody(req), 'input') : undefined;
      const result = await handler({ req, user, params, query, body } as RouteContext<Infer<P>, Infer<Q>, Infer<B>>);
      if (result instanceof Response) return result;
      return jsonResponse(result ?? { ok: true });
    } catch (err) {
      if (err instanceof ApiError) return errorResponse(err);
      // The database's signed-report lock (one check for every write path): 409, not a 500.
      const locked = lockRefusal(err);
      if (locked) return errorResponse(locked);
      console.error('[fieldmark] route error', req.method, req.nextUrl.pathname, err);
      return errorResponse(new ApiError(500, 'server_error', 'Something went wrong on the server; nothing was changed. Try again, and tell the lab manager if it persists.'));
    }
  };
  const spec: RouteSpec = { roles: opts.roles, params: opts.params, query: opts.query, body: opts.body };
  return Object.assign(handle, { spec });
}
