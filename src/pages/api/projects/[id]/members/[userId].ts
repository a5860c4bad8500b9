import { allow } from '../../../../../lib/api/http';
import { changeMemberRole, removeMember } from '../../../../../lib/api/members';

export const PATCH = changeMemberRole;
export const DELETE = removeMember;
export const ALL = allow('PATCH', 'DELETE');
