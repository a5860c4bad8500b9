import { allow } from '../../../../lib/api/http';
import { createRevision, listRevisions } from '../../../../lib/api/revisions';

export const GET = listRevisions;
export const POST = createRevision;
export const ALL = allow('GET', 'POST');
