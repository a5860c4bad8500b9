import { allow } from '../../../lib/api/http';
import { acceptInvitation, getInvitation } from '../../../lib/api/members';

export const GET = getInvitation;
// Accepting is a POST by the signed-in, invited user.
export const POST = acceptInvitation;
export const ALL = allow('GET', 'POST');
