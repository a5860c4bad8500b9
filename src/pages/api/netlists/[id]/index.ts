import { allow } from '../../../../lib/api/http';
import { deleteNetlist, getNetlist, updateNetlist } from '../../../../lib/api/netlists';

export const GET = getNetlist;
export const PATCH = updateNetlist;
export const DELETE = deleteNetlist;
export const ALL = allow('GET', 'PATCH', 'DELETE');
