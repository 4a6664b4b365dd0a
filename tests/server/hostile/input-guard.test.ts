import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { HttpError } from '../../../server/errors.js';
import { cleanInput, COMMAND_RATE, MAX_JSON_DEPTH, RateBucket, refuseDeepJson } from '../../../server/middlewares/input-guard.js';

/**
 * The edge's pure parts against independent references: lone surrogates against Node's own
 * `String.prototype.toWellFormed` (ECMAScript 2024, "Well-Formed Unicode Strings"), the raw depth
 * count against the depth of the parsed value measured recursively, the rate bucket against a
 * hand-driven clock.
 */

/** Node 20 has it; TypeScript's lib for this project does not declare it yet. */
const wellFormed = (text: string) => (text as string & { toWellFormed(): string }).toWellFormed();

/** Depth of a parsed JSON value, counted as nested objects and arrays (a scalar is 0). */
function depthOf(value: unknown): number {
  if (Array.isArray(value)) return 1 + Math.max(0, ...value.map(depthOf));
  if (value && typeof value === 'object') return 1 + Math.max(0, ...Object.values(value).map(depthOf));
  return 0;
}

const refusedCode = (run: () => unknown): string | null => {
  try {
    run();
    return null;
  } catch (error) {
    return error instanceof HttpError ? error.code : `not an HttpError: ${String(error)}`;
  }
};

describe('cleanInput', () => {
  it('replaces exactly what toWellFormed replaces, in values and keys, at any depth', () => {
    fc.assert(
      fc.property(fc.string({ unit: fc.oneof(fc.constantFrom('\uD800', '\uDBFF', '\uDC00', '\uDFFF', 'a', 'é'), fc.string({ unit: 'binary', maxLength: 2 })), maxLength: 12 }), (text) => {
        expect(cleanInput(text)).toBe(wellFormed(text));
        // Those keys are refused (below), not cleaned.
        fc.pre(!['__proto__', 'constructor', 'prototype'].includes(text));
        const cleaned = cleanInput({ outer: [{ [text]: text }], list: [text, 1, null] }) as { outer: Record<string, string>[]; list: unknown[] };
        expect(cleaned.list).toEqual([wellFormed(text), 1, null]);
        expect(cleaned.outer[0]).toEqual({ [wellFormed(text)]: wellFormed(text) });
      }),
      { numRuns: 300 },
    );
  });

  it('leaves well-formed text alone, surrogate pairs included', () => {
    const value = { name: 'Boom 😀 ü', list: ['\uD83D\uDE00'] };
    expect(cleanInput(structuredClone(value))).toEqual(value);
  });

  it('refuses __proto__, constructor and prototype keys wherever they are, and never pollutes a prototype', () => {
    for (const key of ['__proto__', 'constructor', 'prototype']) {
      expect(refusedCode(() => cleanInput(JSON.parse(`{"a":[{"b":{"${key}":{"polluted":true}}}]}`)))).toBe('forbidden_field');
    }
    expect(({} as { polluted?: boolean }).polluted).toBeUndefined();
  });

  it(`refuses values nested deeper than ${MAX_JSON_DEPTH}, and only those`, () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 80 }), fc.boolean(), (depth, objects) => {
        const text = objects ? '{"a":'.repeat(depth) + '1' + '}'.repeat(depth) : '['.repeat(depth) + ']'.repeat(depth);
        const value: unknown = JSON.parse(text);
        expect(depthOf(value)).toBe(depth);
        expect(refusedCode(() => cleanInput(value))).toBe(depth > MAX_JSON_DEPTH ? 'too_deep' : null);
      }),
      { numRuns: 100 },
    );
  });
});

describe('refuseDeepJson (the raw body before parsing)', () => {
  it('agrees with the depth of the parsed value on any JSON', () => {
    fc.assert(
      fc.property(fc.jsonValue({ maxDepth: 40 }), (value) => {
        const text = JSON.stringify(value);
        const code = refusedCode(() => refuseDeepJson({} as never, {}, Buffer.from(text)));
        expect(code).toBe(depthOf(JSON.parse(text)) > MAX_JSON_DEPTH ? 'too_deep' : null);
      }),
      { numRuns: 200 },
    );
  });

  it('counts brackets inside strings as text, escaped quotes included', () => {
    const text = JSON.stringify({ a: `\\"${'['.repeat(100)}\\`, b: '"{{{{' });
    expect(refusedCode(() => refuseDeepJson({} as never, {}, Buffer.from(text)))).toBeNull();
    const deep = '['.repeat(MAX_JSON_DEPTH + 1) + ']'.repeat(MAX_JSON_DEPTH + 1);
    expect(refusedCode(() => refuseDeepJson({} as never, {}, Buffer.from(deep)))).toBe('too_deep');
  });
});

describe('RateBucket', () => {
  it(`lets a burst of ${COMMAND_RATE.burst} through, then ${COMMAND_RATE.perSecond} a second`, () => {
    let now = 0;
    const bucket = new RateBucket(COMMAND_RATE.perSecond, COMMAND_RATE.burst, () => now);
    const burst = Array.from({ length: COMMAND_RATE.burst + 5 }, () => bucket.take());
    expect(burst.filter(Boolean).length).toBe(COMMAND_RATE.burst);
    // Over ten seconds at 50 a second, what gets through is the refill: 20 a second.
    let passed = 0;
    for (let i = 0; i < 500; i++) {
      now += 20;
      if (bucket.take()) passed++;
    }
    expect(passed).toBe(COMMAND_RATE.perSecond * 10);
    // A quiet spell refills it to the burst, never beyond.
    now += 60_000;
    expect(Array.from({ length: COMMAND_RATE.burst + 5 }, () => bucket.take()).filter(Boolean).length).toBe(COMMAND_RATE.burst);
  });
});

describe('refuseDeepJson in other encodings', () => {
  it('leaves a UTF-16 body to the count after parsing, where a character’s byte can look like a bracket', () => {
    // U+2200 and U+5B00 hold the bytes of a quote and a bracket in UTF-16LE.
    const text = JSON.stringify({ a: `\u2200${'\u5B00'.repeat(40)}` });
    expect(refusedCode(() => refuseDeepJson({} as never, {}, Buffer.from(text, 'utf16le'), 'utf-16le'))).toBeNull();
    expect(refusedCode(() => refuseDeepJson({} as never, {}, Buffer.from(text, 'utf16le'), 'utf-8'))).toBe('too_deep');
    expect(refusedCode(() => cleanInput(JSON.parse(text)))).toBeNull();
  });
});
