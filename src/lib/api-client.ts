/**
 * The one fetch wrapper of the client: JSON in and out, same-origin cookies, the CSRF header
 * on state-changing calls, and the server's `{error: {code, message, details}}` turned into a
 * typed {@link ApiError}. Every server call goes through TanStack Query and then through here.
 */

/** A refusal or failure reported by the API, with the server's stable `code`. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly details?: unknown;
  constructor(status: number, code: string, message: string, details?: unknown) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.details = details;
  }
}

/** Supplies the session's CSRF token; `refresh` asks for a fresh one (after a `csrf` refusal). */
export type CsrfTokenProvider = (options: { refresh: boolean }) => Promise<string | undefined>;

let csrfTokenProvider: CsrfTokenProvider = async () => undefined;

/**
 * Registers where the CSRF token comes from. The app wires this to the session query so the
 * token lives in one place (the query cache) and `lib/` does not depend on a feature.
 */
export function setCsrfTokenProvider(provider: CsrfTokenProvider): void {
  csrfTokenProvider = provider;
}

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  /** Serialised as JSON; a FormData body is sent as multipart (the browser sets its boundary). */
  body?: unknown;
  signal?: AbortSignal;
}

async function toApiError(response: Response): Promise<ApiError> {
  let payload: unknown;
  try {
    payload = await response.json();
  } catch {
    payload = undefined;
  }
  const error = (payload as { error?: { code?: unknown; message?: unknown; details?: unknown } } | undefined)
    ?.error;
  if (error && typeof error.code === 'string' && typeof error.message === 'string') {
    return new ApiError(response.status, error.code, error.message, error.details);
  }
  const fallback =
    response.status === 429
      ? 'Too many attempts. Wait a minute and try again.'
      : `The server answered ${response.status} ${response.statusText}.`;
  return new ApiError(response.status, response.status === 429 ? 'rate_limited' : 'http_error', fallback);
}

async function send(url: string, options: RequestOptions, refreshToken: boolean): Promise<Response> {
  const method = options.method ?? 'GET';
  const headers: Record<string, string> = { Accept: 'application/json' };
  const multipart = typeof FormData !== 'undefined' && options.body instanceof FormData;
  if (options.body !== undefined && !multipart) headers['Content-Type'] = 'application/json';
  if (!SAFE_METHODS.has(method)) {
    const token = await csrfTokenProvider({ refresh: refreshToken });
    if (token) headers['X-CSRF-Token'] = token;
  }
  return fetch(url, {
    method,
    headers,
    credentials: 'same-origin',
    body: options.body === undefined ? undefined : multipart ? (options.body as FormData) : JSON.stringify(options.body),
    signal: options.signal,
  });
}

/**
 * Calls the API and returns the parsed JSON body (`undefined` for 204).
 * A `csrf` refusal is retried once with a fresh token, because the token changes when the
 * session does (sign-in, sign-out) and a tab may hold an old one.
 * @throws {ApiError} for every non-2xx answer
 */
export async function apiRequest<T>(url: string, options: RequestOptions = {}): Promise<T> {
  let response = await send(url, options, false);
  if (!response.ok) {
    let error = await toApiError(response);
    if (error.status === 403 && error.code === 'csrf' && !SAFE_METHODS.has(options.method ?? 'GET')) {
      response = await send(url, options, true);
      if (!response.ok) {
        error = await toApiError(response);
        throw error;
      }
    } else {
      throw error;
    }
  }
  if (response.status === 204) return undefined as T;
  const text = await response.text();
  return (text ? JSON.parse(text) : undefined) as T;
}

/** Shorthands for the verbs the client uses. */
export const api = {
  get: <T>(url: string, signal?: AbortSignal) => apiRequest<T>(url, { signal }),
  post: <T>(url: string, body?: unknown) => apiRequest<T>(url, { method: 'POST', body: body ?? {} }),
  patch: <T>(url: string, body: unknown) => apiRequest<T>(url, { method: 'PATCH', body }),
  put: <T>(url: string, body: unknown) => apiRequest<T>(url, { method: 'PUT', body }),
  /** Multipart POST (file uploads). */
  upload: <T>(url: string, form: FormData) => apiRequest<T>(url, { method: 'POST', body: form }),
  delete: <T = void>(url: string) => apiRequest<T>(url, { method: 'DELETE' }),
};

/**
 * Field messages from a 400's `details`, keyed by dotted path ("profile.pixelCount").
 * Accepts zod-style issue lists (`[{path, message}]`) and `{fieldErrors: {field: [msg]}}`,
 * the two shapes a zod-validating server commonly sends.
 */
export function fieldErrorsFromDetails(details: unknown): Record<string, string> {
  const out: Record<string, string> = {};
  const issues = Array.isArray(details)
    ? details
    : details && typeof details === 'object' && Array.isArray((details as { issues?: unknown }).issues)
      ? ((details as { issues: unknown[] }).issues)
      : undefined;
  if (issues) {
    for (const issue of issues) {
      if (!issue || typeof issue !== 'object') continue;
      const { path, message } = issue as { path?: unknown; message?: unknown };
      const key = Array.isArray(path) ? path.join('.') : typeof path === 'string' ? path : '';
      if (typeof message === 'string' && !(key in out)) out[key] = message;
    }
    return out;
  }
  const fieldErrors =
    details && typeof details === 'object'
      ? ((details as { fieldErrors?: unknown }).fieldErrors as Record<string, unknown> | undefined)
      : undefined;
  if (fieldErrors && typeof fieldErrors === 'object') {
    for (const [key, messages] of Object.entries(fieldErrors)) {
      if (Array.isArray(messages) && typeof messages[0] === 'string') out[key] = messages[0];
    }
  }
  return out;
}
