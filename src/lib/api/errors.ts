/** API errors: each carries its HTTP status, a stable code and a sentence for people. */

export type ErrorCode =
  | 'invalid_input'
  | 'invalid_json'
  | 'unauthenticated'
  | 'forbidden'
  | 'not_found'
  | 'method_not_allowed'
  | 'conflict'
  | 'payload_too_large'
  | 'unsupported_media_type'
  | 'mail_failed'
  | 'internal';

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
  }
}

export const fail = {
  invalid: (message: string, details?: unknown) => new ApiError(400, 'invalid_input', message, details),
  unauthenticated: () => new ApiError(401, 'unauthenticated', 'Sign in first: this request needs a session.'),
  forbidden: (message: string) => new ApiError(403, 'forbidden', message),
  notFound: (what: string, id: string) => new ApiError(404, 'not_found', `No ${what} with id "${id}" exists.`),
  conflict: (message: string) => new ApiError(409, 'conflict', message),
  tooLarge: (limit: number) => new ApiError(413, 'payload_too_large', `The request is larger than the limit of ${formatBytes(limit)}. Send a smaller file.`),
};

export function formatBytes(n: number): string {
  if (n >= 1024 * 1024 && n % (1024 * 1024) === 0) return `${n / (1024 * 1024)} MiB (${n} bytes)`;
  if (n >= 1024 && n % 1024 === 0) return `${n / 1024} KiB (${n} bytes)`;
  return `${n} bytes`;
}
