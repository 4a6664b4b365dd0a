/**
 * Small text helpers for the plan wording: numbers without trailing zeros, plurals, id parts and
 * filling `{name}` placeholders.
 */

/** A number as people write it: at most three decimals, no trailing zeros, no "-0". */
export function num(value: number): string {
  const rounded = Math.round(value * 1000) / 1000;
  return String(Object.is(rounded, -0) ? 0 : rounded);
}

/** Kilograms as tonnes, e.g. 12500 → "12.5". */
export function tonnes(weightKg: number): string {
  return num(weightKg / 1000);
}

/** "1 pin", "4 pins". */
export function plural(count: number, word: string): string {
  return `${count} ${word}${count === 1 ? '' : 's'}`;
}

/** A fragment safe for a plan id (letters, digits, dash, underscore), kept short so ids stay under 64 characters. */
export function idPart(value: string): string {
  const cleaned = value.replace(/[^A-Za-z0-9_-]/g, '_').slice(0, 24);
  return cleaned.length > 0 ? cleaned : 'x';
}

/** Values for placeholders. */
export type Vars = Readonly<Record<string, string | number>>;

/**
 * A sentence as people read it: a full stop straight after a full stop, question or exclamation
 * mark (a filled-in text that already ended its own sentence, "None in yard 2." + ".") is dropped.
 * An ellipsis stays an ellipsis. "a" before a number said with a vowel first becomes "an".
 */
export function tidy(text: string): string {
  return (
    text
      .replace(/([^.][.!?]|\.\.\.)\.(?=\s|$|\))/g, '$1')
      // "an 18 m boom", "an 84 m boom", "an 8.5 t block": numbers said with a vowel sound first.
      .replace(/\b([Aa]) (?=(?:8\d{0,2}|11|18)(?:\.\d+)?(?!\d|\.\d))/g, '$1n ')
  );
}

/** Fills `{name}` placeholders; throws on a missing one because that is a bug in the generator, not the user's input. */
export function fill(template: string, vars: Vars): string {
  return tidy(
    template.replace(/\{(\w+)\}/g, (_m, name: string) => {
      const v = vars[name];
      if (v === undefined) throw new Error(`plan wording: no value for {${name}} in "${template}"`);
      return typeof v === 'number' ? num(v) : v;
    }),
  );
}

/** A list in words: "a", "a and b", "a, b and c". */
export function listWords(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}
