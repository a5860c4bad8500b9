import { listReviews, requestReview } from '../../../../lib/api/reviews';

export const GET = listReviews;
export const POST = requestReview;
