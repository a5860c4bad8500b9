import { allow } from '../../../../../lib/api/http';
import { inviteMember, listMembers } from '../../../../../lib/api/members';

export const GET = listMembers;
// Adding a member means inviting them by e-mail.
export const POST = inviteMember;
export const ALL = allow('GET', 'POST');
