import type { EntityManager, EntityTarget, FindOptionsWhere, ObjectLiteral } from 'typeorm';
import { z } from 'zod';
import { notFound } from '../errors.js';

const uuid = z.uuid();

/** Loads a row by its UUID from a path parameter, or answers 404 (also for ids that are not UUIDs). */
export async function findByIdOr404<T extends ObjectLiteral & { id: string }>(manager: EntityManager, entity: EntityTarget<T>, id: string, what: string): Promise<T> {
  const row = uuid.safeParse(id).success ? await manager.findOneBy(entity, { id } as FindOptionsWhere<T>) : null;
  if (!row) throw notFound(what);
  return row;
}
