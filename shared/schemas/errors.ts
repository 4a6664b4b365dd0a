import { z } from 'zod';

/** Every /api error body: a stable code, a sentence for people, and each failing field. */
export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    fields: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>['error'];
export type FieldError = NonNullable<ApiError['fields']>[number];
