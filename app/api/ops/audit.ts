// The audit trail and the integrity check of the whole lab file (records that hold up in an
// audit: 21 CFR Part 11 sections 11.10(e) and 11.70; RFC 8785 canonical JSON; RFC 8032 Ed25519).
import { z } from 'zod';
import { auditHash, GENESIS_HASH } from '../../../db/queries/audit';
import {
  allKeys,
  allSignatures,
  auditEntries,
  keyById,
  listAuditEntries,
  lockedRevisions,
  revisionById,
  revisionsOf,
  sqliteIntegrity,
  type RevisionMeta,
  type StoredSignature,
} from '../../../db/queries/records';
import type { LabDb } from '../../../db/store';
import { revisionSignedContent } from '../../../db/queries/signed-content';
import { signaturePayload } from '../../signing/payload';
import type { OpGroup, ServiceContext } from './context';
import type { IntegrityProblem, IntegrityReport, RecordsApi } from '../contract-records';
import { fingerprintOf, sha256Hex, verifyBytes } from '../../signing/keys';
import { parseWith } from '../issues';

const AuditQuerySchema = z.object({
  entity: z.string('expected an entity such as "check"').max(40).optional(),
  entityId: z.string('expected an entity id as text').max(80).optional(),
  meter: z.string('expected a meter asset id').trim().min(1, 'expected a meter asset id').max(80).optional(),
  limit: z.int('expected a whole number of entries').min(1).max(10000).default(100),
});

/** Every check of the lab file: SQLite's structure check, the audit chain link by link, every
 * signature against the record it covers, each key against the trail entry that enrolled it,
 * and that every locked revision carries its performer's signature. */
export function integrityReport(db: LabDb): IntegrityReport {
  const problems: IntegrityProblem[] = [];
  const sqlite = sqliteIntegrity(db);
  if (!(sqlite.length === 1 && sqlite[0] === 'ok'))
    problems.push({
      kind: 'sqlite',
      record: 'the lab file',
      problem: sqlite.slice(0, 5).join('; '),
      affects: 'the whole file: restore the newest backup that passes this check',
    });

  // The chain: each entry's hash over its fields and the hash before it.
  let prev = GENESIS_HASH;
  let entries = 0;
  let broken: { index: number; problem: IntegrityProblem } | undefined;
  const enrolled = new Map<string, string>();
  for (const e of auditEntries(db)) {
    entries += 1;
    if (e.entity === 'person-key') enrolled.set(e.entityId, e.afterJson ?? '');
    if (broken) continue;
    const recomputed = auditHash(
      e.prevHash,
      e.at,
      e.actor,
      e.action,
      e.entity,
      e.entityId,
      e.beforeJson,
      e.afterJson,
    );
    const problem =
      e.prevHash !== prev
        ? 'does not follow the entry before it (an entry was removed, inserted or changed before it)'
        : recomputed !== e.hash
          ? 'its content no longer matches its hash (the entry was edited)'
          : undefined;
    if (problem)
      broken = {
        index: entries,
        problem: {
          kind: 'audit',
          record: `audit entry ${e.id}`,
          problem: `audit entry ${e.id} (${e.action} ${e.entity} ${e.entityId} at ${e.at}) ${problem}`,
          affects: `the trail of ${e.entity} ${e.entityId}, and the entries after it`,
        },
      };
    prev = e.hash;
  }
  if (broken) {
    const after = entries - broken.index;
    broken.problem.affects = `${broken.problem.affects} (${after} later entr${after === 1 ? 'y' : 'ies'}) can no longer be trusted through the chain`;
    problems.push(broken.problem);
  }

  for (const k of allKeys(db)) {
    let problem: string | undefined;
    try {
      if (fingerprintOf(k.sealed.publicKeyPem) !== k.sealed.fingerprint)
        problem = 'its public key does not match its fingerprint';
    } catch {
      problem = 'its public key cannot be read';
    }
    const trail = enrolled.get(String(k.id));
    if (!problem && (trail === undefined || !trail.includes(k.sealed.fingerprint)))
      problem = 'it does not match the audit entry that enrolled it';
    if (problem)
      problems.push({
        kind: 'key',
        record: `signing key ${k.id} of person ${k.personId}`,
        problem: `signing key ${k.id}: ${problem}`,
        affects: 'every signature made with this key',
      });
  }

  const metaById = new Map<number, RevisionMeta>();
  const contentOf = new Map<number, unknown>();
  const bySignatureRevision = new Map<number, StoredSignature[]>();
  let checked = 0;
  for (const s of allSignatures(db)) {
    checked += 1;
    const list = bySignatureRevision.get(s.revisionId) ?? [];
    const at = revisionById(db, s.revisionId);
    const name = at ? `check ${at.checkId} revision ${at.revision}` : `revision row ${s.revisionId}`;
    const fail = (problem: string) =>
      problems.push({
        kind: 'signature',
        record: name,
        problem: `${name}: the ${s.meaning} signature of ${s.printedName} (${s.signedAt}) ${problem}`,
        affects: `${name} cannot be trusted as signed`,
      });
    try {
      if (!at) throw new Error('its revision is missing');
      let meta = metaById.get(s.revisionId);
      if (!meta) {
        meta = revisionsOf(db, at.checkId).find((r) => r.id === s.revisionId);
        if (!meta) throw new Error('its revision is missing');
        metaById.set(s.revisionId, meta);
      }
      if (!contentOf.has(s.revisionId)) contentOf.set(s.revisionId, revisionSignedContent(db, meta));
      const key = keyById(db, s.keyId);
      if (!key) throw new Error('its key is missing');
      const bytes = signaturePayload(
        contentOf.get(s.revisionId),
        { ...s, keyFingerprint: key.sealed.fingerprint },
        list.filter((p) => p.seq < s.seq),
      );
      if (
        sha256Hex(bytes) !== s.payloadSha256 ||
        !verifyBytes(key.sealed.publicKeyPem, bytes, s.signatureB64)
      )
        fail('does not match the record: the record or the signature was changed after signing');
    } catch (e) {
      fail(`cannot be checked: ${e instanceof Error ? e.message : String(e)}`);
    }
    list.push(s);
    bySignatureRevision.set(s.revisionId, list);
  }

  // A locked revision with no performer's signature was locked outside the app.
  for (const meta of lockedRevisions(db)) {
    const first = bySignatureRevision.get(meta.id)?.[0];
    if (!first || first.meaning !== 'performed')
      problems.push({
        kind: 'lock',
        record: `check ${meta.checkId} revision ${meta.revision}`,
        problem: `check ${meta.checkId} revision ${meta.revision} is ${meta.state} but has no performer's signature`,
        affects: `check ${meta.checkId} revision ${meta.revision} cannot be trusted as signed`,
      });
  }
  for (const [revisionId, list] of bySignatureRevision) {
    const at = revisionById(db, revisionId);
    const meta = at && revisionsOf(db, at.checkId).find((r) => r.id === revisionId);
    if (meta && meta.state === 'draft' && list.length > 0)
      problems.push({
        kind: 'lock',
        record: `check ${meta.checkId} revision ${meta.revision}`,
        problem: `check ${meta.checkId} revision ${meta.revision} is signed but marked as an editable draft`,
        affects: `check ${meta.checkId} revision ${meta.revision} may have been changed after signing`,
      });
  }

  return {
    ok: problems.length === 0,
    sqlite,
    auditEntries: entries,
    auditHead: prev,
    signaturesChecked: checked,
    problems,
  };
}

export function listAudit(ctx: ServiceContext, query: Parameters<RecordsApi['listAudit']>[0]) {
  const q = parseWith(AuditQuerySchema, query ?? {});
  return listAuditEntries(ctx.db, q);
}

export function verifyIntegrity(ctx: ServiceContext) {
  return integrityReport(ctx.db);
}

export const auditOps = { listAudit, verifyIntegrity } satisfies OpGroup<'listAudit' | 'verifyIntegrity'>;
