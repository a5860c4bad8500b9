import { deleteNetlist, getNetlist, updateNetlist } from '../../../../lib/api/netlists';

export const GET = getNetlist;
export const PATCH = updateNetlist;
export const DELETE = deleteNetlist;
