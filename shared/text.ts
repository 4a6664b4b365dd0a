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
