// Writing one recorded check: its performer (found, or added as a technician), its revision rows,
// its sweeps and its audit entry. One function for both ways a check is written: in the service's
// own transaction, and by a bulk import's writer thread (import-writer.ts), so the two cannot
// drift apart; import-writer.test.ts compares the files they make.
import { appendAudit } from './audit';
import { insertCheck, type RevisionRowData } from './checks';
import { findPersonByName, insertPerson } from './people';
import { insertSweeps, type SweepData } from './sweeps';
import type { LabDb } from '../store';
import type { Verdict } from '../../app/engine/model';

/** One check as it is written: plain data, so it crosses to a writer thread as it is. */
export interface CheckWrite {
  at: string;
  actor: string;
  action: string;
  /** The performer found when the check was prepared; else found or added by name here. */
  performerId: number | undefined;
  performerName: string;
  revision: Omit<RevisionRowData, 'performerId'>;
  sweeps: { seq: number; sweep: SweepData }[];
  audit: { meter: string; date: string; asFound: Verdict | null; asLeft: Verdict | null };
}

/** Writes the check and returns its id. Call inside a transaction. */
export function writeCheckRows(db: LabDb, w: CheckWrite): number {
  const performerId = w.performerId ?? (findPersonByName(db, w.performerName) ?? addPerformer(db, w)).id;
  const checkId = insertCheck(db, { ...w.revision, performerId }, w.at);
  insertSweeps(db, checkId, w.sweeps);
  appendAudit(db, {
    at: w.at,
    actor: w.actor,
    action: w.action,
    entity: 'check',
    entityId: String(checkId),
    before: undefined,
    after: w.audit,
  });
  return checkId;
}

/** A performer new to the lab joins as a technician, with its own audit entry. */
function addPerformer(db: LabDb, w: CheckWrite) {
  const p = { name: w.performerName, role: 'technician' as const };
  const person = insertPerson(db, p, w.at);
  appendAudit(db, {
    at: w.at,
    actor: w.actor,
    action: 'create',
    entity: 'person',
    entityId: String(person.id),
    before: undefined,
    after: p,
  });
  return person;
}
