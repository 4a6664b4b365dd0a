import type { IncomingMessage } from 'node:http';
import type { RequestHandler } from 'express';
import { HttpError } from '../errors.js';

/**
 * The edge every request body and socket payload passes before any route or handler reads it.
 * It does not judge what the fields mean (the shared zod schemas do); it makes sure nothing a
 * schema cannot describe reaches them: text with lone UTF-16 surrogates (the canonical JSON that
 * hashes a job's log refuses them, while the database would store them), keys that reach into a
 * JavaScript object's prototype, and nesting deeper than any of our forms. Limits on size and
 * rate live here too, so the numbers are in one place.
 */

/** The largest JSON body /api reads (express.json's limit; 413 `too_large` above it). */
export const JSON_BODY_LIMIT = '1mb';
/** Deeper nesting than this (objects and arrays) is refused: no form of ours nests past ten. */
export const MAX_JSON_DEPTH = 32;
/**
 * The largest Socket.IO message (`maxHttpBufferSize`, Socket.IO's own default, stated here). A
 * bigger one cannot be read at all: the server closes that client's transport, and the client
 * sees a "transport close" and reconnects and resyncs by itself (the message is not answered).
 */
export const SOCKET_MESSAGE_LIMIT_BYTES = 1_000_000;
/**
 * Messages one socket may send: `burst` at once, refilled at `perSecond`. A crew member taps a
 * few times a minute; a reconnect sends a join and a follow; a stuck client or a script sending
 * hundreds a second is slowed down before it reaches the write queue the whole crew shares.
 */
export const COMMAND_RATE = { perSecond: 20, burst: 40 } as const;
/** A sender's message rate: so many a second, after a first burst of so many. */
export interface CommandRateSetting {
  perSecond: number;
  burst: number;
}
/**
 * Stops have their own small bucket, apart from `COMMAND_RATE`: a flood of other messages never
 * holds a stop back, and the first press always gets through unless the same sender pressed stop
 * `burst` times in the last few seconds (the job is already stopped then). Each stop the server
 * takes is a hash-chained event written under the queue the whole crew shares, so a flood of
 * stops is held to a few recorded presses; one refused is kept by the board and sent again.
 */
export const STOP_RATE = { perSecond: 1, burst: 3 } as const;

/** Keys that reach a JavaScript object's prototype when copied; no schema of ours has them. */
const FORBIDDEN_KEYS = new Set(['__proto__', 'constructor', 'prototype']);

export const tooDeep = () =>
  new HttpError(400, 'too_deep', `The request is nested more than ${MAX_JSON_DEPTH} levels deep, which no Holdline form sends. Send it again from the app; if it keeps happening, tell your administrator.`);

export const forbiddenField = (key: string) =>
  new HttpError(400, 'forbidden_field', `The request carries a field named “${key}”, which Holdline never accepts. Send it again from the app; if it keeps happening, tell your administrator.`);

/** Who the rate is counted for, in the refusal's words: one socket is one device; over HTTP, one person. */
export type RateSender = 'device' | 'person';
const senderWords = (sender: RateSender) => (sender === 'device' ? 'this device' : 'you');

export const tooManyCommands = (sender: RateSender = 'device') =>
  new HttpError(429, 'too_many_commands', `Too many messages from ${senderWords(sender)} at once (more than ${COMMAND_RATE.perSecond} a second). Wait a second and try again; nothing of the refused ones was done.`);

export const tooManyStops = (sender: RateSender = 'device') =>
  new HttpError(429, 'too_many_commands', `Stop was sent more than ${STOP_RATE.burst} times within a few seconds from ${senderWords(sender)}; the earlier presses are recorded. Wait a second and press stop again if the job is not shown as stopped; the refused presses were not recorded.`);

/**
 * express.json's `verify` hook: counts the nesting of the raw body before it is parsed, so a body
 * of a million brackets is refused without being built. Brackets inside strings are text. Only
 * for UTF-8 (every client of ours): in UTF-16 a bracket's byte can be half of another character,
 * so such a body is left to `cleanInput`'s count after parsing.
 */
export function refuseDeepJson(_req: IncomingMessage, _res: unknown, body: Buffer, encoding = 'utf-8'): void {
  if (!/^utf-?8$/i.test(encoding)) return;
  let depth = 0;
  let inString = false;
  let escaped = false;
  for (const byte of body) {
    if (inString) {
      if (escaped) escaped = false;
      else if (byte === 0x5c) escaped = true;
      else if (byte === 0x22) inString = false;
    } else if (byte === 0x22) inString = true;
    else if (byte === 0x7b || byte === 0x5b) {
      if (++depth > MAX_JSON_DEPTH) throw tooDeep();
    } else if (byte === 0x7d || byte === 0x5d) depth--;
  }
}

/** A high surrogate not followed by a low one, or a low one not preceded by a high one. */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g;
const cleanText = (text: string) => text.replace(LONE_SURROGATE, '\uFFFD');

/**
 * The same value with every lone UTF-16 surrogate (in text and in keys) replaced by U+FFFD, as
 * the database and the browser already show them; refuses forbidden keys and nesting deeper than
 * `MAX_JSON_DEPTH` with a 400. Objects and arrays are cleaned in place (they are the request's
 * own); a value that is not JSON-like (a Buffer sent over the socket) is left to the schema.
 * Iterative, so no payload can exhaust the stack.
 */
export function cleanInput(value: unknown): unknown {
  if (typeof value === 'string') return cleanText(value);
  if (!isContainer(value)) return value;
  const stack: { node: Record<string, unknown> | unknown[]; depth: number }[] = [{ node: value, depth: 1 }];
  while (stack.length) {
    const { node, depth } = stack.pop()!;
    if (depth > MAX_JSON_DEPTH) throw tooDeep();
    if (Array.isArray(node)) {
      for (let i = 0; i < node.length; i++) {
        const item: unknown = node[i];
        if (typeof item === 'string') node[i] = cleanText(item);
        else if (isContainer(item)) stack.push({ node: item, depth: depth + 1 });
      }
      continue;
    }
    for (const key of Object.keys(node)) {
      if (FORBIDDEN_KEYS.has(key)) throw forbiddenField(key);
      let item = node[key];
      if (typeof item === 'string') item = cleanText(item);
      else if (isContainer(item)) stack.push({ node: item, depth: depth + 1 });
      const cleanKey = cleanText(key);
      if (cleanKey !== key) delete node[key];
      // defineProperty, never assignment: a key is data here, whatever its name.
      Object.defineProperty(node, cleanKey, { value: item, enumerable: true, writable: true, configurable: true });
    }
  }
  return value;
}

function isContainer(value: unknown): value is Record<string, unknown> | unknown[] {
  if (Array.isArray(value)) return true;
  if (typeof value !== 'object' || value === null) return false;
  const proto: unknown = Object.getPrototypeOf(value);
  return proto === Object.prototype || proto === null;
}

/** After express.json: the body cleaned as `cleanInput` says, or the request refused. */
export const inputGuard: RequestHandler = (req, _res, next) => {
  if (req.body !== undefined) req.body = cleanInput(req.body);
  next();
};

/** A token bucket: `take()` is false when the sender has used up its burst and the refill. */
export class RateBucket {
  private tokens: number;
  private last: number;

  constructor(
    private readonly perSecond: number,
    private readonly burst: number,
    private readonly clock: () => number = () => performance.now(),
  ) {
    this.tokens = burst;
    this.last = clock();
  }

  take(): boolean {
    this.refill();
    if (this.tokens < 1) return false;
    this.tokens -= 1;
    return true;
  }

  /** How long until `take()` would be true again (0 when it is now). */
  waitMs(): number {
    this.refill();
    return this.tokens >= 1 ? 0 : ((1 - this.tokens) / this.perSecond) * 1000;
  }

  /** True when the bucket has refilled to its burst: it is then the same as a new one. */
  isFull(): boolean {
    this.refill();
    return this.tokens >= this.burst;
  }

  private refill(): void {
    const now = this.clock();
    this.tokens = Math.min(this.burst, this.tokens + ((now - this.last) / 1000) * this.perSecond);
    this.last = now;
  }
}

/**
 * One sender's board-command rate: every message draws from `COMMAND_RATE`, except a stop, which
 * is decided by its own `STOP_RATE` bucket alone. So a flood of other messages never holds a stop
 * back, and a flood of stops never writes more than a few events.
 */
export class CommandRate {
  private readonly messages: RateBucket;
  private readonly stops: RateBucket;

  constructor(clock?: () => number, rate: CommandRateSetting = COMMAND_RATE) {
    this.messages = new RateBucket(rate.perSecond, rate.burst, clock);
    this.stops = new RateBucket(STOP_RATE.perSecond, STOP_RATE.burst, clock);
  }

  /** Null when the message may go on; otherwise the refusal and how long to wait. */
  take(isStop: boolean, sender: RateSender): { error: HttpError; waitMs: number } | null {
    const bucket = isStop ? this.stops : this.messages;
    if (bucket.take()) return null;
    return { error: isStop ? tooManyStops(sender) : tooManyCommands(sender), waitMs: bucket.waitMs() };
  }

  isIdle(): boolean {
    return this.messages.isFull() && this.stops.isFull();
  }
}

/**
 * `CommandRate` per person, for board commands over HTTP (keyed by the user id, whatever device or
 * address they come from). A person whose buckets have refilled is forgotten, so the map holds only
 * people who sent commands in the last few seconds.
 */
export class PersonCommandRates {
  private readonly rates = new Map<string, CommandRate>();

  constructor(
    private readonly clock?: () => number,
    private readonly rate: CommandRateSetting = COMMAND_RATE,
  ) {}

  take(userId: string, isStop: boolean): { error: HttpError; waitMs: number } | null {
    if (this.rates.size >= 256) for (const [id, rate] of this.rates) if (rate.isIdle()) this.rates.delete(id);
    let rate = this.rates.get(userId);
    if (!rate) this.rates.set(userId, (rate = new CommandRate(this.clock, this.rate)));
    return rate.take(isStop, 'person');
  }
}

/** A board command that stops the job, by its type alone (the schema checks the rest later; this only decides the rate). */
export function isStopCommand(command: unknown): boolean {
  return typeof command === 'object' && command !== null && 'type' in command && command.type === 'job.stop';
}
