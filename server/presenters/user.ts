import type { UserDto } from '../../shared/schemas/users.js';
import type { User } from '../entities/User.js';

/** The wire shape of a person: never the hash. */
export function presentUser(user: User): UserDto {
  return {
    id: user.id,
    email: user.email,
    displayName: user.displayName,
    qualifications: user.qualifications,
    isAdmin: user.isAdmin,
    active: user.active,
    canInspect: user.canInspect,
    hasPassword: user.passwordHash !== null,
    createdAt: user.createdAt,
    units: user.units,
  };
}
