/** Browser-side calls to our API: JSON in, JSON out, errors as readable messages. */
export class ApiClientError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

export async function api<T>(path: string, init: RequestInit & { json?: unknown } = {}): Promise<T> {
  const { json, headers, ...rest } = init;
  const res = await fetch(path, {
    credentials: 'same-origin',
    ...rest,
    headers: { accept: 'application/json', ...(json !== undefined && { 'content-type': 'application/json' }), ...headers },
    ...(json !== undefined && { body: JSON.stringify(json) }),
  });
  const text = await res.text();
  let data: unknown = null;
  try {
    data = text ? JSON.parse(text) : null;
  } catch {
    // fall through: a non-JSON answer is reported below
  }
  if (res.status === 401 && typeof window !== 'undefined') {
    // The session ended (signed out elsewhere, expired): sign in again and come back here.
    window.location.assign(`/sign-in?next=${encodeURIComponent(window.location.pathname + window.location.search)}`);
  }
  if (!res.ok) {
    const err = (data as { error?: { code?: string; message?: string } } | null)?.error;
    throw new ApiClientError(res.status, err?.code ?? 'http_' + res.status, err?.message ?? `The server answered ${res.status} ${res.statusText}.`);
  }
  return data as T;
}
