/**
 * The one API client: JSON in and out, the CSRF token on every state-changing
 * request, server error bodies turned into ApiError with the server's message,
 * and a 401 on anything but the session check sends the user to sign-in.
 */
export interface FieldIssue {
  field: string;
  message: string;
  line?: number;
}

export class ApiError extends Error {
  constructor(
    public status: number,
    public code: string,
    message: string,
    public body?: Record<string, unknown> & { fields?: FieldIssue[] },
  ) {
    super(message);
  }
  get fields(): FieldIssue[] {
    return this.body?.fields ?? [];
  }
}

let csrfToken: string | null = null;
let onUnauthenticated: (() => void) | null = null;

export function setCsrfToken(token: string | null) {
  csrfToken = token;
}
export function setUnauthenticatedHandler(fn: () => void) {
  onUnauthenticated = fn;
}

async function fetchCsrfToken(): Promise<string> {
  const res = await fetch('/api/auth/csrf', { credentials: 'same-origin' });
  const body = (await res.json()) as { csrfToken: string };
  csrfToken = body.csrfToken;
  return csrfToken;
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  body?: unknown;
  query?: Record<string, string | number | boolean | undefined | null>;
  /** Do not redirect to sign-in on 401 (the session check itself). */
  allowUnauthenticated?: boolean;
  signal?: AbortSignal;
}

export function withQuery(path: string, query?: RequestOptions['query']): string {
  if (!query) return path;
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(query)) if (v !== undefined && v !== null && v !== '') params.set(k, String(v));
  const s = params.toString();
  return s ? `${path}?${s}` : path;
}

async function toError(res: Response): Promise<ApiError> {
  let body: { error?: { code?: string; message?: string } & Record<string, unknown> } | undefined;
  try {
    body = await res.json();
  } catch {
    body = undefined;
  }
  const e = body?.error;
  return new ApiError(
    res.status,
    e?.code ?? `http_${res.status}`,
    e?.message ?? (res.status >= 500 ? 'The server had a problem. Try again in a moment.' : `Request failed (${res.status}).`),
    e as ApiError['body'],
  );
}

export async function api<T>(path: string, options: RequestOptions = {}, retried = false): Promise<T> {
  const method = options.method ?? 'GET';
  const headers: Record<string, string> = { accept: 'application/json' };
  const isForm = typeof FormData !== 'undefined' && options.body instanceof FormData;
  if (options.body !== undefined && !isForm) headers['content-type'] = 'application/json';
  if (method !== 'GET') headers['x-csrf-token'] = csrfToken ?? (await fetchCsrfToken());
  let res: Response;
  try {
    res = await fetch(withQuery(path, options.query), {
      method,
      headers,
      credentials: 'same-origin',
      body: options.body === undefined ? undefined : isForm ? (options.body as FormData) : JSON.stringify(options.body),
      signal: options.signal,
    });
  } catch (err) {
    if ((err as Error).name === 'AbortError') throw err;
    throw new ApiError(0, 'offline', 'Could not reach Rholog. Check the connection and try again.');
  }
  if (res.ok) {
    if (res.status === 204) return undefined as T;
    const type = res.headers.get('content-type') ?? '';
    return (type.includes('application/json') ? await res.json() : await res.text()) as T;
  }
  const error = await toError(res);
  if (error.code === 'csrf_invalid' && !retried) {
    await fetchCsrfToken();
    return api<T>(path, options, true);
  }
  if (error.status === 401 && !options.allowUnauthenticated) onUnauthenticated?.();
  throw error;
}

/** Upload with progress (fetch has no upload progress events), same CSRF and error rules. */
export async function uploadWithProgress<T>(
  path: string,
  form: FormData,
  onProgress: (fraction: number) => void,
  headers: Record<string, string> = {},
): Promise<T> {
  const token = csrfToken ?? (await fetchCsrfToken());
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', path);
    xhr.setRequestHeader('x-csrf-token', token);
    xhr.setRequestHeader('accept', 'application/json');
    for (const [name, value] of Object.entries(headers)) xhr.setRequestHeader(name, value);
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
    xhr.onerror = () => reject(new ApiError(0, 'offline', 'The upload did not reach Rholog. Check the connection and try again.'));
    xhr.onload = () => {
      let body: unknown;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        body = undefined;
      }
      if (xhr.status >= 200 && xhr.status < 300) return resolve(body as T);
      const e = (body as { error?: { code?: string; message?: string } } | undefined)?.error;
      if (xhr.status === 401) onUnauthenticated?.();
      reject(new ApiError(xhr.status, e?.code ?? `http_${xhr.status}`, e?.message ?? `Upload failed (${xhr.status}).`, e as ApiError['body']));
    };
    xhr.send(form);
  });
}
