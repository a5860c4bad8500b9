import { allow } from '../../../../lib/api/http';
import { getRevision, revisionIsImmutable } from '../../../../lib/api/revisions';

export const GET = getRevision;
// Revisions are immutable: these answer 405 with a JSON explanation.
export const PUT = revisionIsImmutable;
export const PATCH = revisionIsImmutable;
export const DELETE = revisionIsImmutable;
export const ALL = allow('GET');
