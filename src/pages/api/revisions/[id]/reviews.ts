import { allow } from '../../../../lib/api/http';
import { listReviews, requestReview } from '../../../../lib/api/reviews';

export const GET = listReviews;
export const POST = requestReview;
export const ALL = allow('GET', 'POST');
