import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { z } from 'zod';
import { fieldsFromZod, type ApiError, type FieldError } from '../shared/schemas/errors.js';
import { storageFaultOf } from './db/faults.js';
import { loggableUrl, type Logger } from './logger.js';

/** An error meant for the client: HTTP status, stable code, readable message. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: FieldError[],
  ) {
    super(message);
  }

  toBody(): { error: ApiError } {
    return { error: { code: this.code, message: this.message, ...(this.fields ? { fields: this.fields } : {}) } };
  }
}

export const badRequest = (message: string, fields?: FieldError[]) => new HttpError(400, 'validation', message, fields);
export const unauthorized = (message = 'Sign in to continue.') => new HttpError(401, 'unauthenticated', message);
export const forbidden = (message = 'You do not have permission to do that.') => new HttpError(403, 'forbidden', message);
export const notFound = (what = 'That') => new HttpError(404, 'not_found', `${what} was not found.`);
export const conflict = (code: string, message: string) => new HttpError(409, code, message);
/**
 * The one answer to a deactivated account, whichever door it knocks on (a password, a link, a
 * token over HTTP, a socket). 401 because the session it holds is no longer valid: the web
 * client answers a 401 by trying its refresh cookie, which is refused too, and signs out.
 */
export const accountInactive = () => new HttpError(401, 'account_inactive', 'This account is deactivated. Ask your administrator.');
/**
 * An administrator's change to their own account or their own place in a crew: a second person
 * makes it (another administrator through PATCH /api/users/:id or the crew tab; for a crew, the
 * job's supervisor too), so nobody gives themselves rights alone.
 */
export const secondAdminNeeded = (doing: string, who = 'another administrator') =>
  new HttpError(403, 'second_admin_needed', `You cannot ${doing} by yourself: ${who} makes this change for you, so that nobody gives themselves rights alone. Ask them to make it.`);
/** A token whose sign-in has ended (signed out on that device, or every session ended by an administrator). */
export const sessionEnded = () => new HttpError(401, 'session_ended', 'Your session has ended. Sign in again.');

/** Parses with a shared schema or throws a 400 naming every failing field. */
export function parseOrThrow<S extends z.ZodType>(schema: S, value: unknown, what = 'request'): z.infer<S> {
  const result = schema.safeParse(value);
  if (!result.success) throw badRequest(`The ${what} has invalid fields.`, fieldsFromZod(result.error));
  return result.data;
}

/** 404 for any /api path no router answered. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new HttpError(404, 'not_found', `No API route ${req.method} ${req.path}.`));
};

/**
 * The one place a thrown error becomes what the client is told, over HTTP and over the socket
 * alike: an HttpError as it is, a body-parser failure as its 4xx, anything else logged in full
 * (with `where` it happened) and worded generically.
 */
export function toHttpError(err: unknown, logger: Logger, where: Record<string, unknown>): HttpError {
  if (err instanceof HttpError) return err;
  if (isBodyParserError(err)) return bodyParserError(err);
  // Express's router could not decode a path parameter (`/api/jobs/%ZZ`); it marks that URIError 400.
  if (err instanceof URIError && (err as URIError & { status?: unknown }).status === 400) {
    return new HttpError(400, 'malformed_path', 'The address has a malformed part (a “%” not followed by a valid encoded character). Check the link or open the page again from the app.');
  }
  // Any other client error the body reader raises (http-errors marks them `expose`): a body whose
  // bytes are not the gzip, deflate or brotli its Content-Encoding says, a stream cut short.
  if (isExposedClientError(err)) return new HttpError(err.status, 'bad_request', 'The request could not be read. Send it again from the app.');
  // SQLite could not write (disk full, locked, read-only, I/O error): 503 with its own code, never the SQL.
  const fault = storageFaultOf(err);
  if (fault) {
    logger.error({ systemCode: fault.systemCode, code: fault.code, ...where }, 'storage fault');
    return new HttpError(503, fault.code, fault.message);
  }
  logger.error({ err, ...where }, 'unhandled error');
  return new HttpError(500, 'internal', 'Something went wrong on the server. Try again; if it keeps happening, tell your administrator.');
}

/** A socket acknowledgment's refusal, worded exactly as the HTTP error body. */
export function refusalOf(err: unknown, logger: Logger, where: Record<string, unknown>): { ok: false; error: ApiError } {
  return { ok: false, error: toHttpError(err, logger, where).toBody().error };
}

/** Express's error handler: every HTTP error body comes from `toHttpError`. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (err: unknown, req, res, _next) => {
    if (res.headersSent) return;
    const httpError = toHttpError(err, logger, { method: req.method, url: loggableUrl(req.originalUrl) });
    // A storage fault or a restart passes: say when to try again.
    if (httpError.status === 503) res.setHeader('Retry-After', '5');
    res.status(httpError.status).json(httpError.toBody());
  };
}

interface BodyParserError { type: string; status: number }

/** An http-errors client error (4xx, `expose: true`), as body-parser and raw-body raise them. */
function isExposedClientError(err: unknown): err is { status: number } {
  if (typeof err !== 'object' || err === null) return false;
  const { status, expose } = err as { status?: unknown; expose?: unknown };
  return expose === true && typeof status === 'number' && status >= 400 && status < 500;
}

function isBodyParserError(err: unknown): err is BodyParserError {
  return typeof err === 'object' && err !== null && 'type' in err && typeof (err as BodyParserError).type === 'string' && 'status' in err;
}

function bodyParserError(err: BodyParserError): HttpError {
  switch (err.type) {
    case 'entity.parse.failed':
      return new HttpError(400, 'malformed_json', 'The request body is not valid JSON.');
    case 'entity.too.large':
      return new HttpError(413, 'too_large', 'The request body is too large.');
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return new HttpError(415, 'unsupported_encoding', 'The request body uses an unsupported encoding.');
    default:
      return new HttpError(err.status >= 400 && err.status < 500 ? err.status : 400, 'bad_request', 'The request could not be read.');
  }
}
