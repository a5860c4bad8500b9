/**
 * Pages know who is signed in; pages that need a session send visitors to
 * sign in first (and back afterwards). API routes do their own checks in
 * src/lib/api/http.ts and are passed through untouched. Every answer gets a
 * few protective headers.
 */
import type { MiddlewareHandler } from 'astro';
import { getSessionUser } from './lib/auth';

const PUBLIC_PAGES = ['/sign-in', '/sign-up', '/forgot-password', '/reset-password', '/verify-email'];

const HEADERS: Record<string, string> = {
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'same-origin',
  'x-frame-options': 'DENY',
};

function protect(res: Response): Response {
  try {
    for (const [k, v] of Object.entries(HEADERS)) if (!res.headers.has(k)) res.headers.set(k, v);
    return res;
  } catch {
    // Some responses (e.g. Response.redirect) have immutable headers: copy them.
    const copy = new Response(res.body, res);
    for (const [k, v] of Object.entries(HEADERS)) if (!copy.headers.has(k)) copy.headers.set(k, v);
    return copy;
  }
}

export const onRequest: MiddlewareHandler = async (context, next) => {
  const { pathname } = context.url;
  if (pathname.startsWith('/api/') || /\.[a-z0-9]+$/i.test(pathname)) {
    context.locals.user = null;
    return protect(await next());
  }
  context.locals.user = await getSessionUser(context.request.headers);
  const isPublic = PUBLIC_PAGES.some((p) => pathname === p || pathname.startsWith(p + '/'));
  if (!context.locals.user && !isPublic && pathname !== '/404') {
    return protect(context.redirect(`/sign-in?next=${encodeURIComponent(pathname + context.url.search)}`, 302));
  }
  return protect(await next());
};
