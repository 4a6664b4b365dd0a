import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { fieldsFromZod } from '../../../shared/schemas/errors';
import { fieldErrorOf, fieldErrorsFrom, withoutFieldError } from '../../../src/stores/form-errors';

describe('the one set of form-error helpers', () => {
  it('keeps the first message per full path, and a refusal of the whole body under “(body)”', () => {
    const errors = fieldErrorsFrom([
      { path: 'qualifications.1', message: 'Pick each qualification once' },
      { path: 'qualifications.1', message: 'A later message for the same entry' },
      { path: 'qualifications.2', message: 'Another entry' },
      { path: '', message: 'Change at least one field' },
    ]);
    expect(errors).toEqual({ 'qualifications.1': 'Pick each qualification once', 'qualifications.2': 'Another entry', '(body)': 'Change at least one field' });
  });

  it('finds a field’s own message or the first under it, never one of a field that only starts with the same letters', () => {
    const errors = fieldErrorsFrom([
      { path: 'photoIdsExtra', message: 'Not this one' },
      { path: 'photoIds.0', message: 'That photo was not found; add it again' },
    ]);
    expect(fieldErrorOf(errors, 'photoIds')).toBe('That photo was not found; add it again');
    expect(fieldErrorOf(errors, 'photoIds.0')).toBe('That photo was not found; add it again');
    expect(fieldErrorOf(errors, 'photo')).toBe('');
    expect(fieldErrorOf({}, 'notes')).toBe('');
  });

  it('drops one field’s messages and those under it once the person changes it, and nothing else', () => {
    const errors = { notes: 'Describe the damage found', 'notes.0': 'x', notesExtra: 'Keep me', result: 'Choose a result' };
    expect(withoutFieldError(errors, 'notes')).toEqual({ notesExtra: 'Keep me', result: 'Choose a result' });
  });

  it('names zod’s generic checks in plain words and keeps a schema’s own, with the same paths as the server', () => {
    const schema = z.object({ radiusM: z.number().min(1), notes: z.string().min(1, 'Describe the damage found'), email: z.email(), parts: z.array(z.number().int().max(12)) });
    const parsed = schema.safeParse({ radiusM: 0, notes: '', email: 'not an e-mail', parts: [4, 14] });
    expect(parsed.success).toBe(false);
    if (parsed.success) return;
    expect(fieldErrorsFrom(fieldsFromZod(parsed.error))).toEqual({
      radiusM: 'Enter 1 or more',
      notes: 'Describe the damage found',
      email: 'Enter a valid e-mail',
      'parts.1': 'Enter 12 or less',
    });
  });
});
