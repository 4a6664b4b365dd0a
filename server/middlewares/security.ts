import type { IncomingMessage } from 'node:http';
import type { RequestHandler } from 'express';
import helmet from 'helmet';
import type { Config } from '../config.js';
import { HttpError } from '../errors.js';
import { loggableUrl, type Logger } from '../logger.js';

/**
 * The content security policy of every answer (the built client and the API alike). The client
 * is plain files from this server: Vite writes no inline script into index.html and puts every
 * style in .css files, and Vue and Quasar set styles through the CSSOM (`element.style`), which a
 * policy does not govern; so neither scripts nor styles need 'unsafe-inline'. No remote host is
 * named anywhere: the fonts and icons are bundled. `data:` images are the icons inside Quasar's
 * CSS; `blob:` images are photo previews before upload and the board's photos.
 * The browser tests (tests/e2e/browser.ts) fail on any violation.
 */
export const contentSecurityPolicy = {
  defaultSrc: ["'self'"],
  baseUri: ["'self'"],
  scriptSrc: ["'self'"],
  scriptSrcAttr: ["'none'"],
  styleSrc: ["'self'"],
  // The SVG drawings and the QR code go in through v-html; an inline style attribute in them would be refused.
  styleSrcAttr: ["'none'"],
  fontSrc: ["'self'"],
  imgSrc: ["'self'", 'data:', 'blob:'],
  // 'self' covers ws:// and wss:// to the same host and port (CSP level 3) for the live board.
  connectSrc: ["'self'"],
  objectSrc: ["'none'"],
  frameSrc: ["'none'"],
  frameAncestors: ["'none'"],
  formAction: ["'self'"],
  manifestSrc: ["'self'"],
  workerSrc: ["'self'"],
  // No upgrade-insecure-requests: site networks are often plain http on a LAN address, and
  // upgrading would break every asset.
};

/**
 * Helmet with our policy. HSTS only when the public address is https (TLS is terminated by the
 * operator's proxy; a plain-http site network must not be told to insist on https).
 */
export function securityHeaders(config: Config): RequestHandler {
  const https = config.publicUrl.startsWith('https:');
  const headers = helmet({
    contentSecurityPolicy: { useDefaults: false, directives: contentSecurityPolicy },
    hsts: https ? { maxAge: 180 * 24 * 60 * 60, includeSubDomains: false } : false,
    xFrameOptions: { action: 'deny' },
    referrerPolicy: { policy: 'no-referrer' },
  });
  return (req, res, next) => {
    // Nothing on the board needs these; the camera is reached through the file picker, not getUserMedia.
    res.setHeader('Permissions-Policy', 'geolocation=(), microphone=(), payment=(), usb=(), serial=(), bluetooth=()');
    headers(req, res, next);
  };
}

/**
 * Whether a request's `Origin` may talk to this server: no Origin at all (a same-origin page's
 * GET, curl, the tests, the socket client in Node), the origin of `HOLDLINE_PUBLIC_URL`, or the
 * very host and port the request was addressed to (`Host`): the same server reached by another
 * of its names, such as its LAN address or the Vite dev server, which proxies with the browser's
 * Host. A page on any other site is refused. `null` (a sandboxed frame, a file) is refused.
 */
export function originAllowed(origin: string | undefined, host: string | undefined, publicUrl: string): boolean {
  if (origin === undefined) return true;
  let from: URL;
  try {
    from = new URL(origin);
  } catch {
    return false;
  }
  if (from.protocol !== 'http:' && from.protocol !== 'https:') return false;
  if (sameOrigin(from, publicUrl)) return true;
  if (!host) return false;
  try {
    // The Host header through the origin's own scheme, so a default port compares equal to none.
    return new URL(`${from.protocol}//${host}`).host === from.host;
  } catch {
    return false;
  }
}

function sameOrigin(from: URL, publicUrl: string): boolean {
  try {
    return new URL(publicUrl).origin === from.origin;
  } catch {
    return false;
  }
}

const foreignOriginMessage = (publicUrl: string) => `Requests from another website are not accepted. Open Holdline at ${publicUrl}.`;

/** The HTTP error for a request sent by a page of another site. */
export const originNotAllowed = (publicUrl: string) => new HttpError(403, 'origin_not_allowed', foreignOriginMessage(publicUrl));

/**
 * Refuses API requests sent by pages of other sites, before their body is read. There is no CORS
 * middleware: no answer ever carries Access-Control-Allow-Origin, so another site's script can
 * neither read an answer nor, with this, make the server act (the refresh cookie's routes included).
 */
export function refuseForeignOrigin(config: Config, logger: Logger): RequestHandler {
  return (req, _res, next) => {
    const origin = req.get('origin');
    // config.publicUrl is read per request: the tests set it once the port is known.
    if (originAllowed(origin, req.get('host'), config.publicUrl)) return next();
    logger.warn({ origin, method: req.method, url: loggableUrl(req.originalUrl), publicUrl: config.publicUrl }, 'request from a foreign origin refused (if this is your own address behind a proxy, set HOLDLINE_PUBLIC_URL to it)');
    next(originNotAllowed(config.publicUrl));
  };
}

/**
 * Socket.IO's `allowRequest`: a handshake from a page of another site is refused before any
 * transport opens (403 on polling, 400 on a direct WebSocket, the message in the body).
 */
export function allowSocketOrigin(config: Config, logger: Logger) {
  return (req: IncomingMessage, callback: (err: string | null | undefined, success: boolean) => void): void => {
    const origin = req.headers.origin;
    if (originAllowed(origin, req.headers.host, config.publicUrl)) return callback(null, true);
    logger.warn({ origin, publicUrl: config.publicUrl }, 'live board handshake from a foreign origin refused (if this is your own address behind a proxy, set HOLDLINE_PUBLIC_URL to it)');
    callback(foreignOriginMessage(config.publicUrl), false);
  };
}
