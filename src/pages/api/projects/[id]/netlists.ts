import { createNetlist, listNetlists } from '../../../../lib/api/netlists';

export const GET = listNetlists;
export const POST = createNetlist;
