// People who perform, review and administer checks.
import type { Person } from '../../app/model/records';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

interface PersonRow {
  id: number;
  name: string;
  role: Person['role'];
}

const rowToPerson = (r: PersonRow): Person => ({ id: r.id, name: r.name, role: r.role });

export function listPeople(db: LabDb): Person[] {
  return (db.prepare('SELECT id, name, role FROM person ORDER BY name').all() as PersonRow[]).map(
    rowToPerson,
  );
}

export function findPersonByName(db: LabDb, name: string): Person | undefined {
  const row = cachedStatement(db, 'SELECT id, name, role FROM person WHERE name = ? COLLATE NOCASE').get(
    name,
  ) as PersonRow | undefined;
  return row && rowToPerson(row);
}

export function insertPerson(db: LabDb, p: Omit<Person, 'id'>, createdAt: string): Person {
  const info = db
    .prepare('INSERT INTO person (name, role, created_at) VALUES (?, ?, ?)')
    .run(p.name, p.role, createdAt);
  return { id: Number(info.lastInsertRowid), ...p };
}
