import { plain } from './format';

/**
 * Joins sentences, each ending with exactly one full stop: text from the plan or typed by a person
 * may already end with one, and a doubled stop reads as a typo in the record.
 */
export function sentences(...parts: (string | null | undefined | false)[]): string {
  return parts
    .map((p) => (p || '').trim())
    .filter(Boolean)
    .map((p) => (/[.!?…]$/.test(p) ? p : `${p}.`))
    .join(' ');
}

/** Text without its closing full stop, for putting inside a longer sentence. */
export function clause(text: string | null | undefined): string {
  return (text ?? '').trim().replace(/\.+$/, '');
}

/** "1 step", "2 steps". */
export function plural(count: number, one: string, many = `${one}s`): string {
  return `${count} ${count === 1 ? one : many}`;
}

/** A list in words: "a", "a and b", "a, b and c". */
export function listWords(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
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

/**
 * Fills `{name}` placeholders; throws on a missing one because that is a bug in the generator, not
 * the user's input. A number is written as typed (`plain`); a computed figure that must round up or
 * down is passed already written, as a string.
 */
export function fill(template: string, vars: Vars): string {
  return tidy(
    template.replace(/\{(\w+)\}/g, (_m, name: string) => {
      const v = vars[name];
      if (v === undefined) throw new Error(`plan wording: no value for {${name}} in "${template}"`);
      return typeof v === 'number' ? plain(v) : v;
    }),
  );
}
