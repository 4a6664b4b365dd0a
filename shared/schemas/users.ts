import { z } from 'zod';
import { DEFAULT_UNIT_SYSTEM, unitSystems } from '../units/quantity.js';

/** Crew roles a person may be given on a job. */
export const qualifications = ['supervisor', 'operator', 'signaller', 'rigger', 'viewer'] as const;
export const qualificationSchema = z.enum(qualifications);
export type Qualification = z.infer<typeof qualificationSchema>;

/** Words for each qualification on screen. */
export const qualificationLabels: Record<Qualification, string> = {
  supervisor: 'Supervisor',
  operator: 'Operator',
  signaller: 'Signaller',
  rigger: 'Rigger',
  viewer: 'Viewer',
};

function isQualification(role: string): role is Qualification {
  return (qualifications as readonly string[]).includes(role);
}

/** The role someone acted in, in words: a crew role, or an administrator acting on a job. */
export function roleLabel(role: string): string {
  return isQualification(role) ? qualificationLabels[role] : role === 'admin' ? 'Administrator' : role;
}

/** Metric or US customary: each person's choice of units on screen. */
export const unitSystemSchema = z.enum(unitSystems, { message: 'Choose metric or US customary units' });

/** A person as the API presents them (never a hash or token). */
export const userSchema = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  qualifications: z.array(qualificationSchema),
  isAdmin: z.boolean(),
  active: z.boolean(),
  /** Qualified to inspect an assembled crane: may acknowledge a job's final sign-off as the inspector. */
  canInspect: z.boolean(),
  /** False while an invited person has not yet set a password. */
  hasPassword: z.boolean(),
  createdAt: z.string(),
  /** The person's own system of units on screen (shared/units/quantity.ts); the record stays in SI. */
  units: unitSystemSchema.default(DEFAULT_UNIT_SYSTEM),
});
export type UserDto = z.infer<typeof userSchema>;

const emailField = z.string().trim().toLowerCase().max(254).pipe(z.email('Enter a valid e-mail'));
const displayNameField = z.string().trim().min(1, 'Enter a name').max(120, 'Use at most 120 characters');

/** Body of POST /api/users: invite a person by e-mail. */
export const inviteUserSchema = z.object({
  email: emailField,
  displayName: displayNameField,
  qualifications: z.array(qualificationSchema).max(qualifications.length).default([]),
  isAdmin: z.boolean().default(false),
});
export type InviteUserRequest = z.input<typeof inviteUserSchema>;

/** Body of PATCH /api/users/:id: any subset of these. */
export const updateUserSchema = z
  .object({
    displayName: displayNameField,
    qualifications: z.array(qualificationSchema).max(qualifications.length),
    isAdmin: z.boolean(),
    active: z.boolean(),
    canInspect: z.boolean(),
  })
  .partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'Change at least one field');
export type UpdateUserRequest = z.infer<typeof updateUserSchema>;

/**
 * Body of PATCH /api/users/:userId/preferences: a person's own choices about how Holdline shows
 * things to them (not rights, so no second administrator is asked).
 */
export const updatePreferencesSchema = z
  .object({ units: unitSystemSchema })
  .partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'Change at least one setting');
export type UpdatePreferencesRequest = z.infer<typeof updatePreferencesSchema>;

export const userListSchema = z.object({ items: z.array(userSchema) });
export const userEnvelopeSchema = z.object({ user: userSchema });

/** Answer of GET /api/crew-candidates: active people a supervisor may put in a crew. */
export const crewCandidateListSchema = z.object({
  items: z.array(z.object({ id: z.string(), displayName: z.string(), qualifications: z.array(qualificationSchema) })),
});
export type CrewCandidate = z.infer<typeof crewCandidateListSchema>['items'][number];
