import type { APIRoute } from 'astro';
import { ApiError, errorResponse, readBodyLimited } from '../../../lib/api/http';
import { CLIENT_IP_HEADER, getAuth } from '../../../lib/auth';

/** Sign-in and friends carry a few fields; anything bigger is refused before better-auth parses it. */
const AUTH_BODY_LIMIT = 64 * 1024;

// better-auth handles every /api/auth/* request itself. Its rate limiter needs
// the caller's address, which the node adapter knows but no header carries:
// we set it here, replacing anything the client sent under that name.
export const ALL: APIRoute = async (context) => {
  const { request } = context;
  const headers = new Headers(request.headers);
  headers.delete(CLIENT_IP_HEADER);
  try {
    // Astro's getter throws when no address is known.
    if (context.clientAddress) headers.set(CLIENT_IP_HEADER, context.clientAddress);
  } catch {
    // no address known (e.g. prerendering): better-auth falls back to a shared bucket
  }
  let body: Uint8Array<ArrayBuffer> | undefined;
  if (request.method !== 'GET' && request.method !== 'HEAD') {
    try {
      body = await readBodyLimited(request, AUTH_BODY_LIMIT);
    } catch (e) {
      if (e instanceof ApiError) return errorResponse(e);
      throw e;
    }
  }
  return (await getAuth()).handler(new Request(request.url, { method: request.method, headers, body }));
};
