import { createRevision, listRevisions } from '../../../../lib/api/revisions';

export const GET = listRevisions;
export const POST = createRevision;
