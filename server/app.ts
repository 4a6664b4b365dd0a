import 'reflect-metadata';
import { existsSync } from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import express, { type Express } from 'express';
import expressStaticGzip from 'express-static-gzip';
import { pinoHttp } from 'pino-http';
import { Server as SocketServer } from 'socket.io';
import cookieParser from 'cookie-parser';
import type { DataSource } from 'typeorm';
import type { Config } from './config.js';
import type { AppContext } from './context.js';
import { WriteQueue } from './db/write-queue.js';
import { apiNotFound, errorHandler } from './errors.js';
import { loggableUrl, type Logger } from './logger.js';
import { resolveSecret } from './auth/secret.js';
import { HoldReminders } from './mail/hold-reminders.js';
import { createMailer, type Mailer } from './mail/mailer.js';
import { MailOutboxService, type OutboxOptions } from './mail/outbox.js';
import { recordPdfFromRenderer } from './mail/record-pdf.js';
import { authenticate } from './middlewares/authenticate.js';
import { inputGuard, JSON_BODY_LIMIT, refuseDeepJson, SOCKET_MESSAGE_LIMIT_BYTES } from './middlewares/input-guard.js';
import { allowSocketOrigin, refuseForeignOrigin, securityHeaders } from './middlewares/security.js';
import { assistCranesRouter } from './routes/assist-cranes.js';
import { auditRouter } from './routes/audit.js';
import { authRouter } from './routes/auth.js';
import { componentsRouter } from './routes/components.js';
import { craneModelsRouter } from './routes/crane-models.js';
import { craneUnitsRouter } from './routes/crane-units.js';
import { healthRouter } from './routes/health.js';
import { boardRouter } from './routes/board.js';
import { jobsRouter } from './routes/jobs.js';
import { plansRouter } from './routes/plans.js';
import { mailRouter } from './routes/mail.js';
import { recordsRouter } from './routes/records.js';
import { recordsListRouter } from './routes/records-list.js';
import { paperCopyRouter } from './routes/paper-copy.js';
import { recordPdfRouter } from './routes/record-pdf.js';
import { usersRouter } from './routes/users.js';
import { uploadsRouter } from './routes/uploads.js';
import { LocalDiskStorage } from './storage/local-disk.js';
import type { Storage } from './storage/index.js';
import type { HoldlineServer } from './sockets/auth.js';
import { attachSockets } from './sockets/index.js';
import { BoardPublisher } from './sockets/publisher.js';

export interface AppDeps {
  config: Config;
  dataSource: DataSource;
  logger: Logger;
  /** Folder of the built client; omitted in API-only tests. */
  clientDir?: string;
  /** Defaults to SMTP_URL or a local fake mail server. */
  mailer?: Mailer;
  /** Retry waits and the record PDF source of the e-mail outbox; tests pass short waits. */
  outbox?: OutboxOptions;
  /** The clock; tests pass their own. */
  now?: () => Date;
  /** Defaults to the local disk under `<dataDir>/uploads/`. */
  storage?: Storage;
}

export interface HoldlineApp {
  app: Express;
  io: HoldlineServer;
  httpServer: http.Server;
  context: AppContext;
  /** The once-a-minute look for holds waiting on someone who is not on the board; tests call `check()`. */
  reminders: HoldReminders;
  /**
   * Graceful shutdown: refuses new writes (`server_restarting`), tells every connected board the
   * server is restarting (`server:restarting`), lets the queued writes commit and their answers go
   * out, then closes sockets, the HTTP server and the database.
   */
  close(): Promise<void>;
}

/** Builds the Express app and the Socket.IO server without listening. */
export function createApp(deps: AppDeps): HoldlineApp {
  const { config, dataSource, logger } = deps;
  const queue = new WriteQueue(dataSource);
  // The Socket.IO server exists before the context so the publisher can be made once, here, and
  // handed to everyone; it is attached to the HTTP server below.
  // A handshake from a page of another site is refused before any transport opens.
  // A bigger message closes that client's transport (it reconnects and resyncs): see input-guard.ts.
  const io: HoldlineServer = new SocketServer({ serveClient: false, allowRequest: allowSocketOrigin(config, logger), maxHttpBufferSize: SOCKET_MESSAGE_LIMIT_BYTES });
  const publisher = new BoardPublisher(io);
  const mailer = deps.mailer ?? createMailer(config.smtpUrl, logger, path.join(config.dataDir, 'mail'));
  const now = deps.now ?? (() => new Date());
  // The record PDF is rendered through the context made just below; it is only asked for when an e-mail goes out.
  const outbox = new MailOutboxService({ config, dataSource, queue, logger, mailer, now }, { recordPdf: (jobId) => recordPdfFromRenderer(context)(jobId), ...deps.outbox });
  const context: AppContext = {
    config,
    dataSource,
    queue,
    logger,
    mailer,
    outbox,
    storage: deps.storage ?? new LocalDiskStorage(path.join(config.dataDir, 'uploads')),
    secret: resolveSecret(config.secret, config.dataDir),
    now,
    publisher,
  };
  const reminders = new HoldReminders(context, outbox);
  outbox.start();
  reminders.start();

  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  // Helmet with our content security policy; see server/middlewares/security.ts and SECURITY.md.
  app.use(securityHeaders(config));
  app.use(
    pinoHttp({
      logger,
      autoLogging: { ignore: (req) => req.url === '/api/health' || !req.url?.startsWith('/api') },
      serializers: {
        req: (req: { method: string; url: string }) => ({ method: req.method, url: loggableUrl(req.url) }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
      customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'warn' : 'info'),
    }),
  );

  const api = express.Router();
  // Before the body is read: another site's page gets a 403 and never an Access-Control-Allow-Origin.
  api.use(refuseForeignOrigin(config, logger));
  // Size (413 too_large), nesting (400 too_deep, counted before parsing), then lone surrogates and prototype keys.
  api.use(express.json({ limit: JSON_BODY_LIMIT, verify: refuseDeepJson }));
  api.use(inputGuard);
  // Answers carry tokens and personal data: no browser or proxy keeps them (a route that wants caching, such as a photo, says so itself).
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use(cookieParser());
  api.use(authenticate(context));
  api.use(healthRouter(dataSource, config.version, queue));
  api.use(authRouter(context));
  api.use(usersRouter(context));
  api.use(auditRouter(context));
  api.use(mailRouter(context));
  api.use(craneModelsRouter(context));
  api.use(craneUnitsRouter(context));
  api.use(assistCranesRouter(context));
  api.use(componentsRouter(context));
  api.use(uploadsRouter(context));
  api.use(jobsRouter(context));
  api.use(plansRouter(context));
  api.use(recordsRouter(context));
  api.use(recordsListRouter(context));
  api.use(recordPdfRouter(context));
  api.use(paperCopyRouter(context));
  api.use(boardRouter(context));
  api.use(apiNotFound);
  app.use('/api', api);

  if (deps.clientDir) serveClient(app, deps.clientDir);
  app.use(errorHandler(logger));

  const httpServer = http.createServer(app);
  io.attach(httpServer);
  const stopSockets = attachSockets(io, context, publisher);

  let closing: Promise<void> | undefined;
  const close = () => {
    closing ??= (async () => {
      // The e-mail loops first (a send in progress is recorded; a mail left over is found again at
      // the next start), bounded so a hung mail server cannot hold the restart up.
      await Promise.race([Promise.all([reminders.stop(), outbox.stop()]), new Promise((resolve) => setTimeout(resolve, 5_000).unref())]);
      // From here every new write is refused `server_restarting`; what is queued still commits.
      queue.stopTaking();
      io.emit('server:restarting', { at: new Date().toISOString() });
      stopSockets();
      await queue.drain();
      // The answers of the last commands are sent in the turns right after their commits: let them
      // go out before the sockets close, so an acknowledged command is always one its sender heard.
      await new Promise((resolve) => setImmediate(resolve));
      await queue.drain();
      await new Promise((resolve) => setImmediate(resolve));
      // io.close() also closes the HTTP server, so no new requests or sockets are accepted. Its
      // callback waits for every connection to end: a client that keeps a connection busy would
      // hold the shutdown forever, so the connections are closed at once (their writes were answered above).
      const closed = new Promise<void>((resolve) => io.close(() => resolve()));
      httpServer.closeAllConnections();
      await closed;
      await queue.drain();
      await context.mailer.close();
      if (dataSource.isInitialized) await dataSource.destroy();
    })();
    return closing;
  };

  return { app, io, httpServer, context, reminders, close };
}

/** Hashed build output (`/assets/<name>-<hash>.<ext>`): a new build gives new names, so a browser keeps these for good. */
const IMMUTABLE = 'public, max-age=31536000, immutable';
/** Build files at fixed names that a browser must check with the server every time (vite.config.ts, VitePWA). */
const REVALIDATED = new Set(['sw.js', 'manifest.webmanifest']);

/**
 * Serves the built client and answers client routes with index.html. The build writes a Brotli and
 * a gzip copy beside each script, style sheet and SVG (vite.config.ts): the copy the browser
 * accepts is sent as it is (Brotli first, `Vary: Accept-Encoding`), the file itself to a browser
 * that accepts neither, so nothing is compressed per request and /api and /socket.io are untouched.
 * The copies are found once, when the app is made: a client built later is served uncompressed
 * until the next start.
 */
function serveClient(app: Express, clientDir: string): void {
  const indexFile = path.join(clientDir, 'index.html');
  const assetsDir = path.join(clientDir, 'assets') + path.sep;
  app.use(
    expressStaticGzip(clientDir, {
      enableBrotli: true,
      orderPreference: ['br', 'gzip'],
      index: false,
      serveStatic: {
        index: false,
        maxAge: '1h',
        setHeaders: (res, file) => {
          if (file.startsWith(assetsDir)) res.setHeader('Cache-Control', IMMUTABLE);
          // The service worker and the manifest name no hash: checked with the server on every use, so a new build reaches phones.
          else if (REVALIDATED.has(path.relative(clientDir, file).replace(/\.(br|gz)$/, ''))) res.setHeader('Cache-Control', 'no-cache');
        },
      },
    }),
  );
  app.get(/^(?!\/api\/|\/socket\.io\/).*/, (_req, res) => {
    if (!existsSync(indexFile)) {
      res.status(503).type('text/plain').send('The client is not built yet. Run `npm run build`, or use `npm start`.');
      return;
    }
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(indexFile);
  });
}
