// The ordered list of schema migrations. Each is a numbered SQL file in db/migrations/; the
// list must only increase, and the version reached is stored in the file (PRAGMA user_version)
// together with a row per applied migration.
import { readFileSync } from 'node:fs';
import type Database from 'better-sqlite3';
import { writeBaseline } from './baseline';

export interface Migration {
  version: number;
  name: string;
  sql: string;
  /** Data work after the SQL, in the same transaction (`at`: when the migration runs). */
  after?: (db: Database.Database, at: string) => void;
}

const FILES: ReadonlyArray<readonly [number, string]> = [
  [1, '0001_initial.sql'],
  [2, '0002_records.sql'],
  [3, '0003_sweeps.sql'],
  [4, '0004_drafts.sql'],
  [5, '0005_documents.sql'],
  [6, '0006_summaries.sql'],
  [7, '0007_stored_summaries.sql'],
  [8, '0008_audit_index.sql'],
  [9, '0009_cheaper_writes.sql'],
  [10, '0010_document_keys.sql'],
  [11, '0011_meter_uses.sql'],
  [12, '0012_lab_upkeep.sql'],
  [13, '0013_entity_state.sql'],
];

const AFTER: ReadonlyMap<number, NonNullable<Migration['after']>> = new Map([
  [13, (db: Database.Database, at: string) => void writeBaseline(db, at)],
]);

function load(version: number, file: string): Migration {
  const sql = readFileSync(new URL(`./migrations/${file}`, import.meta.url), 'utf8');
  const after = AFTER.get(version);
  return { version, name: file.replace(/^\d+_/, '').replace(/\.sql$/, ''), sql, ...(after ? { after } : {}) };
}

export const MIGRATIONS: readonly Migration[] = FILES.map(([v, f]) => load(v, f));

export const LATEST_VERSION: number = MIGRATIONS.reduce((max, m) => {
  if (m.version !== max + 1)
    throw new Error(`migrations must be numbered 1, 2, 3...: found ${m.version} after ${max}`);
  return m.version;
}, 0);
