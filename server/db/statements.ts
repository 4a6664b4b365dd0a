import type BetterSqlite3 from 'better-sqlite3';
import type { DataSource, EntityTarget, ObjectLiteral } from 'typeorm';
import { rawConnection } from './faults.js';

/**
 * Prepared statements on the one better-sqlite3 connection, for the few queries every board
 * command and every socket join runs. TypeORM builds, prepares and hydrates each query anew (in a
 * profile of the command path it held over half of the CPU); these are prepared once per
 * connection. They run on the same connection as TypeORM's transaction, so inside a queued
 * transaction they are part of it, and outside one they read what is committed.
 */
const prepared = new WeakMap<BetterSqlite3.Database, Map<string, BetterSqlite3.Statement>>();

/** The statement for `sql`, prepared once per connection. */
export function statement(dataSource: DataSource, sql: string): BetterSqlite3.Statement {
  const db = rawConnection(dataSource);
  if (!db) throw new Error('The database is not open.');
  let statements = prepared.get(db);
  if (!statements) prepared.set(db, (statements = new Map()));
  let found = statements.get(sql);
  if (!found) statements.set(sql, (found = db.prepare(sql)));
  return found;
}

/** One row of `sql` as TypeORM would have loaded it into `target` (column names, booleans, JSON, transformers); null when none. */
export function loadOne<T extends ObjectLiteral>(dataSource: DataSource, target: EntityTarget<T>, sql: string, ...params: unknown[]): T | null {
  const row = statement(dataSource, sql).get(...params) as Record<string, unknown> | undefined;
  return row ? hydrate(dataSource, target, row) : null;
}

/** A raw row turned into an entity through TypeORM's own metadata and driver conversions. */
export function hydrate<T extends ObjectLiteral>(dataSource: DataSource, target: EntityTarget<T>, row: Record<string, unknown>): T {
  const metadata = dataSource.getMetadata(target);
  const entity = metadata.create() as T;
  for (const column of metadata.columns) {
    if (!(column.databaseName in row)) continue;
    column.setEntityValue(entity, dataSource.driver.prepareHydratedValue(row[column.databaseName], column));
  }
  return entity;
}

/** The value of an entity's property as TypeORM would store it in its column (JSON text, 0/1, transformers). */
export function storedValue<T extends ObjectLiteral>(dataSource: DataSource, target: EntityTarget<T>, entity: T, propertyName: keyof T & string): unknown {
  const column = dataSource.getMetadata(target).findColumnWithPropertyName(propertyName);
  if (!column) throw new Error(`No column for ${propertyName}`);
  return dataSource.driver.preparePersistentValue(column.getEntityValue(entity), column);
}
