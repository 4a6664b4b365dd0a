import { isIPv6 } from 'node:net';
import { sha256Hex } from './hash.js';

/**
 * Slowing down password guessing without locking anyone out.
 *
 * A wrong password costs a wait that grows with each further failure, counted per account AND
 * address together (the attacker at one address guessing one person's password) and per address
 * alone (one address trying many accounts). Nothing is counted per account alone: failures from
 * elsewhere never stop the person signing in with the right password from their own tablet.
 * A sign-in that succeeds clears its account-and-address count.
 *
 * Each attempt is counted when it starts, not when bcrypt has answered, so a burst of parallel
 * guesses cannot all slip through before the first failure is recorded; a success takes its
 * count back.
 */

/** Failures of one person from one address before any wait (mistyping is human). */
export const PAIR_FREE_FAILURES = 5;
/** Failures from one address over all accounts before any wait: a site's tablets share one address. */
export const ADDRESS_FREE_FAILURES = 30;
/** The first wait; each further failure doubles it. */
export const FIRST_DELAY_MS = 1000;
/** No wait is longer than this. */
export const MAX_DELAY_MS = 15 * 60 * 1000;
/** A count forgotten after this long without a failure. */
export const FORGET_AFTER_MS = 60 * 60 * 1000;
/** At most this many counts are kept; the oldest go first, so a flood of addresses cannot fill memory. */
const MAX_ENTRIES = 50_000;

interface Count {
  failures: number;
  lastAt: number;
}

/** The wait after `failures` failures when `free` of them cost nothing: 0, then 1 s, 2 s, 4 s… up to 15 minutes. */
export function delayAfter(failures: number, free: number): number {
  if (failures < free) return 0;
  const doublings = Math.min(failures - free, 30);
  return Math.min(FIRST_DELAY_MS * 2 ** doublings, MAX_DELAY_MS);
}

/** A bounded table of counts with their last time, kept in memory by one server process. */
class Counts {
  private readonly map = new Map<string, Count>();

  get(key: string, nowMs: number): Count | null {
    const found = this.map.get(key);
    if (!found) return null;
    if (nowMs - found.lastAt > FORGET_AFTER_MS) {
      this.map.delete(key);
      return null;
    }
    return found;
  }

  add(key: string, nowMs: number): void {
    const found = this.get(key, nowMs);
    this.map.delete(key);
    this.map.set(key, { failures: (found?.failures ?? 0) + 1, lastAt: nowMs });
    // A Map keeps insertion order and each touch re-inserts: the first key is the least recent.
    while (this.map.size > MAX_ENTRIES) this.map.delete(this.map.keys().next().value as string);
  }

  takeBack(key: string): void {
    const found = this.map.get(key);
    if (!found) return;
    if (found.failures <= 1) this.map.delete(key);
    else found.failures -= 1;
  }

  clear(key: string): void {
    this.map.delete(key);
  }
}

/** The counted attempt a route holds while bcrypt decides. */
export interface SignInAttempt {
  /** The password matched: the account-and-address count is cleared, the address's is taken back. */
  succeeded(): void;
  /** Anything else but a wrong password (a deactivated account, a server error): the attempt is taken back. */
  withdrawn(): void;
}

/** Per account-and-address and per address sign-in throttle (see the module comment). */
export class SignInThrottle {
  private readonly pairs = new Counts();
  private readonly addresses = new Counts();

  /**
   * How long this account must wait at this address before another try, in ms (0: go ahead).
   * E-mails are hashed, so the table holds no addresses of people.
   */
  waitMs(email: string, ip: string, now: Date): number {
    const address = addressKey(ip);
    const nowMs = now.getTime();
    const waits = [this.waitOf(this.pairs, pairKey(email, address), PAIR_FREE_FAILURES, nowMs), this.waitOf(this.addresses, address, ADDRESS_FREE_FAILURES, nowMs)];
    return Math.max(...waits);
  }

  /** Counts an attempt as a failure now; the route says later whether it was one. */
  begin(email: string, ip: string, now: Date): SignInAttempt {
    const address = addressKey(ip);
    const key = pairKey(email, address);
    this.pairs.add(key, now.getTime());
    this.addresses.add(address, now.getTime());
    let settled = false;
    const settle = (action: () => void) => {
      if (settled) return;
      settled = true;
      action();
    };
    return {
      succeeded: () =>
        settle(() => {
          this.pairs.clear(key);
          this.addresses.takeBack(address);
        }),
      withdrawn: () =>
        settle(() => {
          this.pairs.takeBack(key);
          this.addresses.takeBack(address);
        }),
    };
  }

  private waitOf(counts: Counts, key: string, free: number, nowMs: number): number {
    const found = counts.get(key, nowMs);
    if (!found) return 0;
    return Math.max(0, found.lastAt + delayAfter(found.failures, free) - nowMs);
  }
}

function pairKey(email: string, address: string): string {
  return `${sha256Hex(email.trim().toLowerCase())}|${address}`;
}

/**
 * The address a count is kept for: an IPv4 address as it is (also when written IPv4-mapped), an
 * IPv6 address by its /64 network, since one subscriber is usually given a whole /64 and could
 * otherwise take a fresh address for every guess.
 */
export function addressKey(ip: string): string {
  const mapped = /^::ffff:(\d{1,3}(?:\.\d{1,3}){3})$/i.exec(ip);
  if (mapped) return mapped[1];
  if (!isIPv6(ip)) return ip;
  const [head, tail = ''] = ip.toLowerCase().split('%')[0].split('::');
  const left = head ? head.split(':') : [];
  const right = ip.includes('::') ? (tail ? tail.split(':') : []) : [];
  const groups = ip.includes('::') ? [...left, ...Array<string>(8 - left.length - right.length).fill('0'), ...right] : left;
  return `${groups.slice(0, 4).map((g) => g.replace(/^0+(?=.)/, '')).join(':')}::/64`;
}

/** Password-reset e-mails to one account within `RESET_WINDOW_MS`. */
export const RESET_PER_ACCOUNT = 3;
/** Password-reset requests from one address within `RESET_WINDOW_MS`. */
export const RESET_PER_ADDRESS = 10;
export const RESET_WINDOW_MS = 60 * 60 * 1000;

/** A reset request let through: its e-mail is counted against the account until it turns out none went out. */
export interface ResetTicket {
  /** No e-mail went out (no such active account): the account's count is given back. */
  notSent(): void;
}

/**
 * Password-reset requests per account and per address in a sliding hour. Over either limit the
 * request is answered with the same neutral words and nothing is sent, so the limit reveals
 * nothing about which e-mails have accounts and nobody's inbox is flooded.
 *
 * The address counts every request it makes (a flood keeps its own limit shut). The account counts
 * only the e-mails that actually go out: were refused requests counted too, anyone asking for a
 * person's reset a few times an hour would keep that person from ever getting one. A request let
 * through is counted at once (a burst in parallel cannot slip past the limit) and given back when
 * no e-mail went out for it.
 */
export class ResetLimiter {
  private readonly times = new Map<string, number[]>();

  /** Records the request; a ticket when an e-mail may go out for it, null when it may not. */
  allow(email: string, address: string, now: Date): ResetTicket | null {
    const nowMs = now.getTime();
    const accountKey = `account:${sha256Hex(email.trim().toLowerCase())}`;
    const fromKey = `address:${addressKey(address)}`;
    const account = this.recent(accountKey, nowMs);
    const fromAddress = this.recent(fromKey, nowMs);
    this.times.set(fromKey, [...fromAddress, nowMs]);
    const allowed = account.length < RESET_PER_ACCOUNT && fromAddress.length < RESET_PER_ADDRESS;
    this.times.set(accountKey, allowed ? [...account, nowMs] : account);
    while (this.times.size > MAX_ENTRIES) this.times.delete(this.times.keys().next().value as string);
    if (!allowed) return null;
    let given = false;
    return {
      notSent: () => {
        if (given) return;
        given = true;
        const kept = this.times.get(accountKey);
        if (!kept) return;
        const at = kept.lastIndexOf(nowMs);
        if (at >= 0) kept.splice(at, 1);
        if (kept.length === 0) this.times.delete(accountKey);
      },
    };
  }

  private recent(key: string, nowMs: number): number[] {
    const kept = (this.times.get(key) ?? []).filter((t) => nowMs - t < RESET_WINDOW_MS);
    this.times.delete(key);
    // A flood from one address keeps at most a window's worth of times, not every request.
    return kept.slice(-RESET_PER_ADDRESS * 2);
  }
}
