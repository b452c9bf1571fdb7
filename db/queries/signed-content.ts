// What the signatures of a stored revision cover, read from the store and built by the one
// builder (app/signing/payload.ts), for signing, issuing and the integrity check alike.
import { signedContent } from '../../app/signing/payload';
import type { LabDb } from '../store';
import { getCheck } from './checks';
import { standardsUsed, type RevisionMeta } from './records';

/** The signed content of a revision; throws when its record cannot be read. */
export function revisionSignedContent(db: LabDb, meta: RevisionMeta): unknown {
  const r = getCheck(db, meta.checkId, meta.revision);
  if (!r) throw new Error(`check ${meta.checkId} revision ${meta.revision} cannot be read`);
  return signedContent(r, meta, standardsUsed(db, meta.id, meta.date));
}
