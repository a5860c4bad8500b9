import type { APIRoute } from 'astro';
import { getAuth } from '../../../lib/auth';

// better-auth handles every /api/auth/* request itself.
export const ALL: APIRoute = async ({ request }) => (await getAuth()).handler(request);
