import { allow } from '../../../../../lib/api/http';
import { revokeInvitation } from '../../../../../lib/api/members';

export const DELETE = revokeInvitation;
export const ALL = allow('DELETE');
