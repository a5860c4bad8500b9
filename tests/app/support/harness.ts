/**
 * In-process harness for the API: a fresh temporary SQLite file per test
 * file, real better-auth sessions, and a small router that maps a URL to the
 * route module under src/pages/api exactly as Astro's file routing does.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll } from 'vitest';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'skiplane-test-'));
process.env.DATA_DIR = dir;
process.env.DATABASE_URL = `file:${path.join(dir, 'test.db')}`;
process.env.OUTBOX_DIR = path.join(dir, 'outbox');
process.env.BETTER_AUTH_SECRET = 'test-secret-0123456789abcdef0123456789abcdef';
delete process.env.SMTP_URL;
delete process.env.PUBLIC_ORIGIN;
process.env.HOST = 'localhost';
process.env.PORT = '4321';

afterAll(async () => {
  const { closeDb } = await import('../../../src/lib/db');
  await closeDb();
  fs.rmSync(dir, { recursive: true, force: true });
});

export const ORIGIN = 'http://localhost:4321';
export const tempDir = dir;

type Handler = (ctx: { request: Request; params: Record<string, string>; url: URL }) => Promise<Response> | Response;
type RouteModule = Partial<Record<string, Handler>>;

const modules = import.meta.glob<RouteModule>('../../../src/pages/api/**/*.ts', { eager: true });

interface Compiled {
  file: string;
  regex: RegExp;
  names: string[];
  rank: number;
  mod: RouteModule;
}

const routes: Compiled[] = Object.entries(modules)
  .map(([file, mod]) => {
    const rel = file
      .split('src/pages')[1]
      .replace(/\.ts$/, '')
      .replace(/\/index$/, '');
    const names: string[] = [];
    let rank = 0;
    const pattern = rel
      .split('/')
      .filter(Boolean)
      .map((seg) => {
        const rest = /^\[\.\.\.(\w+)\]$/.exec(seg);
        if (rest) {
          names.push(rest[1]);
          rank += 100;
          return '(?:/(.*))?';
        }
        const dyn = /^\[(\w+)\]$/.exec(seg);
        if (dyn) {
          names.push(dyn[1]);
          rank += 1;
          return '/([^/]+)';
        }
        rank -= 0.01;
        return '/' + seg.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
      })
      .join('');
    return { file, regex: new RegExp(`^${pattern}/?$`), names, rank, mod };
  })
  // Rest segments last, then the route with more static segments and fewer parameters first (as in Astro).
  .sort((a, b) => a.rank - b.rank);

export interface CallOptions {
  cookie?: string | null;
  json?: unknown;
  body?: BodyInit;
  headers?: Record<string, string>;
}

export async function call(method: string, pathAndQuery: string, opts: CallOptions = {}): Promise<Response> {
  const url = new URL(pathAndQuery, ORIGIN);
  const route = routes.find((r) => r.regex.test(url.pathname));
  if (!route) throw new Error(`no route for ${url.pathname}`);
  const m = route.regex.exec(url.pathname)!;
  const params = Object.fromEntries(route.names.map((n, i) => [n, m[i + 1] === undefined ? undefined : decodeURIComponent(m[i + 1])])) as Record<
    string,
    string
  >;
  const handler = route.mod[method] ?? route.mod.ALL;
  if (!handler) return new Response(null, { status: 404 });
  const headers: Record<string, string> = { origin: ORIGIN, ...opts.headers };
  if (opts.cookie) headers.cookie = opts.cookie;
  let body = opts.body;
  if (opts.json !== undefined) {
    headers['content-type'] ??= 'application/json';
    body = JSON.stringify(opts.json);
  }
  const request = new Request(url, { method, headers, body, ...(body instanceof ReadableStream && { duplex: 'half' }) } as RequestInit);
  return handler({ request, params, url });
}

export async function callJson<T = any>(method: string, p: string, opts: CallOptions = {}): Promise<{ status: number; body: T }> {
  const res = await call(method, p, opts);
  const text = await res.text();
  return { status: res.status, body: text ? JSON.parse(text) : null };
}

/** Signs up through better-auth's real endpoint and returns the session cookie. */
export async function signUp(name: string, email: string, password = 'correct-horse-9'): Promise<{ cookie: string; id: string }> {
  const res = await call('POST', '/api/auth/sign-up/email', { json: { name, email, password } });
  if (res.status !== 200) throw new Error(`sign-up failed: ${res.status} ${await res.text()}`);
  const body = (await res.json()) as { user: { id: string } };
  return { cookie: cookieFrom(res), id: body.user.id };
}

export async function signIn(email: string, password: string): Promise<{ status: number; cookie: string }> {
  const res = await call('POST', '/api/auth/sign-in/email', { json: { email, password } });
  return { status: res.status, cookie: res.status === 200 ? cookieFrom(res) : '' };
}

export function cookieFrom(res: Response): string {
  return res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .filter((c) => !c.endsWith('='))
    .join('; ');
}

/** The messages in the fake outbox, oldest first, with their links. */
export async function outbox() {
  const { readOutbox } = await import('../../../src/lib/mail');
  return (await readOutbox()).reverse();
}
