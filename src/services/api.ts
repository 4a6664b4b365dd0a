import type { z } from 'zod';
import type { ApiError, FieldError } from '../../shared/schemas/errors';

/** A refused or failed API call, with the server's code and each failing field. */
export class ApiRequestError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: FieldError[] = [],
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

/** The one way the client talks to /api. Errors become ApiRequestError with a readable message. */
export async function api<S extends z.ZodType | undefined = undefined>(
  path: string,
  options: RequestOptions<S> = {},
): Promise<S extends z.ZodType ? z.infer<S> : unknown> {
  const send = async () => {
    const headers: Record<string, string> = { Accept: 'application/json' };
    if (options.body !== undefined && !(options.body instanceof FormData)) headers['Content-Type'] = 'application/json';
    if (!options.anonymous && tokens) {
      const token = await tokens.getToken();
      if (token) headers.Authorization = `Bearer ${token}`;
    }
    const body = options.body === undefined ? undefined : options.body instanceof FormData ? options.body : JSON.stringify(options.body);
    return fetch(`/api${path}`, { method: options.method ?? 'GET', headers, body, credentials: 'same-origin' });
  };

  let response: Response;
  try {
    response = await send();
    if (response.status === 401 && !options.anonymous && tokens && (await tokens.onUnauthorized())) response = await send();
  } catch {
    throw new ApiRequestError(0, 'network', 'No connection to the Holdline server. Check the site network and try again.');
  }

  const text = await response.text();
  const data: unknown = text ? safeJson(text) : undefined;
  if (!response.ok) {
    const error = (data as { error?: ApiError } | undefined)?.error;
    throw new ApiRequestError(
      response.status,
      error?.code ?? 'http_' + response.status,
      error?.message ?? `The server answered ${response.status}.`,
      error?.fields ?? [],
    );
  }
  if (options.schema) {
    const parsed = options.schema.safeParse(data);
    if (!parsed.success) throw new ApiRequestError(response.status, 'bad_answer', 'The server sent an answer this screen does not understand. Reload the page.');
    return parsed.data as S extends z.ZodType ? z.infer<S> : unknown;
  }
  return data as S extends z.ZodType ? z.infer<S> : unknown;
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
