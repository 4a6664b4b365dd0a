import type { DataSource } from 'typeorm';
import { loadOne } from '../db/statements.js';
import { User } from '../entities/User.js';

/** A person by id, read fresh (deactivation applies at once): asked on every request, join and board command, so through a prepared statement. */
export function userById(dataSource: DataSource, id: string): User | null {
  return loadOne(dataSource, User, 'SELECT * FROM "user" WHERE id = ?', id);
}
