// Opening a lab file: pragmas, identity check, migrations, and the refusal of files written
// by a newer version. Everything that touches SQL lives under db/.
import Database from 'better-sqlite3';
import { existsSync } from 'node:fs';
import { MIGRATIONS, LATEST_VERSION, type Migration } from './migrations';

/** 'DPLG' — marks a SQLite file as a Dipledger lab file. */
export const APPLICATION_ID = 0x44504c47;

/** A database handle that may be written to. Kept distinct so read paths can say they only read. */
export type LabDb = Database.Database & { readonly __labDb: true };

export class StoreError extends Error {
  constructor(
    readonly code: 'newer-file' | 'not-a-lab-file' | 'missing-file' | 'busy',
    message: string,
  ) {
    super(message);
    this.name = 'StoreError';
  }
}

export interface OpenOptions {
  /** Create the file when it does not exist (default false: a missing file is an error). */
  create?: boolean;
  /** Stop at this schema version (tests of migrations); default the latest. */
  targetVersion?: number;
  readonly?: boolean;
}

export function openLabDb(file: string, options: OpenOptions = {}): LabDb {
  const memory = file === ':memory:';
  if (!memory && !options.create && !existsSync(file)) {
    throw new StoreError('missing-file', `no lab file at ${file}: create one with "dipledger init"`);
  }
  const db = new Database(file, {
    readonly: options.readonly ?? false,
    fileMustExist: !options.create && !memory,
  });
  try {
    db.pragma('busy_timeout = 5000');
    // Identity and version are checked before anything is set, so a refused file is untouched.
    const appId = db.pragma('application_id', { simple: true }) as number;
    const version = db.pragma('user_version', { simple: true }) as number;
    const tables = (
      db.prepare("SELECT count(*) AS n FROM sqlite_master WHERE type = 'table'").get() as { n: number }
    ).n;
    if (appId !== APPLICATION_ID && (appId !== 0 || tables > 0)) {
      throw new StoreError('not-a-lab-file', `${file} is not a Dipledger lab file`);
    }
    if (version > LATEST_VERSION) {
      throw new StoreError(
        'newer-file',
        `${file} was written by a newer Dipledger (schema ${version}; this version knows up to ${LATEST_VERSION}). ` +
          'Open it with a newer version; nothing was changed.',
      );
    }
    // WAL lets the UI read while a long import writes; busy_timeout rides over short locks.
    if (!memory && !options.readonly) db.pragma('journal_mode = WAL');
    db.pragma('foreign_keys = ON');
    db.pragma('synchronous = NORMAL');
    beginWritesImmediately(db);
    if (!options.readonly) migrate(db as LabDb, options.targetVersion ?? LATEST_VERSION);
    return db as LabDb;
  } catch (e) {
    db.close();
    throw e;
  }
}

/** In WAL mode a deferred transaction that reads before it writes fails at once with "database
 * is locked" (SQLITE_BUSY_SNAPSHOT) when another process committed in between, and busy_timeout
 * cannot help it. So every transaction takes the write lock when it begins (BEGIN IMMEDIATE) and
 * waits on busy_timeout for it; nested ones stay savepoints. The CLI and the running app then
 * write the same file at once without losing a write (test/db/records-concurrency.test.ts). */
function beginWritesImmediately(db: Database.Database): void {
  const deferred = db.transaction.bind(db);
  db.transaction = ((fn: (...args: never[]) => unknown) => {
    const t = deferred(fn);
    return Object.assign((...args: never[]) => t.immediate(...args), {
      default: (...args: never[]) => t.immediate(...args),
      deferred: (...args: never[]) => t.deferred(...args),
      immediate: (...args: never[]) => t.immediate(...args),
      exclusive: (...args: never[]) => t.exclusive(...args),
    });
  }) as unknown as typeof db.transaction;
}

export function schemaVersion(db: Database.Database): number {
  return db.pragma('user_version', { simple: true }) as number;
}

/** Applies every migration above the file's version up to `target`, each in its own transaction. */
export function migrate(
  db: LabDb,
  target: number = LATEST_VERSION,
  migrations: readonly Migration[] = MIGRATIONS,
): void {
  db.exec(`CREATE TABLE IF NOT EXISTS schema_migration (
    version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)`);
  const current = schemaVersion(db);
  for (const m of migrations) {
    if (m.version <= current || m.version > target) continue;
    db.transaction(() => {
      const at = new Date().toISOString();
      db.exec(m.sql);
      m.after?.(db, at);
      db.prepare('INSERT INTO schema_migration (version, name, applied_at) VALUES (?, ?, ?)').run(
        m.version,
        m.name,
        at,
      );
      db.pragma(`user_version = ${m.version}`);
      db.pragma(`application_id = ${APPLICATION_ID}`);
    })();
  }
}
