import { describe, expect, it } from 'vitest';
import { ADDRESS_FREE_FAILURES, addressKey, delayAfter, FORGET_AFTER_MS, MAX_DELAY_MS, PAIR_FREE_FAILURES, ResetLimiter, RESET_PER_ACCOUNT, RESET_PER_ADDRESS, RESET_WINDOW_MS, SignInThrottle } from '../../../server/auth/throttle.js';

/** The throttle's bookkeeping on its own clock, with no bcrypt and no server. */
describe('the sign-in throttle', () => {
  const t0 = Date.parse('2026-12-03T08:00:00Z');
  const at = (ms: number) => new Date(t0 + ms);

  /** Fails `n` times at `ms`, each waiting first for whatever wait the throttle asks; returns the clock after. */
  function failRepeatedly(throttle: SignInThrottle, email: string, address: string, n: number, ms = 0): number {
    let clock = ms;
    for (let i = 0; i < n; i++) {
      clock += throttle.waitMs(email, address, at(clock));
      throttle.begin(email, address, at(clock));
    }
    return clock;
  }

  it('lets the first failures through, then doubles the wait from 1 s up to 15 minutes', () => {
    // The waits written out by hand: none for the free failures, then 1, 2, 4, 8 … seconds, capped.
    const expected = [0, 0, 0, 0, 0, 1000, 2000, 4000, 8000, 16000, 32000, 64000, 128000, 256000, 512000, 900000, 900000];
    expect(expected.map((_, n) => delayAfter(n, PAIR_FREE_FAILURES))).toEqual(expected);
    expect(delayAfter(1000, PAIR_FREE_FAILURES)).toBe(MAX_DELAY_MS);

    const throttle = new SignInThrottle();
    failRepeatedly(throttle, 'a@example.test', '198.51.100.1', PAIR_FREE_FAILURES);
    expect(throttle.waitMs('a@example.test', '198.51.100.1', at(0))).toBe(1000);
    expect(throttle.waitMs('A@Example.test ', '198.51.100.1', at(0))).toBe(1000);
    // The same person from another address, and another person from the same address, go ahead.
    expect(throttle.waitMs('a@example.test', '198.51.100.2', at(0))).toBe(0);
    expect(throttle.waitMs('b@example.test', '198.51.100.1', at(0))).toBe(0);
  });

  it('clears the account-and-address count on a success and takes back an attempt that was not a wrong password', () => {
    const throttle = new SignInThrottle();
    failRepeatedly(throttle, 'a@example.test', '198.51.100.1', PAIR_FREE_FAILURES - 1);
    throttle.begin('a@example.test', '198.51.100.1', at(0)).withdrawn();
    expect(throttle.waitMs('a@example.test', '198.51.100.1', at(0))).toBe(0);
    throttle.begin('a@example.test', '198.51.100.1', at(0)).succeeded();
    failRepeatedly(throttle, 'a@example.test', '198.51.100.1', PAIR_FREE_FAILURES - 1);
    expect(throttle.waitMs('a@example.test', '198.51.100.1', at(0))).toBe(0);
  });

  it('slows one address trying many accounts after its own allowance, and forgets after an hour', () => {
    const throttle = new SignInThrottle();
    for (let i = 0; i < ADDRESS_FREE_FAILURES; i++) throttle.begin(`person-${i}@example.test`, '198.51.100.9', at(0));
    expect(throttle.waitMs('someone-new@example.test', '198.51.100.9', at(0))).toBe(1000);
    expect(throttle.waitMs('someone-new@example.test', '198.51.100.10', at(0))).toBe(0);
    expect(throttle.waitMs('someone-new@example.test', '198.51.100.9', at(FORGET_AFTER_MS + 1))).toBe(0);
  });

  it('counts an IPv6 address by its /64 network, and an IPv4-mapped one as IPv4', () => {
    // Written out by hand from RFC 4291's text forms (section 2.2) and its IPv4-mapped form (2.5.5.2).
    expect(addressKey('2001:db8:85a3:1:2:3:4:5')).toBe('2001:db8:85a3:1::/64');
    expect(addressKey('2001:0db8:0000:0001::7')).toBe('2001:db8:0:1::/64');
    expect(addressKey('2001:db8::1')).toBe('2001:db8:0:0::/64');
    expect(addressKey('::1')).toBe('0:0:0:0::/64');
    expect(addressKey('fe80::1%eth0')).toBe('fe80:0:0:0::/64');
    expect(addressKey('::ffff:192.0.2.7')).toBe('192.0.2.7');
    expect(addressKey('192.0.2.7')).toBe('192.0.2.7');

    const throttle = new SignInThrottle();
    for (let i = 0; i < PAIR_FREE_FAILURES; i++) throttle.begin('a@example.test', `2001:db8:1:2::${i + 1}`, at(0));
    // Another address of the same /64 waits; another /64 does not.
    expect(throttle.waitMs('a@example.test', '2001:db8:1:2::ffff', at(0))).toBe(1000);
    expect(throttle.waitMs('a@example.test', '2001:db8:1:3::1', at(0))).toBe(0);
  });

  it('never asks a wait longer than 15 minutes, however many failures', () => {
    const throttle = new SignInThrottle();
    const clock = failRepeatedly(throttle, 'a@example.test', '198.51.100.1', 40);
    expect(throttle.waitMs('a@example.test', '198.51.100.1', at(clock))).toBe(MAX_DELAY_MS);
  });
});

describe('the reset limiter', () => {
  const t0 = Date.parse('2026-12-03T08:00:00Z');
  const at = (ms: number) => new Date(t0 + ms);

  it('allows a few e-mails per account and per address in a sliding hour', () => {
    const limiter = new ResetLimiter();
    const allowed = Array.from({ length: 10 }, (_, i) => limiter.allow('a@example.test', `192.0.2.${i}`, at(i)));
    expect(allowed.filter(Boolean)).toHaveLength(RESET_PER_ACCOUNT);
    // An hour after the first requests the account may have one again, however much it was asked meanwhile.
    expect(limiter.allow('a@example.test', '192.0.2.99', at(RESET_WINDOW_MS + 10))).not.toBeNull();

    const fromOne = Array.from({ length: RESET_PER_ADDRESS + 5 }, (_, i) => limiter.allow(`p${i}@example.test`, '198.51.100.5', at(0)));
    expect(fromOne.filter(Boolean)).toHaveLength(RESET_PER_ADDRESS);
  });

  it('counts against the account only the e-mails that go out: refused requests cannot keep a person from ever getting one', () => {
    const limiter = new ResetLimiter();
    const minute = 60_000;
    for (let i = 0; i < RESET_PER_ACCOUNT; i++) expect(limiter.allow('b@example.test', `192.0.2.${i}`, at(0))).not.toBeNull();
    // Someone keeps asking for the same person from elsewhere just before the hour runs out: refused, and not counted.
    for (const m of [20, 40, 59]) expect(limiter.allow('b@example.test', `203.0.113.${m}`, at(m * minute))).toBeNull();
    // An hour after the e-mails that went out, the person's own request sends one.
    expect(limiter.allow('b@example.test', '198.51.100.77', at(RESET_WINDOW_MS))).not.toBeNull();
  });

  it('gives a request back to the account when no e-mail went out for it (no such active account)', () => {
    const limiter = new ResetLimiter();
    for (let i = 0; i < RESET_PER_ACCOUNT + 2; i++) limiter.allow('nobody@example.test', `192.0.2.${i}`, at(i))!.notSent();
    expect(limiter.allow('nobody@example.test', '192.0.2.50', at(10))).not.toBeNull();
    // The address still counts every request, sent or not.
    const limiter2 = new ResetLimiter();
    for (let i = 0; i < RESET_PER_ADDRESS; i++) limiter2.allow(`q${i}@example.test`, '198.51.100.9', at(i))?.notSent();
    expect(limiter2.allow('someone@example.test', '198.51.100.9', at(20))).toBeNull();
  });
});
