import { z } from 'zod';

/** Crew roles a person may be given on a job. */
export const qualifications = ['supervisor', 'operator', 'signaller', 'rigger', 'viewer'] as const;
export const qualificationSchema = z.enum(qualifications);
export type Qualification = z.infer<typeof qualificationSchema>;

/** A person as the API presents them (never a hash or token). */
export const userSchema = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  qualifications: z.array(qualificationSchema),
  isAdmin: z.boolean(),
  active: z.boolean(),
  createdAt: z.string(),
});
export type UserDto = z.infer<typeof userSchema>;
