import { changeMemberRole, removeMember } from '../../../../../lib/api/members';

export const PATCH = changeMemberRole;
export const DELETE = removeMember;
