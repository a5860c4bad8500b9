import type { APIRoute } from 'astro';
import { CLIENT_IP_HEADER, getAuth } from '../../../lib/auth';

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
  const body = request.method === 'GET' || request.method === 'HEAD' ? undefined : await request.arrayBuffer();
  return (await getAuth()).handler(new Request(request.url, { method: request.method, headers, body }));
};
