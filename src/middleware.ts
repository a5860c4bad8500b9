/**
 * Pages know who is signed in; pages that need a session send visitors to
 * sign in first (and back afterwards). API routes do their own checks in
 * src/lib/api/http.ts and are passed through untouched.
 */
import type { MiddlewareHandler } from 'astro';
import { getSessionUser } from './lib/auth';

const PUBLIC_PAGES = ['/sign-in', '/sign-up', '/forgot-password', '/reset-password', '/verify-email'];

export const onRequest: MiddlewareHandler = async (context, next) => {
  const { pathname } = context.url;
  if (pathname.startsWith('/api/') || /\.[a-z0-9]+$/i.test(pathname)) {
    context.locals.user = null;
    return next();
  }
  context.locals.user = await getSessionUser(context.request.headers);
  const isPublic = PUBLIC_PAGES.some((p) => pathname === p || pathname.startsWith(p + '/'));
  if (!context.locals.user && !isPublic) {
    return context.redirect(`/sign-in?next=${encodeURIComponent(pathname + context.url.search)}`, 302);
  }
  return next();
};
