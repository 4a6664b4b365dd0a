import type { z } from 'zod';
import type { ApiError, FieldError } from '../../shared/schemas/errors';

/** A refused or failed API call, with the server's code and each failing field. */
export class ApiRequestError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: FieldError[] = [],
    /** A 429's Retry-After in whole seconds, when the server sent one. */
    readonly retryAfterS: number | null = null,
  ) {
    super(message);
  }
}

interface TokenSource {
  /** The current access token, refreshed first when it is about to expire. */
  getToken(): Promise<string | null>;
  /** Called once on a 401: try to refresh; true when a new token is available. */
  onUnauthorized(): Promise<boolean>;
}

let tokens: TokenSource | null = null;

/** The session store registers itself here so the client can attach and refresh tokens. */
export function setTokenSource(source: TokenSource): void {
  tokens = source;
}

export interface RequestOptions<S extends z.ZodType | undefined> {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  body?: unknown;
  /** Validates the answer so a mismatch shows at the edge, not deep in a screen. */
  schema?: S;
  /** Skip the token (sign-in, refresh). */
  anonymous?: boolean;
}

/** Sends one request with the session's token, refreshing it once on a 401. */
async function fetchWithToken(path: string, init: { method: string; body?: BodyInit; headers: Record<string, string> }, anonymous = false): Promise<Response> {
  const send = async () => {
    const headers = { ...init.headers };
    if (!anonymous && tokens) {
      const token = await tokens.getToken();
      if (token) headers.Authorization = `Bearer ${token}`;
    }
    return fetch(`/api${path}`, { method: init.method, headers, body: init.body, credentials: 'same-origin' });
  };
  try {
    const response = await send();
    if (response.status === 401 && !anonymous && tokens && (await tokens.onUnauthorized())) return await send();
    return response;
  } catch {
    throw new ApiRequestError(0, 'network', 'No connection to the Holdline server. Check the site network and try again.');
  }
}

/** The server's refusal as an ApiRequestError, read from its JSON body when it sent one. */
function refusal(response: Response, data: unknown): ApiRequestError {
  const error = (data as { error?: ApiError } | undefined)?.error;
  const retryAfter = Number(response.headers.get('Retry-After') ?? '');
  const retryAfterS = response.status === 429 && Number.isFinite(retryAfter) && retryAfter > 0 ? Math.ceil(retryAfter) : null;
  return new ApiRequestError(response.status, error?.code ?? 'http_' + response.status, error?.message ?? `The server answered ${response.status}.`, error?.fields ?? [], retryAfterS);
}

/** The one way the client talks to /api. Errors become ApiRequestError with a readable message. */
export async function api<S extends z.ZodType | undefined = undefined>(
  path: string,
  options: RequestOptions<S> = {},
): Promise<S extends z.ZodType ? z.infer<S> : unknown> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  if (options.body !== undefined && !(options.body instanceof FormData)) headers['Content-Type'] = 'application/json';
  const body = options.body === undefined ? undefined : options.body instanceof FormData ? options.body : JSON.stringify(options.body);
  const response = await fetchWithToken(path, { method: options.method ?? 'GET', headers, body }, options.anonymous);

  const text = await response.text();
  const data: unknown = text ? safeJson(text) : undefined;
  if (!response.ok) throw refusal(response, data);
  if (options.schema) {
    const parsed = options.schema.safeParse(data);
    if (!parsed.success) throw new ApiRequestError(response.status, 'bad_answer', 'The server sent an answer this screen does not understand. Reload the page.');
    return parsed.data as S extends z.ZodType ? z.infer<S> : unknown;
  }
  return data as S extends z.ZodType ? z.infer<S> : unknown;
}

/**
 * Fetches a file (a PDF sheet) with the session's token and saves it as `fileName`. A plain link
 * cannot carry the token, which lives in memory only.
 */
export async function download(path: string, fileName: string): Promise<void> {
  saveFile(await fetchBlob(path), fileName);
}

/**
 * How long a saved file's object URL stays valid after the click. The click only asks the browser
 * to start the download, which may read the Blob later: revoking on the next turn can cancel it.
 * FileSaver.js (Eli Grey's saveAs, github.com/eligrey/FileSaver.js, its Blob branch) keeps the URL
 * 40 s for the same reason.
 */
const SAVED_FILE_URL_LIFETIME_MS = 40_000;

/** Hands a Blob the client already holds to the browser to save as `fileName`: the one way a file is saved. */
export function saveFile(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), SAVED_FILE_URL_LIFETIME_MS);
}

/** Words people typed (a fleet number, a job name) as part of a file name: letters, digits, dots and dashes, at most 80 characters. */
export function fileNamePart(words: string, fallback: string): string {
  return words.replace(/[^\w.-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 80) || fallback;
}

/** Fetches a file (a photo thumbnail) with the session's token, for an object URL a screen can show. */
export async function fetchBlob(path: string): Promise<Blob> {
  const response = await fetchWithToken(path, { method: 'GET', headers: { Accept: '*/*' } });
  if (!response.ok) {
    const text = await response.text();
    throw refusal(response, text ? safeJson(text) : undefined);
  }
  return response.blob();
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

/** A sentence for people from any thrown value. */
export function describeError(error: unknown): string {
  if (error instanceof ApiRequestError) return error.message;
  if (error instanceof Error) return error.message;
  return 'Something went wrong.';
}
