import { allow } from '../../../../lib/api/http';
import { createNetlist, listNetlists } from '../../../../lib/api/netlists';

export const GET = listNetlists;
export const POST = createNetlist;
export const ALL = allow('GET', 'POST');
