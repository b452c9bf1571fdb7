// People who perform, review and administer checks.
import type { Person } from '../../app/model/records';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

interface PersonRow {
  id: number;
  name: string;
  role: Person['role'];
  /** From 0011 (absent in a file at an older schema). */
  left_on?: string | null;
}

const rowToPerson = (r: PersonRow): Person => ({
  id: r.id,
  name: r.name,
  role: r.role,
  ...(r.left_on ? { leftOn: r.left_on } : {}),
});

export function listPeople(db: LabDb): Person[] {
  return (db.prepare('SELECT * FROM person ORDER BY name').all() as PersonRow[]).map(rowToPerson);
}

export function findPersonByName(db: LabDb, name: string): Person | undefined {
  const row = cachedStatement(db, 'SELECT * FROM person WHERE name = ? COLLATE NOCASE').get(name) as
    PersonRow | undefined;
  return row && rowToPerson(row);
}

export function insertPerson(db: LabDb, p: Omit<Person, 'id'>, createdAt: string): Person {
  const info = db
    .prepare('INSERT INTO person (name, role, created_at) VALUES (?, ?, ?)')
    .run(p.name, p.role, createdAt);
  return { id: Number(info.lastInsertRowid), ...p };
}
