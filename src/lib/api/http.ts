/**
 * The one wrapper every API route goes through: authenticate, validate
 * params and body with zod, authorize against the caller's role in the
 * project that owns the resource, and turn every failure into
 * `{ error: { code, message } }` with the right status. Routes hold no
 * copy-pasted checks; a thrown ApiError is the only way out besides data.
 */
import { z } from 'zod';
import { getSessionUser, type SessionUser } from '../auth';
import { getDb, type Db } from '../db';
import { resolveScope, type Permission, type Scope, type ScopeType } from './access';
import { ApiError, fail, formatBytes } from './errors';

export { ApiError, fail, formatBytes };

export function json(data: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(data), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...headers },
  });
}

export function errorResponse(e: ApiError, headers: Record<string, string> = {}): Response {
  const error: Record<string, unknown> = { code: e.code, message: e.message };
  if (e.details !== undefined) error.details = e.details;
  return json({ error }, e.status, headers);
}

/** zod issues as one readable sentence: where, what, and the rule broken. */
export function describeZodError(err: z.ZodError): { message: string; details: { path: string; message: string }[] } {
  const details = err.issues.map((i) => ({ path: i.path.length ? i.path.join('.') : '(body)', message: i.message }));
  const message = 'Invalid input: ' + details.map((d) => `${d.path}: ${d.message}`).join('; ') + '.';
  return { message, details };
}

export function parseWith<T extends z.ZodType>(schema: T, value: unknown): z.infer<T> {
  const r = schema.safeParse(value);
  if (!r.success) {
    const { message, details } = describeZodError(r.error);
    throw fail.invalid(message, details);
  }
  return r.data;
}

/**
 * Reads the body, refusing early on Content-Length and again on the bytes
 * actually read. `shown` is the limit the caller names to people (e.g. the
 * file limit, when `limit` adds room for the envelope around the file).
 */
export async function readBodyLimited(request: Request, limit: number, shown = limit): Promise<Uint8Array<ArrayBuffer>> {
  const declared = request.headers.get('content-length');
  if (declared !== null && Number(declared) > limit) throw fail.tooLarge(shown);
  if (!request.body) return new Uint8Array();
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => undefined);
      throw fail.tooLarge(shown);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

export const JSON_BODY_LIMIT = 256 * 1024;

export async function readJson(request: Request, limit = JSON_BODY_LIMIT, shown = limit): Promise<unknown> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^application\/json\b/i.test(type)) {
    throw new ApiError(415, 'unsupported_media_type', 'Send the body as JSON with "Content-Type: application/json".');
  }
  const bytes = await readBodyLimited(request, limit, shown);
  const text = new TextDecoder().decode(bytes);
  if (text.trim() === '') throw new ApiError(400, 'invalid_json', 'The request body is empty; send a JSON object.');
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new ApiError(400, 'invalid_json', `The request body is not valid JSON (${(e as Error).message}).`);
  }
}

export interface RouteContext<P, B> {
  request: Request;
  url: URL;
  params: P;
  body: B;
  user: SessionUser;
  db: Db;
  scope: Scope;
}

interface RouteOptions<P extends z.ZodType, B extends z.ZodType | undefined> {
  params?: P;
  /** A zod schema for a JSON body. Omit to leave the body unread (uploads read it themselves). */
  body?: B;
  /** The resource named by params.id (or `scopeParam`) and the permission needed on its project. */
  scope?: { type: ScopeType; need: Permission; param?: string };
  bodyLimit?: number;
}

/** The minimum of Astro's APIContext we use, so tests can call routes directly. */
export interface MinimalContext {
  request: Request;
  params: Record<string, string | undefined>;
}

const NO_SCOPE: Scope = { type: 'none', projectId: null, role: null };

export function route<P extends z.ZodType = z.ZodObject<{}>, B extends z.ZodType | undefined = undefined>(
  options: RouteOptions<P, B>,
  handler: (ctx: RouteContext<z.infer<P>, B extends z.ZodType ? z.infer<B> : undefined>) => Promise<Response | unknown>,
) {
  return async (context: MinimalContext): Promise<Response> => {
    try {
      const user = await getSessionUser(context.request.headers);
      if (!user) throw fail.unauthenticated();
      const params = parseWith(options.params ?? z.object({}), context.params ?? {}) as z.infer<P>;
      const db = await getDb();
      let scope = NO_SCOPE;
      if (options.scope) {
        const id = (params as Record<string, string>)[options.scope.param ?? 'id'];
        scope = await resolveScope(db, options.scope.type, id, user.id, options.scope.need);
      }
      const body = options.body ? parseWith(options.body, await readJson(context.request, options.bodyLimit)) : undefined;
      const out = await handler({
        request: context.request,
        url: new URL(context.request.url),
        params,
        body: body as B extends z.ZodType ? z.infer<B> : undefined,
        user,
        db,
        scope,
      });
      return out instanceof Response ? out : json(out);
    } catch (e) {
      if (e instanceof ApiError) return errorResponse(e);
      // Constraint races (two writers) are conflicts, not crashes.
      const msg = String((e as { message?: string })?.message ?? e);
      if (/UNIQUE constraint failed/i.test(msg)) {
        return errorResponse(fail.conflict('That conflicts with an existing record; reload and try again.'));
      }
      console.error('[api]', e);
      return errorResponse(new ApiError(500, 'internal', 'Something went wrong on the server; the error was logged.'));
    }
  };
}

/** Answers every method a route file does not export (Astro's `ALL`), in JSON like other errors. */
export function allow(...methods: string[]) {
  return methodNotAllowed(methods, `This path accepts ${methods.join(', ')} only.`);
}

/** For methods a resource does not allow (revisions are immutable). */
export function methodNotAllowed(allow: string[], message: string) {
  return async (): Promise<Response> => errorResponse(new ApiError(405, 'method_not_allowed', message), { allow: allow.join(', ') });
}

export const idParam = z.string().trim().min(1, 'must not be empty').max(100, 'is too long');
export const idParams = z.object({ id: idParam });
