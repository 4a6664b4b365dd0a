import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { ChainWalker, commandHash, eventHash, GENESIS_HASH, verifyChain, type ChainedEvent } from '../../../shared/events/chain.js';

/** SHA-256 by Node's OpenSSL binding: an implementation independent of the one shared code uses. */
const nodeSha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');

describe('the chain hashes', () => {
  it('an event hash is SHA-256 of the previous hash and the RFC 8785 canonical JSON, in UTF-8', () => {
    const prev = 'ab'.repeat(32);
    const event = {
      jobId: 'j1',
      seq: 7,
      commandId: 'c-7',
      type: 'step.completed',
      byUserId: 'u1',
      byName: 'Zoë Ångström',
      role: 'rigger',
      at: '2026-12-03T10:00:00.000Z',
      data: { value: '18', stepId: 's-1', photoId: null, n: 1.5 },
    };
    // Written by hand: keys sorted by UTF-16 code units (RFC 8785 section 3.2.3), numbers as
    // ECMAScript prints them (section 3.2.2.3), no whitespace, non-ASCII left as is.
    const canonical =
      '{"at":"2026-12-03T10:00:00.000Z","by":"u1","byName":"Zoë Ångström","commandId":"c-7","data":{"n":1.5,"photoId":null,"stepId":"s-1","value":"18"},"jobId":"j1","role":"rigger","seq":7,"type":"step.completed"}';
    expect(eventHash(prev, event)).toBe(nodeSha256(prev + canonical));
  });

  it('a command hash is SHA-256 of the command’s canonical JSON', () => {
    expect(commandHash({ type: 'hold.release', holdId: 'h1', b: [2, 1] })).toBe(nodeSha256('{"b":[2,1],"holdId":"h1","type":"hold.release"}'));
    expect(commandHash(undefined)).toBe(nodeSha256('null'));
  });
});

/** A small valid chain built with the shared hash (checked against Node's above). */
function chain(n: number): ChainedEvent[] {
  const events: ChainedEvent[] = [];
  let prev = GENESIS_HASH;
  for (let seq = 1; seq <= n; seq++) {
    const fields = { jobId: 'j1', seq, commandId: `c-${seq}`, type: 'job.updated', byUserId: 'u1', byName: 'Sam', role: 'supervisor', at: `2026-12-03T10:00:0${seq % 10}.000Z`, data: { changes: { site: `Yard ${seq}` } } };
    const hash = eventHash(prev, fields);
    events.push({ ...fields, prevHash: prev, hash });
    prev = hash;
  }
  return events;
}

describe('checking a chain', () => {
  it('an intact chain gives its last hash; an empty log gives the genesis hash', () => {
    const events = chain(6);
    expect(verifyChain(events)).toEqual({ valid: true, checked: 6, firstBadSeq: null, problem: null, finalHash: events[5].hash });
    expect(verifyChain([])).toEqual({ valid: true, checked: 0, firstBadSeq: null, problem: null, finalHash: GENESIS_HASH });
  });

  it('a changed, deleted, swapped or redacted event is named by its seq and the reason', () => {
    const events = chain(6);
    const changed = events.map((e) => (e.seq === 3 ? { ...e, data: { changes: { site: 'Elsewhere' } } } : e));
    expect(verifyChain(changed)).toMatchObject({ valid: false, checked: 2, firstBadSeq: 3, problem: 'content', finalHash: null });
    expect(verifyChain(events.filter((e) => e.seq !== 4))).toMatchObject({ valid: false, checked: 3, firstBadSeq: 4, problem: 'sequence' });
    const swapped = [events[0], { ...events[3], seq: 2 }, events[2], { ...events[1], seq: 4 }, events[4], events[5]];
    expect(verifyChain(swapped)).toMatchObject({ valid: false, checked: 1, firstBadSeq: 2, problem: 'link' });
    const redacted = events.map((e) => (e.seq === 5 ? { ...e, redacted: true as const } : e));
    expect(verifyChain(redacted)).toMatchObject({ valid: false, checked: 4, firstBadSeq: 5, problem: 'redacted' });
  });

  it('the job row’s head catches a cut tail and a head that points elsewhere', () => {
    const events = chain(5);
    const walker = new ChainWalker();
    for (const e of events.slice(0, 4)) walker.push(e);
    expect(walker.result({ lastSeq: 5, headHash: events[4].hash })).toMatchObject({ valid: false, firstBadSeq: 5, problem: 'head' });
    const whole = new ChainWalker();
    for (const e of events) whole.push(e);
    expect(whole.result({ lastSeq: 5, headHash: 'f'.repeat(64) })).toMatchObject({ valid: false, firstBadSeq: 5, problem: 'head' });
  });

  it('an expected hash is found only among events that verify up to it', () => {
    const events = chain(6);
    expect(verifyChain(events, events[2].hash).expected).toEqual({ hash: events[2].hash, found: true, seq: 3 });
    expect(verifyChain(events, GENESIS_HASH).expected).toEqual({ hash: GENESIS_HASH, found: false, seq: null });
    // Broken at 3: the hash of event 5 is in the file but is not reached by a chain that verifies.
    const changed = events.map((e) => (e.seq === 3 ? { ...e, byName: 'Someone else' } : e));
    expect(verifyChain(changed, events[4].hash).expected).toEqual({ hash: events[4].hash, found: false, seq: null });
    expect(verifyChain(changed, events[1].hash).expected).toEqual({ hash: events[1].hash, found: true, seq: 2 });
  });
});
