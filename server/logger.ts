import { pino, type DestinationStream, type Logger } from 'pino';

/**
 * What the logs never carry: the Authorization and Cookie headers, the Set-Cookie answer, any
 * password or token field one or two levels down, password hashes, and a failed query's bound
 * parameters (they can hold a password hash or a token's hash). Bodies are never logged at all.
 */
export const REDACTED_PATHS = [
  'req.headers.authorization',
  'req.headers.cookie',
  'res.headers["set-cookie"]',
  'password',
  'token',
  '*.password',
  '*.token',
  '*.passwordHash',
  '*.tokenHash',
  '*.refreshToken',
  '*.*.password',
  '*.*.token',
  'err.parameters',
  '*.parameters',
];

/** Structured JSON logs; tests pass level 'silent', or a stream to read what was logged. */
export function createLogger(level = 'info', destination?: DestinationStream): Logger {
  const options = { level, base: { app: 'holdline' }, redact: REDACTED_PATHS };
  return destination ? pino(options, destination) : pino(options);
}

/**
 * A request's URL as it may be logged: an e-mailed link's token in the path
 * (`/api/auth/links/<token>`) and any `token`, `sig` or `exp`-signed query value are cut out.
 */
export function loggableUrl(url: string | undefined): string {
  if (!url) return '';
  return url
    .replace(/(\/auth\/links\/)[^/?#]+/g, '$1[redacted]')
    .replace(/([?&](?:token|sig|access_token|refresh_token)=)[^&#]*/gi, '$1[redacted]');
}

export type { Logger };
