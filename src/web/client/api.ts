/** The browser side of the HTTP API: JSON in and out, the session's CSRF token on every write. */

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
  }
}

export interface SessionUser {
  id: number | string;
  username: string;
  role: string;
}
interface SessionInfo {
  user: SessionUser | null;
  csrfToken: string | null;
}

let sessionPromise: Promise<SessionInfo> | undefined;

/** The signed-in user and CSRF token from `GET /api/session` (read once per page). */
export function currentSession(): Promise<SessionInfo> {
  sessionPromise ??= fetch('/api/session', { credentials: 'same-origin' }).then(async (res) => {
    if (!res.ok) return { user: null, csrfToken: null };
    const body = (await res.json()) as Record<string, unknown>;
    const user = (body.user ?? null) as SessionUser | null;
    const token = body.csrfToken ?? body.csrf ?? null;
    return { user, csrfToken: typeof token === 'string' ? token : null };
  });
  return sessionPromise;
}

/** Forgets the cached session (after sign-in or sign-out). */
export function resetSession(): void {
  sessionPromise = undefined;
}

function toSignIn(): void {
  if (location.pathname === '/signin') return;
  location.assign(`/signin?next=${encodeURIComponent(location.pathname + location.search)}`);
}

export interface RequestOptions {
  signal?: AbortSignal;
  /** Send a FormData body (multipart) instead of JSON. */
  form?: FormData;
  /** Do not redirect to sign-in on 401 (the sign-in screen itself). */
  noRedirect?: boolean;
}

/** Calls the API; a non-2xx answer throws an ApiError with the server's code and message. */
export async function api<T>(
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE',
  path: string,
  body?: unknown,
  opts: RequestOptions = {},
): Promise<T> {
  const headers: Record<string, string> = { accept: 'application/json' };
  let payload: BodyInit | undefined;
  if (opts.form) payload = opts.form;
  else if (body !== undefined) {
    headers['content-type'] = 'application/json';
    payload = JSON.stringify(body);
  }
  if (method !== 'GET') {
    const { csrfToken } = await currentSession();
    if (csrfToken) headers['x-csrf-token'] = csrfToken;
  }
  const init: RequestInit = { method, headers, credentials: 'same-origin' };
  if (payload !== undefined) init.body = payload;
  if (opts.signal) init.signal = opts.signal;
  const res = await fetch(path, init);
  if (res.status === 401 && !opts.noRedirect) toSignIn();
  if (res.status === 204) return undefined as T;
  const type = res.headers.get('content-type') ?? '';
  const data: unknown = type.includes('json') ? await res.json() : await res.text();
  if (!res.ok) {
    const err = (data as { error?: { code?: string; message?: string; details?: unknown } })?.error;
    throw new ApiError(
      res.status,
      err?.code ?? `HTTP_${res.status}`,
      err?.message ?? `request failed (${res.status})`,
      err?.details,
    );
  }
  return data as T;
}
