/**
 * Scenario 5, the client: how much JavaScript and CSS the sign-in page and the cab view load
 * before they show anything, and how long a slow phone waits for the operator's first board with
 * data, against an empty Quasar page built with the same Vite setup (bench/empty-page).
 */
import { readFileSync } from 'node:fs';
import http from 'node:http';
import net, { type AddressInfo } from 'node:net';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { chromium, type Browser, type BrowserContext, type Page, type Response } from 'playwright-core';
import { REFRESH_COOKIE } from '../../server/auth/cookies.js';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { focusStage } from '../../shared/board/status.js';
import type { BoardSnapshot } from '../../shared/board/types.js';
import { contentTypeOf, fileIn, serveFolder, type StaticServer } from '../empty-page/serve.js';
import { clientBuilds } from '../lib/builds.js';
import type { CachedEntry } from '../lib/cache.js';
import { startHoldline, templateFor } from '../lib/holdline.js';
import { spreadOf } from '../lib/stats.js';
import type { BenchServer, Correctness, Figure, Scenario, ScenarioResult, Spread, System } from '../lib/types.js';

const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
/** zlib's strongest level: the figure is what the bytes can shrink to, not what a server chooses to send. */
const GZIP_LEVEL = 9;
const JS_BUDGET_KIB = 170;
const FIRST_BOARD_RATIO_TARGET = 1.5;
/** The slow phone: 150 ms round trip, 1.6 Mbit/s both ways, a CPU four times slower. */
const SLOW_PHONE = { latencyMs: 150, bytesPerSecond: 200_000, cpuSlowdown: 4 } as const;
const PHONE_VIEWPORT = { width: 390, height: 844 };
const OPERATOR = 'operator@holdline.test';
/** The demo's live erection, on which the operator is crew (server/demo/jobs.ts). */
const DEMO_LIVE_JOB = 'Transformer T2 lift: boom erection';
const LOAD_TIMEOUT_MS = 60_000;

/** What proves a page shows its content: an element, optionally with an exact text, and an element that must be absent then. */
interface ContentProof {
  selector: string;
  text: string | null;
  absent: string | null;
}

interface LoadOutcome {
  /** From the start of the navigation (the document's time origin) to the frame after the proof appeared. */
  firstContentMs: number;
  /** Every .js and .css response received before then, with its body. */
  assets: { url: string; kind: 'js' | 'css'; bytes: number; gzipBytes: number }[];
  /** Every response before then by kind: bytes over the wire (as encoded) and unpacked, for the notes. */
  bytesByKind: Record<string, { wire: number; body: number }>;
  requests: number;
  /** The refresh cookie the page holds at the end (it turns over on every refresh), to start the next load signed in. */
  refreshCookie: { name: string; value: string } | null;
}

/** What every page load watched for: requests to other hosts, policy violations, uncaught errors. */
interface PageTrouble {
  foreignRequests: string[];
  cspViolations: string[];
  pageErrors: string[];
}

const kib = (bytes: number) => Math.round((bytes / 1024) * 10) / 10;

interface Front {
  url: string;
  /** True when the child server itself serves our build; false when a front on another port serves it and passes the rest on. */
  direct: boolean;
  close(): Promise<void>;
}

/**
 * Where the browser opens Holdline. When the child serves our build (HOLDLINE_TEST_CLIENT_DIR
 * honoured), the child itself. Otherwise a front on 127.0.0.1 serves the build's files with the
 * child's own answer headers (its security policy) and passes /api and /socket.io (WebSocket
 * included) to the child, keeping the browser's Host so the server's same-origin check holds.
 */
async function frontFor(server: { url: string }, dist: string): Promise<Front> {
  const ours = readFileSync(path.join(dist, 'index.html'), 'utf8');
  const served = await (await fetch(`${server.url}/sign-in`)).text();
  if (served === ours) return { url: server.url, direct: true, close: async () => {} };
  const child = new URL(server.url);
  const childPort = Number(child.port);
  const passOn = (pathname: string) => pathname.startsWith('/api/') || pathname.startsWith('/socket.io/');
  const front = http.createServer((req, res) => {
    const pathname = new URL(req.url ?? '/', 'http://localhost').pathname;
    const upstream = http.request({ host: '127.0.0.1', port: childPort, method: req.method, path: req.url, headers: req.headers }, (answer) => {
      if (passOn(pathname)) {
        res.writeHead(answer.statusCode ?? 502, answer.headers);
        answer.pipe(res);
        return;
      }
      answer.resume();
      const file = fileIn(dist, pathname) ?? path.join(dist, 'index.html');
      const body = readFileSync(file);
      const headers = { ...answer.headers };
      for (const name of ['content-length', 'content-type', 'content-encoding', 'transfer-encoding', 'etag', 'last-modified', 'accept-ranges', 'cache-control']) delete headers[name];
      res.writeHead(200, {
        ...headers,
        'content-type': contentTypeOf(file),
        'content-length': String(body.length),
        'cache-control': file.endsWith('index.html') ? 'no-cache' : 'public, max-age=3600',
      });
      res.end(req.method === 'HEAD' ? undefined : body);
    });
    upstream.once('error', () => {
      if (!res.headersSent) res.writeHead(502);
      res.end();
    });
    req.pipe(upstream);
  });
  front.on('upgrade', (req: http.IncomingMessage, socket: net.Socket, head: Buffer) => {
    const upstream = net.connect(childPort, '127.0.0.1', () => {
      const lines = [`${req.method} ${req.url} HTTP/${req.httpVersion}`];
      for (let i = 0; i < req.rawHeaders.length; i += 2) lines.push(`${req.rawHeaders[i]}: ${req.rawHeaders[i + 1]}`);
      upstream.write(lines.join('\r\n') + '\r\n\r\n');
      if (head.length > 0) upstream.write(head);
      upstream.pipe(socket);
      socket.pipe(upstream);
    });
    upstream.once('error', () => socket.destroy());
    socket.once('error', () => upstream.destroy());
  });
  await new Promise<void>((resolve, reject) => {
    front.once('error', reject);
    front.listen(0, '127.0.0.1', () => resolve());
  });
  const { port } = front.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}`,
    direct: false,
    close: () =>
      new Promise<void>((resolve) => {
        front.closeAllConnections();
        front.close(() => resolve());
      }),
  };
}

/** The operator's refresh cookie (a fresh sign-in through the API), for a browser context to start signed in. */
async function operatorSession(baseUrl: string): Promise<{ token: string; refreshCookie: { name: string; value: string } }> {
  const res = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email: OPERATOR, password: DEMO_PASSWORD }),
  });
  if (res.status !== 200) throw new Error(`operator sign-in answered ${res.status}: ${await res.text()}`);
  const { token } = (await res.json()) as { token: string };
  const cookie = res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .find((c) => c.startsWith('holdline_refresh='));
  if (!cookie) throw new Error('operator sign-in set no refresh cookie');
  const eq = cookie.indexOf('=');
  return { token, refreshCookie: { name: cookie.slice(0, eq), value: cookie.slice(eq + 1) } };
}

/** The demo's live job the operator is crew on, and the stage title the cab shows first. */
async function cabTarget(baseUrl: string, token: string): Promise<{ jobId: string; stageTitle: string }> {
  const headers = { Authorization: `Bearer ${token}` };
  const jobs = (await (await fetch(`${baseUrl}/api/jobs`, { headers })).json()) as { items: { id: string; name: string; state: string }[] };
  const job = jobs.items.find((j) => j.name === DEMO_LIVE_JOB) ?? jobs.items.find((j) => j.state === 'live');
  if (!job) throw new Error(`no live job on the operator's list: ${JSON.stringify(jobs).slice(0, 500)}`);
  const board = (await (await fetch(`${baseUrl}/api/jobs/${job.id}/board`, { headers })).json()) as BoardSnapshot;
  const stage = focusStage(board);
  if (!stage) throw new Error(`the live job ${job.id} has no stage in progress, so its cab shows no stage title`);
  return { jobId: job.id, stageTitle: stage.title };
}

/**
 * Runs in the page before any of its scripts: watches the DOM for the proof and, on the animation
 * frame after it shows (the frame that paints it), reports performance.now(), which counts from
 * the start of the navigation. It polls only while the element is there but not yet shown (wrong
 * text, no box yet, the not-live cover still up), so the watch costs the throttled CPU next to
 * nothing. Plain JavaScript in a string: a function compiled by tsx would carry its `__name`
 * helper into the page, where it does not exist.
 */
function watchForContent(proof: ContentProof): string {
  return `(() => {
  const proof = ${JSON.stringify(proof)};
  let done = false;
  let polling = false;
  const state = () => {
    const el = document.querySelector(proof.selector);
    if (!el) return 'absent';
    if (proof.text !== null && (el.textContent || '').trim() !== proof.text) return 'waiting';
    if (proof.absent !== null && document.querySelector(proof.absent)) return 'waiting';
    const box = el.getBoundingClientRect();
    return box.width > 0 && box.height > 0 ? 'shown' : 'waiting';
  };
  const check = () => {
    polling = false;
    if (done) return;
    const now = state();
    if (now === 'shown') {
      done = true;
      observer.disconnect();
      requestAnimationFrame(() => void window.__benchContentShown(performance.now()));
    } else if (now === 'waiting') {
      polling = true;
      requestAnimationFrame(check);
    }
  };
  const observer = new MutationObserver(() => {
    if (!polling) check();
  });
  observer.observe(document, { childList: true, subtree: true, characterData: true, attributes: true });
})();`;
}

interface LoadOptions {
  /** The slow phone's network and CPU; the HTTP cache is off either way. */
  slow: boolean;
  /** A refresh cookie to start signed in with. */
  cookie?: { name: string; value: string };
  trouble: PageTrouble;
  /** Read, gzip and weigh the responses: only for the loads whose sizes are reported, as it takes a second on a busy machine. */
  sizes: boolean;
}

/**
 * Opens `url` in a fresh context and resolves when the proof is shown. `slow` applies the slow
 * phone through CDP; the HTTP cache is off either way.
 */
async function loadPage(
  browser: Browser,
  url: string,
  proof: ContentProof,
  options: LoadOptions,
): Promise<LoadOutcome> {
  const context: BrowserContext = await browser.newContext({ viewport: PHONE_VIEWPORT });
  try {
    const origin = new URL(url).origin;
    if (options.cookie) {
      await context.addCookies([{ ...options.cookie, domain: new URL(url).hostname, path: '/api/auth', httpOnly: true, sameSite: 'Strict', secure: false }]);
    }
    const page: Page = await context.newPage();
    let shownAt: number | null = null;
    let resolveShown: (ms: number) => void = () => {};
    const shown = new Promise<number>((resolve) => (resolveShown = resolve));
    await page.exposeFunction('__benchContentShown', (ms: number) => {
      shownAt ??= ms;
      resolveShown(ms);
    });
    await page.addInitScript({ content: watchForContent(proof) });
    const responses: Response[] = [];
    page.on('response', (r) => {
      if (shownAt === null) responses.push(r);
    });
    page.on('request', (r) => {
      const u = r.url();
      if (!u.startsWith('data:') && !u.startsWith('blob:') && new URL(u).origin !== origin) options.trouble.foreignRequests.push(u);
    });
    page.on('console', (m) => {
      if (/Content Security Policy/i.test(m.text())) options.trouble.cspViolations.push(`${page.url()}: ${m.text()}`);
    });
    page.on('pageerror', (e) => options.trouble.pageErrors.push(`${page.url()}: ${e.message}`));
    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.setCacheDisabled', { cacheDisabled: true });
    if (options.slow) {
      await cdp.send('Network.emulateNetworkConditions', {
        offline: false,
        latency: SLOW_PHONE.latencyMs,
        downloadThroughput: SLOW_PHONE.bytesPerSecond,
        uploadThroughput: SLOW_PHONE.bytesPerSecond,
      });
      await cdp.send('Emulation.setCPUThrottlingRate', { rate: SLOW_PHONE.cpuSlowdown });
    }
    await page.goto(url, { waitUntil: 'commit', timeout: LOAD_TIMEOUT_MS });
    let timer: ReturnType<typeof setTimeout> | undefined;
    const firstContentMs = await Promise.race([
      shown,
      new Promise<never>((_, reject) => {
        timer = setTimeout(() => reject(new Error(`${url} did not show ${proof.selector}${proof.text ? ` "${proof.text}"` : ''} within ${LOAD_TIMEOUT_MS / 1000} s (now at ${page.url()})`)), LOAD_TIMEOUT_MS);
      }),
    ]).finally(() => clearTimeout(timer));
    const assets: LoadOutcome['assets'] = [];
    const bytesByKind: LoadOutcome['bytesByKind'] = {};
    for (const r of options.sizes ? responses : []) {
      const pathname = new URL(r.url()).pathname;
      const kind = pathname.endsWith('.js') ? 'js' : pathname.endsWith('.css') ? 'css' : null;
      let body: Buffer;
      try {
        body = await r.body();
      } catch {
        // A redirect or a response the page dropped has no body to count.
        continue;
      }
      const label = kind ?? r.request().resourceType();
      const sizes = await r.request().sizes();
      const seen = (bytesByKind[label] ??= { wire: 0, body: 0 });
      seen.wire += sizes.responseBodySize;
      seen.body += body.length;
      if (kind) assets.push({ url: r.url(), kind, bytes: body.length, gzipBytes: gzipSync(body, { level: GZIP_LEVEL }).length });
    }
    const kept = (await context.cookies()).find((c) => c.name === REFRESH_COOKIE);
    return { firstContentMs, assets, bytesByKind, requests: responses.length, refreshCookie: kept ? { name: kept.name, value: kept.value } : null };
  } finally {
    await context.close();
  }
}

const sum = (assets: LoadOutcome['assets'], kind: 'js' | 'css', field: 'bytes' | 'gzipBytes') =>
  assets.filter((a) => a.kind === kind).reduce((total, a) => total + a[field], 0);

const single = (value: number): Spread => spreadOf([value]);

/** Scenario 5: first-load JavaScript and CSS of the sign-in page and the cab view, and the first board on a slow phone against the empty page. */
export const client: Scenario = async ({ quick, log }): Promise<ScenarioResult> => {
  // Five rounds is the aim; a busy machine gets at least the minimum within the budget (page loads only: builds and the server's start are not counted).
  const rounds = quick ? { min: 1, max: 3, budgetMs: 10_000 } : { min: 5, max: 5, budgetMs: 60_000 };
  const notes: string[] = [];
  const correctness: Correctness = { gaps: 0, duplicates: 0, lostAcks: 0, rejected: 0 };
  const trouble: PageTrouble = { foreignRequests: [], cspViolations: [], pageErrors: [] };
  let server: BenchServer | null = null;
  let front: Front | null = null;
  let emptyServer: StaticServer | null = null;
  let browser: Browser | null = null;
  const startedAt = performance.now();
  try {
    log('client: the client and the empty page built (or reused from an earlier run with the same sources) and the seeded demo made ready');
    // The build must be in place before the server starts: it finds the compressed copies once, at start.
    const [builds, template] = await Promise.all([clientBuilds(), templateFor()]);
    server = await startHoldline({ env: { HOLDLINE_CLIENT_DIR: builds.holdline.dir } });
    const buildWords = (b: CachedEntry) => (b.seconds === null ? 'reused' : `built in ${b.seconds.toFixed(1)} s`);
    log(
      `client: client ${buildWords(builds.holdline)}, empty page ${buildWords(builds.empty)}; demo ${template.seededSeconds === null ? 'template reused' : `seeded in ${template.seededSeconds.toFixed(1)} s`}; ` +
        `server up after ${((performance.now() - startedAt) / 1000).toFixed(1)} s`,
    );

    front = await frontFor(server, builds.holdline.dir);
    if (!front.direct) {
      notes.push(
        "The server did not serve this run's client build (HOLDLINE_CLIENT_DIR not honoured), so a front on another port served the build's files with the server's own headers and passed /api and /socket.io through; the figures are of this run's build.",
      );
    }
    emptyServer = await serveFolder(builds.empty.dir);
    browser = await chromium.launch({
      executablePath: CHROMIUM_PATH,
      headless: true,
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });

    const first = await operatorSession(front.url);
    const target = await cabTarget(front.url, first.token);
    const cabUrl = `${front.url}/jobs/${target.jobId}/cab`;
    const cabProof: ContentProof = { selector: '#cab-stage-title', text: target.stageTitle, absent: '[data-testid="not-live"]' };
    const signInProof: ContentProof = { selector: 'input[type="password"]', text: null, absent: null };
    const emptyProof: ContentProof = { selector: '#empty-content', text: null, absent: null };

    // The sign-in page's size from a load at full speed (the bytes do not depend on the speed);
    // the cab view's and the empty page's from their first loads on the slow phone below.
    const signIn = await loadPage(browser, `${front.url}/sign-in`, signInProof, { slow: false, trouble, sizes: true });

    // The first board on the slow phone, alternating with the empty page, as many rounds as the
    // time allows between the minimum and the maximum.
    const boardRuns: number[] = [];
    const emptyRuns: number[] = [];
    const loadsFrom = performance.now();
    let cab: LoadOutcome | null = null;
    let empty: LoadOutcome | null = null;
    let refreshCookie: { name: string; value: string } | null = first.refreshCookie;
    for (let i = 0; i < rounds.max; i++) {
      const roundStart = performance.now();
      // The refresh token turns over on every use: each load starts from the cookie the last one
      // ended with (a sign-in costs a bcrypt on a busy machine), or from a fresh sign-in.
      const cookie = refreshCookie ?? (await operatorSession(front.url)).refreshCookie;
      const board = await loadPage(browser, cabUrl, cabProof, { slow: true, cookie, trouble, sizes: cab === null });
      refreshCookie = board.refreshCookie;
      cab ??= board;
      boardRuns.push(Math.round(board.firstContentMs));
      const baseline = await loadPage(browser, `${emptyServer.url}/`, emptyProof, { slow: true, trouble, sizes: empty === null });
      empty ??= baseline;
      emptyRuns.push(Math.round(baseline.firstContentMs));
      log(`client: round ${i + 1}: first board ${Math.round(board.firstContentMs)} ms, empty page ${Math.round(baseline.firstContentMs)} ms`);
      const roundMs = performance.now() - roundStart;
      if (i + 1 >= rounds.min && performance.now() - loadsFrom + roundMs > rounds.budgetMs) break;
    }
    if (!cab || !empty) throw new Error('unreachable: no round ran');
    for (const [name, load] of [['sign-in', signIn], ['cab', cab], ['empty page', empty]] as const) {
      log(
        `client: ${name}: JS ${kib(sum(load.assets, 'js', 'gzipBytes'))} KiB gzip (${kib(sum(load.assets, 'js', 'bytes'))} KiB raw, ${load.assets.filter((a) => a.kind === 'js').length} files), ` +
          `CSS ${kib(sum(load.assets, 'css', 'gzipBytes'))} KiB gzip (${kib(sum(load.assets, 'css', 'bytes'))} KiB raw)`,
      );
    }
    const emptyLoad = empty;

    const figures: Figure[] = [];
    const sizeFigure = (id: string, label: string, load: LoadOutcome, kind: 'js' | 'css', budget: boolean): Figure => {
      const value = kib(sum(load.assets, kind, 'gzipBytes'));
      return {
        id,
        label,
        unit: 'KiB',
        better: 'lower',
        values: { holdline: single(value), 'empty-page': single(kib(sum(emptyLoad.assets, kind, 'gzipBytes'))) },
        ...(budget ? { target: { text: `≤ ${JS_BUDGET_KIB} KiB gzip`, met: value <= JS_BUDGET_KIB } } : {}),
      };
    };
    figures.push(sizeFigure('client.sign-in.js.gzip', `sign-in page, first-load JavaScript (gzip -${GZIP_LEVEL})`, signIn, 'js', true));
    figures.push(sizeFigure('client.sign-in.css.gzip', `sign-in page, first-load CSS (gzip -${GZIP_LEVEL})`, signIn, 'css', false));
    figures.push(sizeFigure('client.cab.js.gzip', `cab view, first-load JavaScript (gzip -${GZIP_LEVEL})`, cab, 'js', true));
    figures.push(sizeFigure('client.cab.css.gzip', `cab view, first-load CSS (gzip -${GZIP_LEVEL})`, cab, 'css', false));
    const boardSpread = spreadOf(boardRuns);
    const emptySpread = spreadOf(emptyRuns);
    const ratio = boardSpread.median / emptySpread.median;
    const values: Partial<Record<System, Spread>> = { holdline: boardSpread, 'empty-page': emptySpread };
    figures.push({
      id: 'client.cab.first-board',
      label: `first board with data, cab view, slow phone (${SLOW_PHONE.latencyMs} ms RTT, 1.6 Mbit/s, ${SLOW_PHONE.cpuSlowdown}× CPU)`,
      unit: 'ms',
      better: 'lower',
      values,
      ratio: { against: 'empty-page', value: Math.round(ratio * 100) / 100 },
      target: { text: `≤ ${FIRST_BOARD_RATIO_TARGET}× the empty page`, met: ratio <= FIRST_BOARD_RATIO_TARGET },
    });

    const wire = (load: LoadOutcome) =>
      Object.entries(load.bytesByKind)
        .sort((a, b) => b[1].wire - a[1].wire)
        .map(([kind, b]) => `${kind} ${kib(b.wire)} KiB${b.wire < b.body ? ` (${kib(b.body)} KiB unpacked)` : ''}`)
        .join(', ');
    notes.push(`Over the wire before the first board: cab view ${cab.requests} responses, ${wire(cab)}; empty page ${emptyLoad.requests} responses, ${wire(emptyLoad)}.`);
    notes.push(
      `Sizes: every .js and .css response a fresh page received before its content showed (sign-in: the password field; cab: the focused stage's title with the board live; empty page: its banner), each body gzipped with zlib level ${GZIP_LEVEL}.`,
    );
    notes.push(
      `First board: in headless Chromium, cache off, CDP network ${SLOW_PHONE.latencyMs} ms latency and ${SLOW_PHONE.bytesPerSecond} B/s down and up, CPU slowed ${SLOW_PHONE.cpuSlowdown}×; from the start of navigating to the cab view (operator signed in beforehand: the refresh cookie of an API sign-in) to the frame after "${target.stageTitle}" appeared; ${boardRuns.length} round(s) alternating with the empty page${boardRuns.length < 5 ? ` (fewer than five: the scenario's ${rounds.budgetMs / 1000} s budget for slow-phone loads${quick ? ', quick run' : ''})` : ''}.`,
    );
    const troubles = trouble.foreignRequests.length + trouble.cspViolations.length + trouble.pageErrors.length;
    notes.push(
      `${troubles > 0 ? 'PROBLEM: ' : ''}Requests to other hosts: ${trouble.foreignRequests.length}; content security policy violations: ${trouble.cspViolations.length}; uncaught page errors: ${trouble.pageErrors.length}.` +
        [...trouble.foreignRequests, ...trouble.cspViolations, ...trouble.pageErrors].slice(0, 5).map((t) => ` ${t}`).join(''),
    );
    notes.push('No board commands are sent here: the correctness counts are zero by construction.');
    return { id: 'client', title: 'Client: first-load size and first board on a slow phone', figures, correctness, notes };
  } finally {
    await browser?.close().catch(() => {});
    await emptyServer?.close();
    await front?.close();
    await server?.stop();
  }
};
