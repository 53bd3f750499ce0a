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

const OFFLINE_MESSAGE = 'Could not reach Rholog. Check the connection and try again.';

/**
 * The CSRF token for state-changing requests. With no network the fetch itself
 * fails (or a cached page answers instead of JSON): both become the same
 * 'offline' ApiError every other request gives, so callers see one kind of error.
 */
async function fetchCsrfToken(): Promise<string> {
  let res: Response;
  try {
    res = await fetch('/api/auth/csrf', { credentials: 'same-origin' });
  } catch {
    throw new ApiError(0, 'offline', OFFLINE_MESSAGE);
  }
  if (!res.ok) throw await toError(res);
  let body: { csrfToken?: unknown };
  try {
    body = (await res.json()) as { csrfToken?: unknown };
  } catch {
    throw new ApiError(0, 'offline', OFFLINE_MESSAGE);
  }
  if (typeof body.csrfToken !== 'string') throw new ApiError(0, 'offline', OFFLINE_MESSAGE);
  csrfToken = body.csrfToken;
  return csrfToken;
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  body?: unknown;
  query?: Record<string, string | number | boolean | undefined | null>;
  /** Do not redirect to sign-in on 401 (the session check itself). */
  allowUnauthenticated?: boolean;
  /** Sent as the Idempotency-Key header: the same on every try of one create (see `repeatKey`). */
  idempotencyKey?: string;
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
  if (options.idempotencyKey) headers['idempotency-key'] = options.idempotencyKey;
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
    throw new ApiError(0, 'offline', OFFLINE_MESSAGE);
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
  retried = false,
): Promise<T> {
  const token = csrfToken ?? (await fetchCsrfToken());
  try {
    return await new Promise<T>((resolve, reject) => {
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
  } catch (err) {
    // A token that went stale (the session was renewed) is fetched again once; the idempotency key makes the retry safe.
    if (err instanceof ApiError && err.code === 'csrf_invalid' && !retried) {
      await fetchCsrfToken();
      return uploadWithProgress<T>(path, form, onProgress, headers, true);
    }
    throw err;
  }
}

/**
 * Words for an error, without the API's internal field names. A form passes
 * its own labels (field path → what the form calls it); paths it does not
 * name fall back to the common ones, then to the path spelt out in words
 * ("pulseWidthNs" → "Pulse width"). Zod's stock English is turned into ours.
 */
export type FieldLabels = Record<string, string>;

const COMMON_LABELS: FieldLabels = {
  '(body)': 'The form',
  '(row)': 'The row',
  id: 'The address of this page',
  file: 'The file',
  email: 'E-mail',
  cableRunId: 'Cable run',
  cableTypeId: 'Cable type',
  traceId: 'Trace',
  findingId: 'Finding',
  findingIds: 'Findings',
  assigneeId: 'Assignee',
  eventIndex: 'Event',
  end: 'End',
  vf: 'Velocity factor',
  vfTolerance: 'Velocity factor tolerance',
  vfOverride: 'Velocity factor override',
  vfOverrideReason: 'Reason for the override',
  z0Ohm: 'Impedance Z0',
  leadLengthM: 'Test-lead length',
  knownLengthM: 'Known length',
  installedLengthM: 'Installed length',
  chainageM: 'Chainage',
  slackM: 'Slack',
  roundTripNs: 'Round-trip time',
  endALabel: 'End A',
  endBLabel: 'End B',
  dueDate: 'Due date',
  workDone: 'What was done',
  'found.offsetM': 'Distance past the marker',
  'found.distanceM': 'Cable length to the fault',
  'found.markerId': 'Route marker',
  found: 'Where the fault was found',
  to: 'Next step',
  unitPreference: 'Length unit',
  currentPassword: 'Current password',
  newPassword: 'New password',
};

/** Unit endings the API puts on field names ("pulseWidthNs", "chainageM"). */
const UNIT_SUFFIX = /(Ns|M|Ohm|Hz|Mhz|Db|Pct|Id|Ids)$/;

function spelt(segment: string): string {
  const words = segment.replace(UNIT_SUFFIX, '').replace(/_/g, ' ').replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase().trim();
  return words ? words.charAt(0).toUpperCase() + words.slice(1) : segment;
}

/** What a person calls the field at `path`: "markers.2.chainageM" → "Marker 3, chainage". */
export function fieldLabel(path: string, labels: FieldLabels = {}): string {
  const named = labels[path] ?? COMMON_LABELS[path];
  if (named) return named;
  const parts = path.split('.');
  const words: string[] = [];
  for (let i = 0; i < parts.length; i++) {
    const next = parts[i + 1];
    if (next !== undefined && /^\d+$/.test(next)) {
      words.push(`${spelt(parts[i]).replace(/s$/, '')} ${Number(next) + 1}`);
      i++;
    } else {
      const last = parts.slice(i).join('.');
      words.push(labels[last] ?? COMMON_LABELS[last] ?? labels[parts[i]] ?? COMMON_LABELS[parts[i]] ?? spelt(parts[i]));
    }
  }
  return words.map((w, i) => (i === 0 ? w : w.charAt(0).toLowerCase() + w.slice(1))).join(', ');
}

const ZOD_TYPES: Record<string, string> = {
  number: 'a number',
  string: 'text',
  boolean: 'yes or no',
  array: 'a list',
  object: 'a set of values',
  date: 'a date',
  int: 'a whole number',
};

/** Zod's stock messages in our words: "Invalid input: expected number, received NaN" → "must be a number". */
export function plainMessage(message: string): string {
  const expected = message.match(/^Invalid input: expected (\w+), received (\w+)/);
  if (expected) return expected[2] === 'undefined' ? 'is required' : `must be ${ZOD_TYPES[expected[1]] ?? expected[1]}`;
  if (/^Invalid option/.test(message)) return 'is not one of the choices';
  const size = message.match(/^Too (small|big): expected \w+ to (?:be|have) ([<>]=?)\s?([-\d.e]+)/);
  if (size) return `must be ${size[2].startsWith('>') ? (size[2] === '>' ? 'more than' : 'at least') : size[2] === '<' ? 'less than' : 'at most'} ${size[3]}`;
  if (/^Invalid (input|string)/.test(message)) return 'is not valid';
  if (/^Unrecognized key/.test(message)) return 'is not expected here';
  return message;
}

/** The message to show for a failed request: the server's words, or its field list in human words when the message names fields. */
export function describeError(error: unknown, labels: FieldLabels = {}): string {
  if (!(error instanceof Error)) return String(error);
  const fields = error instanceof ApiError ? error.fields : [];
  const namesFields = fields.some((f) => error.message.includes(`${f.field}:`)) || (error instanceof ApiError && error.code === 'invalid_input');
  if (!fields.length || !namesFields) return error.message;
  const lines = fields.map((f) => `${f.line ? `Line ${f.line}: ` : ''}${fieldLabel(f.field, labels)} ${plainMessage(f.message)}`);
  const body = lines.length === 1 ? `${lines[0]}.` : `${lines.join('; ')}.`;
  return error instanceof ApiError && error.code === 'invalid_input' ? `Please check: ${body}` : body;
}
