import { randomUUID } from 'node:crypto';
import type { EntityManager } from 'typeorm';
import type { Qualification } from '../../shared/schemas/users.js';
import { hashPassword } from '../auth/passwords.js';
import { User } from '../entities/User.js';
import { conflict } from '../errors.js';

export interface NewUser {
  email: string;
  displayName: string;
  qualifications: Qualification[];
  isAdmin?: boolean;
  password?: string;
}

/** Creates a person; e-mails are unique regardless of case. Runs inside the caller's transaction. */
export async function createUser(manager: EntityManager, input: NewUser): Promise<User> {
  const email = input.email.trim().toLowerCase();
  const existing = await manager.findOneBy(User, { email });
  if (existing) throw conflict('email_taken', `Someone already has the e-mail ${email}.`);
  const now = new Date().toISOString();
  const user = manager.create(User, {
    id: randomUUID(),
    email,
    displayName: input.displayName.trim(),
    passwordHash: input.password ? await hashPassword(input.password) : null,
    qualifications: [...new Set(input.qualifications)],
    isAdmin: input.isAdmin ?? false,
    active: true,
    createdAt: now,
    updatedAt: now,
  });
  return manager.save(user);
}
