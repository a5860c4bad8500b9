import { ApiError, errorResponse } from '../../lib/api/http';

// Unknown API paths answer in JSON like every other API error.
export const ALL = async ({ url }: { url: URL }) =>
  errorResponse(new ApiError(404, 'not_found', `No API route at ${url.pathname}; see README.md for the list of routes.`));
