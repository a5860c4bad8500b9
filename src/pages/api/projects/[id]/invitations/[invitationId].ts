import { revokeInvitation } from '../../../../../lib/api/members';

export const DELETE = revokeInvitation;
