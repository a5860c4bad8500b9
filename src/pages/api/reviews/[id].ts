import { allow } from '../../../lib/api/http';
import { decideReview, getReview } from '../../../lib/api/reviews';

export const GET = getReview;
// Approve, reject or withdraw: `{state, comment}`.
export const PATCH = decideReview;
export const ALL = allow('GET', 'PATCH');
