// Prepared statements kept per database handle, so a hot path (a bulk import writes thousands of
// checks) compiles each SQL text once instead of once per call; better-sqlite3 keeps no cache of
// its own. Only for plain statements run with .run()/.get()/.all(): a cached statement is shared,
// so a caller must not switch its mode (.raw(), .pluck(), .expand()) or hold it open with
// .iterate() while another caller may run it.
import type Database from 'better-sqlite3';

const caches = new WeakMap<Database.Database, Map<string, Database.Statement>>();

export function cachedStatement(db: Database.Database, sql: string): Database.Statement {
  let cache = caches.get(db);
  if (!cache) {
    cache = new Map();
    caches.set(db, cache);
  }
  let statement = cache.get(sql);
  if (!statement) {
    statement = db.prepare(sql);
    cache.set(sql, statement);
  }
  return statement;
}
