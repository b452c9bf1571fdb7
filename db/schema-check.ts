// The lab file's schema against the one this version of the program makes: every table, index and
// trigger (the guard triggers that keep signed records, keys, signatures, issued documents and the
// trail from being edited among them) must be present word for word, and nothing else may be.
// The expected schema is made by running the same migrations on an empty in-memory file, so it is
// exactly what a migrated lab file holds.
import type Database from 'better-sqlite3';
import { LATEST_VERSION } from './migrations';
import { openLabDb, schemaVersion } from './store';

interface SchemaObject {
  type: string;
  name: string;
  sql: string;
}

const expected = new Map<number, Map<string, SchemaObject>>();

function objectsOf(db: Database.Database): Map<string, SchemaObject> {
  const rows = db
    .prepare(
      `SELECT type, name, sql FROM sqlite_master
       WHERE name NOT LIKE 'sqlite\\_%' ESCAPE '\\' AND sql IS NOT NULL ORDER BY type, name`,
    )
    .all() as SchemaObject[];
  return new Map(rows.map((r) => [`${r.type} ${r.name}`, { ...r, sql: r.sql.replace(/\s+/g, ' ').trim() }]));
}

function expectedSchema(version: number): Map<string, SchemaObject> {
  let objects = expected.get(version);
  if (!objects) {
    const fresh = openLabDb(':memory:', { create: true, targetVersion: version });
    try {
      objects = objectsOf(fresh);
    } finally {
      fresh.close();
    }
    expected.set(version, objects);
  }
  return objects;
}

/** What differs from the schema the program makes, one line per table, index or trigger. */
export function schemaDifferences(db: Database.Database): string[] {
  const out: string[] = [];
  const version = schemaVersion(db);
  if (version < 1 || version > LATEST_VERSION)
    return [`the schema version ${version} is not one the program made`];
  // A file below the newest version is one opened read-only or a test's file at an older
  // schema (the program migrates every file it writes): only the newest schema is checked.
  if (version < LATEST_VERSION) return [];
  const want = expectedSchema(version);
  const have = objectsOf(db);
  for (const [key, o] of want) {
    const h = have.get(key);
    if (!h) out.push(`${o.type} ${o.name} is missing (dropped outside the program)`);
    else if (h.sql !== o.sql) out.push(`${o.type} ${o.name} differs from the one the program made`);
  }
  for (const [key, o] of have)
    if (!want.has(key)) out.push(`${o.type} ${o.name} was added outside the program`);
  return out;
}
