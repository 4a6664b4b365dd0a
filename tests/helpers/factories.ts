import { randomUUID } from 'node:crypto';
import type { EntityManager } from 'typeorm';
import { createUser, type NewUser } from '../../server/commands/users.js';
import type { User } from '../../server/entities/User.js';

/** A default password long enough for the product's rule. */
export const TEST_PASSWORD = 'correct-horse-battery';

/** Input for a new person; override any field. E-mails are unique per call. */
export function buildUser(overrides: Partial<NewUser> = {}): NewUser {
  const id = randomUUID().slice(0, 8);
  return {
    email: `person-${id}@example.test`,
    displayName: `Person ${id}`,
    qualifications: ['rigger'],
    isAdmin: false,
    password: TEST_PASSWORD,
    ...overrides,
  };
}

/** Saves a person built by buildUser through the real command. */
export function insertUser(manager: EntityManager, overrides: Partial<NewUser> = {}): Promise<User> {
  return createUser(manager, buildUser(overrides));
}
