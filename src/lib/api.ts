import type { ApiErrorBody, ApiIssue } from '#shared/api-error.ts';

/** An error answer from the API, in the shared error shape. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly issues: ApiIssue[] = [],
    readonly body?: unknown,
  ) {
    super(message);
  }
  issueFor(path: string) {
    return this.issues.find((i) => i.path === path)?.message;
  }
}

let sessionEnded: (() => void) | null = null;

/** What the app does when the server says the session has ended (src/app/session.ts sends the user to sign-in). */
export function onSessionEnded(handler: () => void) {
  sessionEnded = handler;
}

/**
 * Every answer passes here: a 401 from anything but the sign-in calls themselves (`/api/auth/…`, whose 401 means
 * a wrong password) means the session expired or was ended elsewhere.
 */
export function noteAnswer(url: string, status: number) {
  if (status === 401 && !new URL(url, 'http://app').pathname.startsWith('/api/auth/')) sessionEnded?.();
}

async function request<T>(method: string, url: string, body?: unknown, headers: Record<string, string> = {}): Promise<T> {
  let res: Response;
  try {
    res = await fetch(url, {
      method,
      credentials: 'same-origin',
      headers: { ...(body === undefined ? {} : { 'Content-Type': 'application/json' }), ...headers },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    // No answer at all (no signal, server unreachable): status 0, so callers can tell it from a refusal.
    throw new ApiError(0, 'network', 'No connection to the server');
  }
  if (res.status === 204) return undefined as T;
  const data = await res.json().catch(() => null);
  if (!res.ok) {
    noteAnswer(url, res.status);
    const err = (data as ApiErrorBody | null)?.error;
    throw new ApiError(res.status, err?.code ?? 'unknown', err?.message ?? `Request failed (${res.status})`, err?.issues, data);
  }
  return data as T;
}

export const api = {
  get: <T>(url: string) => request<T>('GET', url),
  post: <T>(url: string, body: unknown = {}) => request<T>('POST', url, body),
  put: <T>(url: string, body: unknown) => request<T>('PUT', url, body),
  patch: <T>(url: string, body: unknown) => request<T>('PATCH', url, body),
  delete: <T>(url: string) => request<T>('DELETE', url),
  /** Any method with extra headers (the outbox sends its Idempotency-Key this way). */
  send: <T>(method: string, url: string, body: unknown, headers: Record<string, string>) => request<T>(method, url, body, headers),
};

/** True when the request got no answer (as opposed to an answer refusing it). */
export const isNetworkError = (err: unknown) => err instanceof ApiError && err.status === 0;

/** Builds a query string from the set values only. */
export function qs(params: Record<string, string | number | boolean | null | undefined>) {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== null && v !== '') p.set(k, String(v));
  const s = p.toString();
  return s ? `?${s}` : '';
}
