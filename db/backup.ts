// A consistent copy of a lab file while it may be in use: SQLite's online backup (through
// better-sqlite3's db.backup), which restarts by itself when another connection writes during
// the copy, so the copy is always one committed state. The copy is checked before it counts.
import Database from 'better-sqlite3';
import { openLabDb } from './store';

export interface BackupResult {
  pages: number;
  /** SQLite's integrity check of the copy: ['ok'] when sound. */
  check: string[];
}

export async function backupLabFile(source: string, destination: string): Promise<BackupResult> {
  const db = openLabDb(source);
  let pages = 0;
  try {
    const progress = await db.backup(destination);
    pages = progress.totalPages;
  } finally {
    db.close();
  }
  const copy = new Database(destination, { readonly: true, fileMustExist: true });
  try {
    const check = (copy.pragma('integrity_check') as { integrity_check: string }[]).map(
      (r) => r.integrity_check,
    );
    return { pages, check };
  } finally {
    copy.close();
  }
}
