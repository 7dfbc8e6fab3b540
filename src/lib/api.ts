// The one way the client talks to the server: JSON over fetch with the session cookie and
// the CSRF token the server hands out (see README, "Scripts and the API").
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string>,
  ) {
    super(message);
  }
}

let csrfToken: string | null = null;

export function rememberCsrfToken(token: string | undefined) {
  if (token) csrfToken = token;
}

async function fetchCsrfToken(): Promise<string> {
  const response = await fetch('/api/auth/csrf', { credentials: 'same-origin' });
  const body = await response.json();
  csrfToken = body.csrfToken as string;
  return csrfToken;
}

async function send(method: string, url: string, body?: unknown, retried = false): Promise<Response> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  const isForm = typeof FormData !== 'undefined' && body instanceof FormData;
  if (body !== undefined && !isForm) headers['Content-Type'] = 'application/json';
  if (method !== 'GET') headers['X-CSRF-Token'] = csrfToken ?? (await fetchCsrfToken());
  const response = await fetch(url, {
    method,
    headers,
    credentials: 'same-origin',
    body: body === undefined ? undefined : isForm ? (body as FormData) : JSON.stringify(body),
  });
  if (response.status === 403 && !retried && method !== 'GET') {
    const peek = await response.clone().json().catch(() => null);
    if (peek?.error?.code === 'csrf') {
      await fetchCsrfToken();
      return send(method, url, body, true);
    }
  }
  return response;
}

async function request<T>(method: string, url: string, body?: unknown): Promise<T> {
  let response: Response;
  try {
    response = await send(method, url, body);
  } catch {
    throw new ApiError(0, 'network', 'Kneepoint cannot be reached: check the connection and try again');
  }
  if (response.status === 204) return undefined as T;
  const data = await response.json().catch(() => null);
  if (!response.ok) {
    const error = data?.error ?? {};
    throw new ApiError(response.status, error.code ?? 'unknown', error.message ?? `Request failed (${response.status})`, error.fields);
  }
  return data as T;
}

export const api = {
  get: <T>(url: string) => request<T>('GET', url),
  post: <T>(url: string, body?: unknown) => request<T>('POST', url, body ?? {}),
  put: <T>(url: string, body?: unknown) => request<T>('PUT', url, body ?? {}),
  patch: <T>(url: string, body?: unknown) => request<T>('PATCH', url, body ?? {}),
  delete: <T>(url: string) => request<T>('DELETE', url),
};

/** Copies server field messages onto a react-hook-form form. */
export function applyFieldErrors(error: unknown, setError: (name: never, e: { message: string }) => void) {
  if (error instanceof ApiError && error.fields) {
    for (const [name, message] of Object.entries(error.fields)) setError(name as never, { message });
  }
}
